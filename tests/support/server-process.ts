/**
 * Starts the real server as a child process on a free loopback port with its own data folder,
 * for browser, crash and load tests. Always pair with stop(). The child runs the bundle
 * build/server.cjs (scripts/build-server.ts, rebuilt first when any of its sources changed), as
 * `npm run serve` does: plain Node, no TypeScript loader on each start.
 */
import { spawn } from 'node:child_process';
import type { ChildProcess } from 'node:child_process';
import { cpSync, existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { buildServerIfStale, SERVER_BUNDLE, WORKER_BUNDLE } from '../../scripts/build-server';

export const REPO_ROOT = path.resolve(__dirname, '..', '..');

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.unref();
    s.on('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(port));
    });
  });
}

/**
 * The command line of a server process (`node build/server.cjs`, or `build/worker.cjs` for a
 * PostgreSQL-mode worker), after building the bundles when they are stale.
 */
export async function serverCommand(which: 'server' | 'worker' = 'server'): Promise<string[]> {
  await buildServerIfStale();
  return [process.execPath, which === 'server' ? SERVER_BUNDLE : WORKER_BUNDLE];
}

/**
 * The environment variable naming a data folder that a server migrates and seeds with the demo
 * data and then leaves (`npm test` names it before either lane starts and seeds it while the web
 * export runs, scripts/test.ts). A server started without its own folder gets a copy of it: the
 * same demo data without each suite paying for the migrations and the demo fits again (each suite
 * has its own copy). A server asked for meanwhile waits for the seeding to end.
 */
export const SEEDED_TEMPLATE_ENV = 'QUASILEVEL_TEST_SEEDED_DIR';
/** Written into the template folder when its seeding server has stopped cleanly, or when it failed. */
const TEMPLATE_READY = '.seeded';
const TEMPLATE_FAILED = '.seeding-failed';
/** How long a server start waits for the template at most before seeding a folder of its own (within its start deadline). */
const TEMPLATE_WAIT_MS = 120_000;

/** The environment a benchmark's server gets on top: fitting threads started and warmed with the server, as in production. */
export const WARM_SERVER: Record<string, string> = { QUASILEVEL_ANALYSIS_WARMUP: '1' };

/** Whether the template is (or, after waiting, becomes) a seeded folder to copy. */
async function templateReady(template: string, waitMs: number): Promise<boolean> {
  const deadline = Date.now() + waitMs;
  while (Date.now() < deadline) {
    if (existsSync(path.join(template, TEMPLATE_READY))) return true;
    if (!existsSync(template) || existsSync(path.join(template, TEMPLATE_FAILED))) return false;
    await new Promise((r) => setTimeout(r, 200));
  }
  return false;
}

/**
 * A new temporary data folder (`prefix` names it): a copy of the seeded template when `npm test`
 * made one, else empty (the server then migrates and seeds it on its first start).
 */
export async function seededDataDir(prefix = 'ql-data-', waitMs = TEMPLATE_WAIT_MS): Promise<string> {
  const dir = mkdtempSync(path.join(os.tmpdir(), prefix));
  const template = process.env[SEEDED_TEMPLATE_ENV];
  if (template && (await templateReady(template, waitMs))) {
    const skip = new Set(['server.lock', TEMPLATE_READY, TEMPLATE_FAILED]);
    cpSync(template, dir, { recursive: true, filter: (src) => !skip.has(path.basename(src)) });
  }
  return dir;
}

/**
 * Starts a server on `dir` (an empty folder), lets it migrate and seed, stops it and marks the
 * folder ready (see SEEDED_TEMPLATE_ENV); on failure marks it failed, so that no start waits on it.
 */
