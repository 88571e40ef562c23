/**
 * `watch DIR --server URL --key KEY (--batch ID | --lot NAME) [--cells N --temp-c T
 * --irradiance-w-m2 G --area-cm2 A] [--once] [--settle-ms MS] [--retries N]`: a test station's
 * folder watcher (cli/watch/watcher.ts). Prints a line per file and a summary. Exit status: 0
 * when every file was accepted or rejected by the server, 2 when some could not be sent (or a
 * usage error), 1 when the server refused the key or the batch (the run stops at once).
 * Without --once it watches (chokidar) until interrupted.
 */
import { parseArgs } from 'node:util';
import { existsSync, statSync } from 'node:fs';
import path from 'node:path';
import { watch as chokidarWatch } from 'chokidar';
import { isWatchedFile, StopRun, Watcher } from '@/cli/watch/watcher';
import type { WatchOptions } from '@/cli/watch/watcher';

export const summary = 'send a test station\'s I-V files from a folder to the server, each once (station key)';

const USAGE = [
  'usage: npm run --silent cli -- watch DIR --server URL --key KEY (--batch ID | --lot NAME) [options]',
  '',
  '  --server URL           the Quasilevel server, e.g. http://127.0.0.1:8080',
  '  --key KEY              the station key (Stations screen); or QUASILEVEL_STATION_KEY',
  '  --batch ID             send to this batch',
  '  --lot NAME             send to the batch of this lot, created at the first file',
  '  --cells N              cells in series, for every file',
  '  --temp-c T             cell temperature, °C, for every file',
  '  --irradiance-w-m2 G    irradiance, W/m², for every file',
  '  --area-cm2 A           device area, cm², for every file',
  '  --once                 send what is in the folder now and exit (0: all answered, 2: some not sent)',
  '  --settle-ms MS         a file is sent once unchanged this long (default 1000)',
  '  --retries N            with --once, tries per file before it counts as not sent (default 6)',
  '',
  `The journal ${'.quasilevel-watch.jsonl'} in DIR records each file's answer by content; delete it to send everything again.`,
].join('\n');

class UsageError extends Error {}

function num(values: Record<string, unknown>, name: string, min: number, max: number): number | undefined {
  const t = values[name];
  if (t === undefined) return undefined;
  const x = Number(String(t).trim().replace(/^−/, '-').replace(',', '.'));
  if (!Number.isFinite(x) || x < min || x > max) throw new UsageError(`--${name} "${String(t)}" must be a number from ${min} to ${max}`);
  return x;
}

function options(argv: string[]): WatchOptions {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    strict: true,
    options: {
      server: { type: 'string' },
      key: { type: 'string' },
      batch: { type: 'string' },
      lot: { type: 'string' },
      cells: { type: 'string' },
      'temp-c': { type: 'string' },
      'irradiance-w-m2': { type: 'string' },
      'area-cm2': { type: 'string' },
      once: { type: 'boolean' },
      'settle-ms': { type: 'string' },
      retries: { type: 'string' },
      help: { type: 'boolean', short: 'h' },
    },
  });
  if (values.help) throw new UsageError('');
  const [dir, ...extra] = positionals;
  if (!dir || extra.length) throw new UsageError('name one folder to watch');
  if (!existsSync(dir) || !statSync(dir).isDirectory()) throw new UsageError(`${dir} is not a folder`);
  const server = values.server?.replace(/\/+$/, '');
  if (!server || !/^https?:\/\/[^/]+$/.test(server)) throw new UsageError('--server must be the server\'s address, e.g. http://127.0.0.1:8080');
  const key = values.key ?? process.env.QUASILEVEL_STATION_KEY;
  if (!key) throw new UsageError('--key is required (the station key from the Stations screen)');
  if (!values.batch === !values.lot) throw new UsageError('give either --batch ID or --lot NAME');
  return {
    server,
    key,
    dir: path.resolve(dir),
    batch: values.batch,
    lot: values.lot?.trim(),
    fields: {
      cells: num(values, 'cells', 1, 1000),
      temp_c: num(values, 'temp-c', -60, 150),
      irradiance_w_m2: num(values, 'irradiance-w-m2', 1, 2000),
      area_cm2: num(values, 'area-cm2', 0.01, 100000),
    },
    once: values.once === true,
    settleMs: num(values, 'settle-ms', 50, 600_000) ?? 1000,
    retries: Math.round(num(values, 'retries', 1, 1000) ?? 6),
    print: (line) => process.stdout.write(`${line}\n`),
  };
}

/** A file's size and time, or null when it is gone. */
function signature(file: string): string | null {
  try {
    const st = statSync(file);
    return st.isFile() ? `${st.size}:${st.mtimeMs}` : null;
  } catch {
    return null;
  }
}

/**
 * --once: the files present now, each once it has stopped changing; all are watched over the same
 * settle time (not one after another), and a file still changing is looked at again after the rest.
 */
async function runOnce(w: Watcher, o: WatchOptions): Promise<void> {
  let pending = w.listFiles();
  while (pending.length) {
    const before = new Map(pending.map((p) => [p, signature(p)]));
    await new Promise((r) => setTimeout(r, o.settleMs));
    const changing: string[] = [];
    for (const p of pending) {
      const now = signature(p);
      if (now === null) continue;
      if (now === before.get(p)) await w.handle(p);
      else changing.push(p);
    }
    pending = changing;
  }
}

/** Watching: every file added or changed, once it has stopped changing, one at a time, until SIGINT/SIGTERM. */
async function runWatching(w: Watcher, o: WatchOptions): Promise<void> {
  const watcher = chokidarWatch(o.dir, {
    depth: 0,
    ignoreInitial: false,
    ignored: (p: string) => p !== o.dir && !isWatchedFile(path.basename(p)),
    awaitWriteFinish: { stabilityThreshold: o.settleMs, pollInterval: Math.min(250, Math.max(50, Math.round(o.settleMs / 4))) },
  });
  const queue: string[] = [];
  let wake: (() => void) | null = null;
  const push = (p: string) => {
    if (!queue.includes(p)) queue.push(p);
    wake?.();
  };
  watcher.on('add', push).on('change', push);
  let failure: unknown = null;
  let done = false;
  const finish = () => {
    done = true;
    w.stop();
    wake?.();
  };
  process.once('SIGINT', finish);
  process.once('SIGTERM', finish);
  o.print(`watching  ${o.dir} (stop with Ctrl-C)`);
  try {
    while (!done) {
      const next = queue.shift();
      if (next === undefined) {
        await new Promise<void>((r) => (wake = r));
        wake = null;
        continue;
      }
      await w.handle(next);
    }
  } catch (err) {
    failure = err;
  } finally {
    await watcher.close();
  }
  if (failure) throw failure;
}

export async function run(argv: string[]): Promise<number> {
  let o: WatchOptions;
  try {
    o = options(argv);
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    if (message) process.stderr.write(`error: ${message}\n\n`);
    process.stderr.write(`${USAGE}\n`);
    return message ? 2 : 0;
  }
  const w = new Watcher(o);
  try {
    await (o.once ? runOnce(w, o) : runWatching(w, o));
  } catch (err) {
    if (!(err instanceof StopRun)) throw err;
    o.print(`stopped   ${err.message}`);
    o.print(w.summary());
    return 1;
  }
  o.print(w.summary());
  return w.counts.unsent > 0 ? 2 : 0;
}
