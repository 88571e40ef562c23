/**
 * The `fit` command's files on several threads: the main thread and up to (cores − 1) worker
 * threads take files from one queue, and the main thread prints each file's output in file
 * order as soon as every file before it is done, so the output is the same as one thread's.
 * Workers start the bundle itself (build/cli.cjs, whose entry serves them when it is not the
 * main thread); under tsx or jest, where there is no bundle, every file runs in the main thread.
 */
import os from 'node:os';
import { parentPort, Worker, workerData } from 'node:worker_threads';
import { fitFileOutput } from '@/cli/fit-file';
import type { FileOutput, FitSettings } from '@/cli/fit-file';

/**
 * Files a thread must have for a worker to pay: a worker's start (load and compile the bundle,
 * then the fits run slow until the compiler has seen a few) costs about what ten module files do.
 */
export const MIN_FILES_PER_THREAD = 16;
/** Files handed to a worker at a time: small, so both threads finish close together. */
const CHUNK = 4;

type Chunk = { start: number; files: string[] };
type Done = { start: number; outputs: FileOutput[] };

/** Threads to fit on: QUASILEVEL_CLI_THREADS (1 = the main thread only), else one per core. */
export function threadCount(): number {
  const raw = process.env.QUASILEVEL_CLI_THREADS;
  if (raw === undefined || raw === '') return Math.max(1, os.availableParallelism());
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1 || n > 64) throw new Error(`QUASILEVEL_CLI_THREADS must be a whole number from 1 to 64, got "${raw}"`);
  return n;
}

/** Worker threads for `files` files: none without the bundle or below MIN_FILES_PER_THREAD files a thread. */
export function workerCount(files: number, threads: number, bundled: boolean): number {
  if (!bundled) return 0;
  return Math.max(0, Math.min(threads, Math.floor(files / MIN_FILES_PER_THREAD)) - 1);
}

/** Fits every file, printing the outputs in file order as they complete; returns them all. */
export async function fitFiles(files: string[], settings: FitSettings): Promise<FileOutput[]> {
  const outputs: (FileOutput | undefined)[] = new Array(files.length);
  let next = 0;
  let printed = 0;
  // Chunks a worker held when it died, for the main thread to do.
  const orphaned: Chunk[] = [];

  const take = (count: number): Chunk | null => {
    const lost = orphaned.pop();
    if (lost) return lost;
    if (next >= files.length) return null;
    const start = next;
    next = Math.min(files.length, next + count);
    return { start, files: files.slice(start, next) };
  };

  const flush = () => {
    let out = '';
    for (; printed < files.length && outputs[printed]; printed++) {
      const o = outputs[printed] as FileOutput;
      out += o.stdout;
      if (o.stderr) {
        // Same interleaving as one thread: what came before goes out before the message.
        if (out) process.stdout.write(out);
        out = '';
        process.stderr.write(o.stderr);
      }
    }
    if (out) process.stdout.write(out);
  };

  const store = (done: Done) => {
    done.outputs.forEach((o, k) => {
      outputs[done.start + k] = o;
    });
    flush();
  };

  // The bundle is CommonJS, so __filename is build/cli.cjs there and a .ts file under tsx or jest.
  const workers = workerCount(files.length, threadCount(), __filename.endsWith('.cjs'));
  const finished: Promise<void>[] = [];
  for (let w = 0; w < workers; w++) {
    finished.push(
      new Promise<void>((resolve) => {
        const worker = new Worker(__filename, { workerData: { fitSettings: settings } });
        let current: Chunk | null = null;
        const feed = () => {
          current = take(CHUNK);
          if (current) worker.postMessage(current);
          else void worker.terminate();
        };
        worker.on('message', (done: Done) => {
          current = null;
          store(done);
          feed();
        });
        // A worker that fails ends with 'exit'; its files go back to the queue there.
        worker.on('error', () => undefined);
        worker.on('exit', () => {
          if (current) orphaned.push(current);
          current = null;
          resolve();
        });
        feed();
      }),
    );
  }

  const runHere = async () => {
    for (let chunk = take(1); chunk; chunk = take(1)) {
      store({ start: chunk.start, outputs: chunk.files.map((f) => fitFileOutput(f, settings)) });
      // Lets the workers' answers in between files, so their files print without waiting for the end.
      if (workers > 0) await new Promise((resolve) => setImmediate(resolve));
    }
  };
  await runHere();
  await Promise.all(finished);
  await runHere();
  return outputs as FileOutput[];
}

/** A worker thread's side: fit each chunk it is sent with the settings it was started with. */
export function serveFitWorker(): void {
  const port = parentPort;
  if (!port) throw new Error('serveFitWorker runs in a worker thread');
  const settings = (workerData as { fitSettings: FitSettings }).fitSettings;
  port.on('message', (chunk: Chunk) => {
    const done: Done = { start: chunk.start, outputs: chunk.files.map((f) => fitFileOutput(f, settings)) };
    port.postMessage(done);
  });
}
