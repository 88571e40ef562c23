/**
 * Runs the command line as `npm run cli` does: plain Node on cli/launch.cjs, which runs the
 * bundle build/cli.cjs. The bundle is built (if its sources changed) once per test file, before
 * the first spawn, so no spawn pays for a build; concurrent builds by parallel test files are
 * safe (scripts/build-cli.ts replaces each output whole).
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { buildCliIfStale } from '@/scripts/build-cli';

export const REPO = path.resolve(__dirname, '..', '..');
export const LAUNCHER = path.join(REPO, 'cli', 'launch.cjs');

let built = false;

/** Builds build/cli.cjs when stale (once per test file). */
export function ensureCliBuilt(): void {
  if (built) return;
  buildCliIfStale();
  built = true;
}

export type CliRun = { status: number | null; stdout: string; stderr: string; lines: string[] };

/** Runs `node cli/launch.cjs ...args` in the repository; `env` is added to this process's environment. */
export function runCli(args: string[], opts: { env?: Record<string, string>; launcher?: string } = {}): CliRun {
  ensureCliBuilt();
  const out = spawnSync(process.execPath, [opts.launcher ?? LAUNCHER, ...args], {
    cwd: REPO,
    encoding: 'utf8',
    timeout: 60_000,
    env: { ...process.env, ...opts.env },
  });
  return { status: out.status, stdout: out.stdout, stderr: out.stderr, lines: out.stdout.trim().split('\n').filter(Boolean) };
}