export async function makeSeededTemplate(dir: string): Promise<void> {
  const saved = process.env[SEEDED_TEMPLATE_ENV];
  delete process.env[SEEDED_TEMPLATE_ENV];
  try {
    const s = await startServerProcess({ dataDir: dir, timeoutMs: 240_000 });
    const code = await s.stop({ keepData: true });
    if (code !== 0) throw new Error(`the seeding server stopped with ${code}:\n${s.log()}`);
    writeFileSync(path.join(dir, TEMPLATE_READY), '');
  } catch (err) {
    if (existsSync(dir)) writeFileSync(path.join(dir, TEMPLATE_FAILED), String(err));
    throw err;
  } finally {
    if (saved !== undefined) process.env[SEEDED_TEMPLATE_ENV] = saved;
  }
}

export type ServerProcess = {
  url: string;
  port: number;
  dataDir: string;
  child: ChildProcess;
  log: () => string;
  /** SIGTERM and wait for exit (or SIGKILL with `kill: true`). */
  stop: (opts?: { kill?: boolean; keepData?: boolean }) => Promise<number | null>;
};

/**
 * `port`: listen there (a restart on the address clients already use); default a free one.
 * `nodeArgs`: more options for node (a profile: `--cpu-prof`, which NODE_OPTIONS does not take).
 */
export async function startServerProcess(opts: { dataDir?: string; env?: Record<string, string>; timeoutMs?: number; port?: number; nodeArgs?: string[] } = {}): Promise<ServerProcess> {
  const port = opts.port ?? (await freePort());
  // Generous by default: a browser-lane server starts beside the unit lane on two cores. The
  // deadline covers a wait for the seeded template too (at most half of it).
  const timeoutMs = opts.timeoutMs ?? 180_000;
  const deadline = Date.now() + timeoutMs;
  // A PostgreSQL-mode server (DATABASE_URL) keeps no database in its folder: an empty one does.
  const dataDir = opts.dataDir ?? (opts.env?.DATABASE_URL ? mkdtempSync(path.join(os.tmpdir(), 'ql-data-')) : await seededDataDir('ql-data-', Math.min(TEMPLATE_WAIT_MS, timeoutMs / 2)));
  const url = `http://127.0.0.1:${port}`;
  let output = '';
  // node itself runs the server (no launcher or loader process in between): a SIGKILL to `child`
  // then really kills the server.
  const [node, bundle] = await serverCommand();
  const child = spawn(node, [...(opts.nodeArgs ?? []), bundle], {
    cwd: REPO_ROOT,
    env: {
      ...process.env,
      PORT: String(port),
      QUASILEVEL_DATA_DIR: dataDir,
      PUBLIC_URL: url,
      QUASILEVEL_SIGNIN_PER_MINUTE: '0',
      // Threads started with the first fit, not warmed at start: ~2 s of CPU less a server (DEVELOPERS.md, "Test timing").
      QUASILEVEL_ANALYSIS_WARMUP: '0',
      ...opts.env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout!.on('data', (d) => (output += d));
  child.stderr!.on('data', (d) => (output += d));
  const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));

  for (;;) {
    if (child.exitCode !== null) throw new Error(`server exited early (${child.exitCode}):\n${output}`);
    try {
      const res = await fetch(`${url}/api/health`);
      if (res.ok) break;
    } catch {
      /* not up yet */
    }
    if (Date.now() > deadline) {
      child.kill('SIGKILL');
      throw new Error(`server did not answer /api/health in time:\n${output}`);
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  return {
    url,
    port,
    dataDir,
    child,
    log: () => output,
    stop: async ({ kill = false, keepData = false } = {}) => {
      if (child.exitCode === null) child.kill(kill ? 'SIGKILL' : 'SIGTERM');
      let timer: NodeJS.Timeout | undefined;
      const code = await Promise.race([exited, new Promise<number | null>((r) => (timer = setTimeout(() => r(-1), 15_000)))]);
      clearTimeout(timer);
      if (code === -1) child.kill('SIGKILL');
      if (!keepData && !opts.dataDir) rmSync(dataDir, { recursive: true, force: true });
      return code;
    },
  };
}
