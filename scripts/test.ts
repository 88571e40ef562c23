/**
 * `npm test`: every layer for real, in two lanes that run at the same time.
 *  1. jest projects lib, server, components (unit, API through supertest on an in-memory PGlite,
 *     React Native components through jest-expo), two workers;
 *  2. beside it, the web export (rebuilt only when sources changed), then the browser tests in
 *     headless Chromium against the real server (jest project e2e), two files at a time.
 * From the start one server seeds the demo data into a folder that the server processes of both
 * lanes start on copies of (tests/support/server-process.ts).
 * The browser lane waits on Chromium and the server most of the time, so running it beside the
 * unit lane fills the cores' idle time: on the 2-core machine the whole run went from ~10 min
 * (one lane after the other) to the figure in the README's performance table.
 * Ends with one line `tests: N passed, M failed` over all of them.
 */
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { buildWeb } from './build-web';
import { buildServerIfStale } from './build-server';
import { SEEDED_TEMPLATE_ENV, makeSeededTemplate } from '../tests/support/server-process';

const ROOT = path.resolve(__dirname, '..');
const CHROMIUM = process.env.CHROMIUM_PATH || '/usr/bin/chromium';

function ensureChromium(): void {
  if (existsSync(CHROMIUM)) return;
  console.log(`[test] Chromium is not at ${CHROMIUM}; installing Debian's chromium with apt-get…`);
  const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
  const sh = (cmd: string) => spawnSync('sh', ['-c', cmd], { stdio: 'inherit' }).status === 0;
  const ok = isRoot ? sh('apt-get update -qq && apt-get install -y -qq chromium') : sh('sudo -n apt-get update -qq && sudo -n apt-get install -y -qq chromium');
  if (!ok || !existsSync(CHROMIUM)) {
    throw new Error(
      `The browser tests need Chromium at ${CHROMIUM} and it could not be installed here. Install it with ` +
        '`sudo apt-get install -y chromium` (Debian/Ubuntu), or set CHROMIUM_PATH to an existing Chromium, then run `npm test` again.',
    );
  }
}

type JestJson = {
  numPassedTests: number;
  numFailedTests: number;
  numPendingTests: number;
  success: boolean;
  testResults?: { name: string; message?: string; assertionResults?: { fullName: string; status: string; failureMessages?: string[] }[] }[];
};

/** Where the failures of the last run are listed (printed again at the end of `.ci/run`). */
const FAILURES_FILE = path.join(ROOT, 'artifacts', 'test-failures.txt');

/**
 * The failed tests of the lanes, each with the first lines of its message: printed last, so the
 * end of a long log (all a CI page may show) says what failed.
 */
