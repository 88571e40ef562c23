import { cpSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, symlinkSync, utimesSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { MIN_FILES_PER_THREAD, workerCount } from '@/cli/fit-threads';
import { REPO, runCli } from '@/tests/cli/built-cli';

jest.setTimeout(120_000);

/** Sets every file under `dir` an hour back, so none counts as changed during a build. */
function ageTree(dir: string, when: Date): void {
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const p = path.join(dir, entry.name);
    if (entry.isDirectory()) ageTree(p, when);
    else utimesSync(p, when, when);
  }
}

describe('cli/launch.cjs builds the bundle when it is missing or stale', () => {
  // A copy of what the bundle is made of, so the test can edit sources without touching the repository.
  let tree: string;
  beforeAll(() => {
    tree = mkdtempSync(path.join(os.tmpdir(), 'ql-cli-build-'));
    for (const part of ['cli', 'lib', 'scripts/build-cli.ts', 'tsconfig.json']) cpSync(path.join(REPO, part), path.join(tree, part), { recursive: true });
    ageTree(tree, new Date(Date.now() - 3600_000));
    symlinkSync(path.join(REPO, 'node_modules'), path.join(tree, 'node_modules'));
  });
  afterAll(() => rmSync(tree, { recursive: true, force: true }));

  const launcher = () => path.join(tree, 'cli', 'launch.cjs');
  const bundle = () => path.join(tree, 'build', 'cli.cjs');

  it('a fresh copy builds at its first run, and a second run reuses the bundle', () => {
    const first = runCli(['ni', '--temp-k', '300', '--json'], { launcher: launcher() });
    expect(first.status).toBe(0);
    expect(Object.keys(JSON.parse(first.stdout)).sort()).toEqual(['eg_ev', 'nc_cm3', 'ni_cm3', 'nv_cm3']);
    const builtAt = statSync(bundle()).mtimeMs;
    const second = runCli(['ni', '--temp-k', '300', '--json'], { launcher: launcher() });
    expect(second.stdout).toBe(first.stdout);
    expect(statSync(bundle()).mtimeMs).toBe(builtAt);
  });

  it('an edited source is what runs next, and a deleted bundle is rebuilt', () => {
    const main = path.join(tree, 'cli', 'main.ts');
    writeFileSync(main, readFileSync(main, 'utf8').replace("'Quasilevel command line'", "'Quasilevel command line, edited'"));
    const edited = runCli([], { launcher: launcher() });
    expect(edited.status).toBe(0);
    expect(edited.stdout).toMatch(/^Quasilevel command line, edited/);

    rmSync(bundle());
    const again = runCli([], { launcher: launcher() });
    expect(again.stdout).toMatch(/^Quasilevel command line, edited/);
  });

  it('a source that does not compile stops the command instead of running the old bundle', () => {
    const ni = path.join(tree, 'cli', 'commands', 'ni.ts');
    const text = readFileSync(ni, 'utf8');
    writeFileSync(ni, `${text}\nexport const broken = ;\n`);
    const r = runCli(['ni', '--temp-k', '300', '--json'], { launcher: launcher() });
    expect(r.status).toBe(1);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/cli\/commands\/ni\.ts/);
    expect(r.stderr).toMatch(/the command line could not be built/);
    writeFileSync(ni, text);
    expect(runCli(['ni', '--temp-k', '300', '--json'], { launcher: launcher() }).status).toBe(0);
  });
});

describe('fit on worker threads', () => {
  it('uses workers only from the bundle and with enough files for each thread', () => {
    expect(workerCount(200, 2, true)).toBe(1);
    expect(workerCount(8 * MIN_FILES_PER_THREAD, 8, true)).toBe(7);
    expect(workerCount(3 * MIN_FILES_PER_THREAD, 8, true)).toBe(2);
    expect(workerCount(2 * MIN_FILES_PER_THREAD - 1, 2, true)).toBe(0);
    expect(workerCount(200, 1, true)).toBe(0);
    expect(workerCount(200, 2, false)).toBe(0);
  });

  it('prints the same lines in file order as one thread, a bad file included', () => {
    const batches = path.join(REPO, 'sample-data', 'batches');
    const files = readdirSync(batches, { withFileTypes: true })
      .filter((d) => d.isDirectory())
      .map((d) => d.name)
      .flatMap((b) => readdirSync(path.join(batches, b)).filter((f) => f.endsWith('.csv')).map((f) => path.join(batches, b, f)))
      .sort()
      .slice(0, 3 * MIN_FILES_PER_THREAD);
    const dir = mkdtempSync(path.join(os.tmpdir(), 'ql-cli-threads-'));
    const bad = path.join(dir, 'bad.csv');
    writeFileSync(bad, 'V,I\n0,1\n0.1,abc\n');
    files.splice(20, 0, bad);
    try {
      const one = runCli(['fit', ...files, '--json'], { env: { QUASILEVEL_CLI_THREADS: '1' } });
      const two = runCli(['fit', ...files, '--json'], { env: { QUASILEVEL_CLI_THREADS: '2' } });
      expect(one.status).toBe(2);
      expect(two.status).toBe(2);
      // elapsed_ms is the only field that differs from run to run.
      const strip = (line: string) => line.replace(/"elapsed_ms":[0-9.e+-]+/, '"elapsed_ms":0');
      expect(two.lines.map(strip)).toEqual(one.lines.map(strip));
      expect(two.lines.map((l) => JSON.parse(l).file)).toEqual(files);
      expect(JSON.parse(two.lines[20]).code).toBe('not-a-number');
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('a wrong QUASILEVEL_CLI_THREADS is named', () => {
    const r = runCli(['fit', path.join(REPO, 'sample-data'), '--json'], { env: { QUASILEVEL_CLI_THREADS: '0' } });
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/QUASILEVEL_CLI_THREADS must be a whole number from 1 to 64, got "0"/);
  });
});
