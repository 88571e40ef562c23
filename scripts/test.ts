/**
 * `npm test`: every layer for real.
 *  1. jest projects lib, server, components (unit, API through supertest on an in-memory PGlite,
 *     React Native components through jest-expo);
 *  2. the web export (rebuilt only when sources changed), then the browser tests in headless
 *     Chromium against the real server (jest project e2e).
 * Ends with one line `tests: N passed, M failed` over all of them.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { buildWeb } from './build-web';

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

type JestJson = { numPassedTests: number; numFailedTests: number; numPendingTests: number; success: boolean };

function runJest(label: string, args: string[]): JestJson {
  mkdirSync(path.join(ROOT, 'artifacts'), { recursive: true });
  const out = path.join(ROOT, 'artifacts', `jest-${label}.json`);
  // --forceExit: a child server or Chromium process that lingers a moment must not hold CI open.
  const res = spawnSync('npx', ['jest', ...args, '--forceExit', '--json', '--outputFile', out], { cwd: ROOT, stdio: 'inherit', env: process.env });
  if (!existsSync(out)) return { numPassedTests: 0, numFailedTests: 1, numPendingTests: 0, success: false };
  const json = JSON.parse(readFileSync(out, 'utf8')) as JestJson;
  if (res.status !== 0 && json.numFailedTests === 0) json.numFailedTests = 1; // a suite that failed to load
  return json;
}

function main(): number {
  const only = process.argv.slice(2);
  const results: JestJson[] = [];
  const wantUnit = only.length === 0 || only.includes('unit');
  const wantE2e = only.length === 0 || only.includes('e2e');
  // Two workers on two cores: jest's default there is one (all suites in a row), which leaves a
  // core idle whenever a suite waits on a child process, a worker thread or a timer.
  if (wantUnit) results.push(runJest('unit', ['--selectProjects', 'lib', 'server', 'components', '--maxWorkers=2']));
  if (wantE2e) {
    try {
      ensureChromium();
      buildWeb();
      results.push(runJest('e2e', ['--selectProjects', 'e2e', '--runInBand']));
    } catch (err) {
      console.error(`[test] browser tests could not run: ${(err as Error).message}`);
      results.push({ numPassedTests: 0, numFailedTests: 1, numPendingTests: 0, success: false });
    }
  }
  const passed = results.reduce((s, r) => s + r.numPassedTests, 0);
  const failed = results.reduce((s, r) => s + r.numFailedTests, 0);
  const skipped = results.reduce((s, r) => s + r.numPendingTests, 0);
  console.log(`\ntests: ${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
  return failed === 0 && results.every((r) => r.success) ? 0 : 1;
}

process.exit(main());