function failureSummary(results: JestJson[]): string {
  const lines: string[] = [];
  const firstLines = (m: string) =>
    m
      .replace(/\u001b\[[0-9;]*m/g, '')
      .split('\n')
      .filter((l) => l.trim() && !/^\s+at /.test(l))
      .slice(0, 6)
      .map((l) => `      ${l.slice(0, 200)}`);
  for (const r of results) {
    for (const file of r.testResults ?? []) {
      const name = path.relative(ROOT, file.name);
      const failed = (file.assertionResults ?? []).filter((a) => a.status === 'failed');
      if (!failed.length && file.message) lines.push(`  ✕ ${name} (the file did not run)`, ...firstLines(file.message));
      for (const a of failed) lines.push(`  ✕ ${name} › ${a.fullName}`, ...firstLines((a.failureMessages ?? []).join('\n')));
    }
  }
  return lines.join('\n');
}

const FAILED_TO_RUN: JestJson = { numPassedTests: 0, numFailedTests: 1, numPendingTests: 0, success: false };

/** One jest run as a child process; resolves with its JSON summary (a run that wrote none counts as one failure). */
function runJest(label: string, args: string[]): Promise<JestJson> {
  mkdirSync(path.join(ROOT, 'artifacts'), { recursive: true });
  const out = path.join(ROOT, 'artifacts', `jest-${label}.json`);
  rmSync(out, { force: true });
  const started = Date.now();
  // --forceExit: a child server or Chromium process that lingers a moment must not hold CI open.
  const child = spawn('npx', ['jest', ...args, '--forceExit', '--json', '--outputFile', out], { cwd: ROOT, stdio: 'inherit', env: process.env });
  return new Promise((resolve) => {
    child.on('error', () => resolve(FAILED_TO_RUN));
    child.on('exit', (status) => {
      console.log(`[test] ${label} lane finished in ${((Date.now() - started) / 1000).toFixed(0)} s`);
      if (!existsSync(out)) return resolve(FAILED_TO_RUN);
      const json = JSON.parse(readFileSync(out, 'utf8')) as JestJson;
      if (status !== 0 && json.numFailedTests === 0) json.numFailedTests = 1; // a suite that failed to load
      resolve(json);
    });
  });
}

/**
 * Browser-lane workers: two (QUASILEVEL_E2E_WORKERS overrides). Each suite has its own server
 * process and data folder and its own Chromium, so two suites at a time share nothing; most of a
 * browser test is waiting on the page, and with a second worker another suite's work fills it
 * (measured in DEVELOPERS.md, "Test timing").
 */
function e2eWorkers(): number {
  const n = Number(process.env.QUASILEVEL_E2E_WORKERS ?? 2);
  return Number.isInteger(n) && n >= 1 ? n : 2;
}

/** The demo data seeded once (tests/support/server-process.ts, SEEDED_TEMPLATE_ENV); resolves with an error message or null. */
type Seeding = Promise<string | null>;

/** The browser lane: Chromium and the web export (while the demo data is seeded), then the e2e project. */
async function browserLane(seeding: Seeding): Promise<JestJson> {
  try {
    ensureChromium();
  } catch (err) {
    console.error(`[test] browser tests could not run: ${(err as Error).message}`);
    return FAILED_TO_RUN;
  }
  const t = Date.now();
  try {
    await buildWeb();
  } catch (err) {
    console.error(`[test] browser tests could not run: ${(err as Error).message}`);
    return FAILED_TO_RUN;
  }
  const seedingError = await seeding;
  if (seedingError) {
    console.error(`[test] the demo data could not be seeded: ${seedingError}`);
    return FAILED_TO_RUN;
  }
  console.log(`[test] web export and seeded data folder for the browser tests ready in ${((Date.now() - t) / 1000).toFixed(0)} s`);
  const workers = e2eWorkers();
  return runJest('e2e', ['--selectProjects', 'e2e', ...(workers === 1 ? ['--runInBand'] : [`--maxWorkers=${workers}`])]);
}

async function main(): Promise<number> {
  const only = process.argv.slice(2);
  const started = Date.now();
  const wantUnit = only.length === 0 || only.includes('unit');
  const wantE2e = only.length === 0 || only.includes('e2e');
  // The server bundle every server process of both lanes runs (tests/support/server-process.ts),
  // built once here when stale rather than by two suites at the same time.
  try {
    const t = Date.now();
    if (await buildServerIfStale()) console.log(`[test] server bundle built in ${((Date.now() - t) / 1000).toFixed(1)} s`);
  } catch (err) {
    console.error(`[test] the server could not be built: ${(err as Error).message}`);
    return 1;
  }
  // One server migrates and seeds the demo data once, from the start, beside the unit lane and the
  // web export; the servers of both lanes start on copies of it (each waits for it if it comes
  // first). The folder is named now, so that the unit lane's jest, started next, knows it.
  const template = mkdtempSync(path.join(os.tmpdir(), 'ql-seeded-'));
  process.env[SEEDED_TEMPLATE_ENV] = template;
  const seeding: Seeding = makeSeededTemplate(template).then(
    () => null,
    (err: Error) => err.message,
  );
  // Two workers on two cores: jest's default there is one (all suites in a row), which leaves a
  // core idle whenever a suite waits on a child process, a worker thread or a timer.
  const unit = wantUnit ? runJest('unit', ['--selectProjects', 'lib', 'server', 'components', '--maxWorkers=2']) : null;
  const e2e = wantE2e ? browserLane(seeding) : null;
  const results = (await Promise.all([unit, e2e])).filter((r): r is JestJson => r !== null);
  await seeding;
  rmSync(template, { recursive: true, force: true });
  const passed = results.reduce((s, r) => s + r.numPassedTests, 0);
  const failed = results.reduce((s, r) => s + r.numFailedTests, 0);
  const skipped = results.reduce((s, r) => s + r.numPendingTests, 0);
  const failures = failureSummary(results);
  rmSync(FAILURES_FILE, { force: true });
  if (failures) {
    writeFileSync(FAILURES_FILE, `${failures}\n`);
    console.log(`\n[test] failed:\n${failures}`);
  }
  console.log(`\n[test] whole run ${((Date.now() - started) / 1000).toFixed(0)} s`);
  console.log(`tests: ${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
  return failed === 0 && results.every((r) => r.success) ? 0 : 1;
}

main().then((code) => process.exit(code));
