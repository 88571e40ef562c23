/**
 * server/launch.cjs (`npm run serve`, `npm run worker`) runs the bundles scripts/build-server.ts
 * makes, building them first when they are missing or stale, and never runs an old bundle after
 * a source changed. Worked on a copy of the sources, so the test can edit one without touching
 * the repository (whose bundle the other tests' server processes run). The worker without
 * DATABASE_URL is the probe: it starts, says why it cannot work and exits 1, in well under a second.
 */
import { spawnSync } from 'node:child_process';
import { cpSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, symlinkSync, utimesSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { REPO_ROOT } from '@/tests/support/server-process';

// Two or three esbuild runs of the whole server on a shared 2-core machine.
jest.setTimeout(180_000);

/** Sets every file under `dir` an hour back, so none counts as changed during a build. */
function ageTree(dir: string, when: Date): void {
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const p = path.join(dir, entry.name);
    if (entry.isDirectory()) ageTree(p, when);
    else utimesSync(p, when, when);
  }
}

let tree: string;
beforeAll(() => {
  tree = mkdtempSync(path.join(os.tmpdir(), 'ql-server-build-'));
  for (const part of ['server', 'lib', 'db', 'scripts/build-server.ts', 'scripts/build-cli.ts', 'tsconfig.json', 'package.json', 'package-lock.json']) {
    cpSync(path.join(REPO_ROOT, part), path.join(tree, part), { recursive: true });
  }
  ageTree(tree, new Date(Date.now() - 3600_000));
  symlinkSync(path.join(REPO_ROOT, 'node_modules'), path.join(tree, 'node_modules'));
});
afterAll(() => rmSync(tree, { recursive: true, force: true }));

const bundle = () => path.join(tree, 'build', 'worker.cjs');
function runWorker(): { status: number | null; output: string } {
  const env = { ...process.env };
  delete env.DATABASE_URL;
  const r = spawnSync(process.execPath, [path.join(tree, 'server', 'launch.cjs'), 'worker'], { cwd: tree, env, encoding: 'utf8', timeout: 150_000 });
  return { status: r.status, output: `${r.stdout}${r.stderr}` };
}

it('a fresh copy builds at its first run, and a second run reuses the bundle', () => {
  const first = runWorker();
  expect(first.status).toBe(1);
  expect(first.output).toContain('DATABASE_URL is not set');
  const builtAt = statSync(bundle()).mtimeMs;
  const second = runWorker();
  expect(second).toEqual(first);
  expect(statSync(bundle()).mtimeMs).toBe(builtAt);
  // The analysis threads of a bundled server load the bundled handler, not the tsx bootstrap.
  expect(readFileSync(path.join(tree, 'build', 'server.cjs'), 'utf8')).toMatch(/"build",\s*"analysis-worker\.cjs"/);
  statSync(path.join(tree, 'build', 'analysis-worker.cjs'));
});

it('after a source changes, the next run builds again and runs the new code', () => {
  const file = path.join(tree, 'server', 'worker.ts');
  writeFileSync(file, readFileSync(file, 'utf8').replace('DATABASE_URL is not set.', 'DATABASE_URL is not set (edited).'));
  const r = runWorker();
  expect(r.status).toBe(1);
  expect(r.output).toContain('DATABASE_URL is not set (edited).');
});

it('a source that does not build stops the launcher with exit 1 instead of running the old bundle', () => {
  const file = path.join(tree, 'server', 'worker.ts');
  writeFileSync(file, `${readFileSync(file, 'utf8')}\nconst broken = ;\n`);
  const r = runWorker();
  expect(r.status).toBe(1);
  expect(r.output).toContain('the server could not be built');
  expect(r.output).not.toContain('DATABASE_URL is not set');
});
