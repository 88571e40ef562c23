/**
 * Where uploads are analysed (read, key figures, both diode fits, STC figures: ~10 ms of CPU a
 * curve) and curves refitted (a free double-diode fit: ~100 ms). The server uses a pool of
 * worker threads (piscina), so a 1,000-curve upload runs on every core and the HTTP thread stays
 * free for readers; the workers run at a lower scheduling priority (Linux nice 10) so that, when
 * cores are short, interactive requests win over bulk fitting. Tests and tools that build the
 * app in-process may use the inline analyser (same results, same thread).
 */
import os from 'node:os';
import path from 'node:path';
import { Piscina } from 'piscina';
import { analyseFile, analyseParsed } from '@/lib/analysis/analyse-file';
import type { FileAnalysis, FileDefaults, FileOverrides } from '@/lib/analysis/analyse-file';
import type { StcCoefficients } from '@/lib/analysis/stc';
import { IvInputError } from '@/lib/iv';
import type { IvCurve } from '@/lib/iv';

/** A file to read and analyse, or (with `curve`) a stored curve to fit again (a refit). */
export type AnalysisRequest =
  | { bytes: Uint8Array; fileName: string; overrides?: FileOverrides; defaults?: FileDefaults; models?: ('single' | 'double')[] }
  | { curve: IvCurve; idealities: 'fixed' | 'free'; models?: ('single' | 'double')[]; coefficients?: StcCoefficients };

/** What became of one file: its analysis, the reader's objection, or an unexpected failure. */
export type AnalysisOutcome =
  | { ok: true; analysis: FileAnalysis }
  | { ok: false; kind: 'input'; code: string; message: string; line?: number }
  | { ok: false; kind: 'failure'; message: string };

export type Analyser = {
  /** Analyses one file; never rejects (every problem is an outcome). */
  analyse: (req: AnalysisRequest) => Promise<AnalysisOutcome>;
  /** How many threads analyse (0: the caller's own thread). */
  readonly threads: number;
  close: () => Promise<void>;
};

/** Runs the pipeline on one file and turns its errors into outcomes (used in both modes). */
export function analyseToOutcome(req: AnalysisRequest): AnalysisOutcome {
  try {
    if ('curve' in req) return { ok: true, analysis: analyseParsed(req.curve, req.idealities, req.models, req.coefficients) };
    return { ok: true, analysis: analyseFile(req.bytes, { fileName: req.fileName, overrides: req.overrides, defaults: req.defaults, models: req.models }) };
  } catch (err) {
    if (err instanceof IvInputError) return { ok: false, kind: 'input', code: err.code, message: err.message, ...(err.line ? { line: err.line } : {}) };
    return { ok: false, kind: 'failure', message: (err as Error)?.message ?? String(err) };
  }
}

/** Analyses in the calling thread, one file per macrotask so other requests interleave. */
export function inlineAnalyser(): Analyser {
  return {
    threads: 0,
    analyse: (req) => new Promise((resolve) => setImmediate(() => resolve(analyseToOutcome(req)))),
    close: async () => undefined,
  };
}

/** Threads for analysis: QUASILEVEL_ANALYSIS_THREADS, else one per core (at least 1). */
export function analysisThreads(): number {
  const raw = process.env.QUASILEVEL_ANALYSIS_THREADS;
  if (raw !== undefined && raw !== '') {
    const n = Number(raw);
    if (!Number.isInteger(n) || n < 0 || n > 64) throw new Error(`QUASILEVEL_ANALYSIS_THREADS must be a whole number from 0 to 64, got "${raw}"`);
    return n;
  }
  return Math.max(1, os.availableParallelism());
}

/** Defined (true) only inside the bundles scripts/build-server.ts makes. */
declare const QUASILEVEL_BUNDLE: boolean | undefined;

/**
 * The file piscina loads in each thread: in the server bundle, the bundled handler beside it (plain
 * Node, starts in a fraction of the time); from the sources (tsx, jest), the bootstrap that
 * registers tsx and then loads analysis-worker.ts.
 */
const WORKER_FILE =
  typeof QUASILEVEL_BUNDLE !== 'undefined' ? path.join(__dirname, '..', '..', 'build', 'analysis-worker.cjs') : path.join(__dirname, 'analysis-worker.cjs');

/**
 * Files handed to each thread ahead of the one it is fitting (piscina's concurrentTasksPerWorker).
 * With one, a thread that finished waited for the main thread to hand it the next file, and during
 * an upload the main thread spends ~60 ms at a time storing a group of 25 curves: the two threads
 * of a 1,000-curve upload were busy ~35 % of the time and the cores ~20 % idle. With a backlog of
 * 16 (~60–100 ms of fits) they work through those moments: the embedded upload of 1,000 curves
 * went from medians of 5.7–6.2 s to 4.2–4.7 s (`npm run bench -- --only=queue --embedded-only`,
 * 3 December 2026; 8 and 32 measured no better). Another client's refit or small upload waits
 * behind at most one backlog a thread, ~0.1 s.
 */
export const ANALYSIS_BACKLOG = 16;

/**
 * A piscina pool of `size` threads fed from one first-come queue (uploads of several clients
 * share it fairly by arrival), at a lower scheduling priority (`nice`, default 10: piscina's
 * niceIncrement, applied per thread on Linux through its optional @napi-rs/nice; where that is
 * missing the threads run at normal priority). With `warmFiles`, the threads start at once and
 * analyse those files a few times before taking work: a fresh thread's first ~200 curves run at
 * half speed while its compiler catches up (measured), and the first upload should not pay for
 * that. Otherwise they start on first use. Each thread holds a backlog of ANALYSIS_BACKLOG files.
 * A thread that dies takes its backlog with it (answers it had not yet sent included): each of
 * those files is tried again on a recovery thread that takes one file at a time, so a file that
 * kills its thread fails alone and the others are analysed. `filename` replaces the thread's
 * handler (tests).
 */
export function workerAnalyser(size: number, opts: { nice?: number; warmFiles?: string[]; filename?: string } = {}): Analyser {
  if (!(Number.isInteger(size) && size >= 1)) throw new Error(`a worker pool needs at least one thread, got ${size}`);
  const warmFiles = opts.warmFiles ?? [];
  const filename = opts.filename ?? WORKER_FILE;
  const niceIncrement = opts.nice ?? 10;
  const pool = new Piscina<AnalysisRequest, AnalysisOutcome>({
    filename,
    minThreads: warmFiles.length ? size : 0,
    maxThreads: size,
    concurrentTasksPerWorker: ANALYSIS_BACKLOG,
    // Threads are kept once started (the largest timer Node allows): a new one compiles the engine again.
    idleTimeout: 2 ** 31 - 1,
    niceIncrement,
    workerData: { warmFiles },
  });
  let closed = false;
  const shuttingDown: AnalysisOutcome = { ok: false, kind: 'failure', message: 'the server is shutting down' };
  // One thread, one file at a time, started on the first thread loss: where a lost file is tried again.
  let recovery: Piscina<AnalysisRequest, AnalysisOutcome> | null = null;
  const alone = () => (recovery ??= new Piscina({ filename, minThreads: 0, maxThreads: 1, idleTimeout: 30_000, niceIncrement, workerData: { warmFiles: [] } }));
  return {
    threads: size,
    analyse: async (req) => {
      if (closed) return shuttingDown;
      try {
        return await pool.run(req);
      } catch {
        if (closed) return shuttingDown;
      }
      // Its thread died, on this file or on one before it in the backlog: tried again on a thread of its own.
      try {
        return await alone().run(req);
      } catch (err) {
        if (closed) return shuttingDown;
        return { ok: false, kind: 'failure', message: `the analysis thread stopped (${(err as Error)?.message ?? String(err)})` };
      }
    },
    close: async () => {
      closed = true;
      // Queued and running work is refused (each settles as a failure above), the threads end.
      await Promise.all([pool.destroy(), recovery?.destroy()]);
    },
  };
}

/** How much the analysis threads yield to the rest: QUASILEVEL_ANALYSIS_NICE, a Linux nice increment 0–19 (default 10). */
export function analysisNice(): number {
  const raw = process.env.QUASILEVEL_ANALYSIS_NICE;
  if (raw === undefined || raw === '') return 10;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0 || n > 19) throw new Error(`QUASILEVEL_ANALYSIS_NICE must be a whole number from 0 to 19, got "${raw}"`);
  return n;
}

/**
 * Whether the threads start with the server and warm up (QUASILEVEL_ANALYSIS_WARMUP, default 1):
 * 0 starts them with the first fit, cold. The warm-up costs ~1 s of CPU a thread, which the test
 * run's ~40 short-lived servers skip (tests/support/server-process.ts).
 */
export function analysisWarmUp(): boolean {
  const raw = process.env.QUASILEVEL_ANALYSIS_WARMUP;
  if (raw === undefined || raw === '') return true;
  if (raw !== '0' && raw !== '1') throw new Error(`QUASILEVEL_ANALYSIS_WARMUP must be 0 or 1, got "${raw}"`);
  return raw === '1';
}

/** The analyser for a server: a worker pool of `analysisThreads()` threads warmed on `warmFiles`, inline when that is 0. */
export function serverAnalyser(warmFiles: string[] = []): Analyser {
  const n = analysisThreads();
  return n === 0 ? inlineAnalyser() : workerAnalyser(n, { warmFiles: analysisWarmUp() ? warmFiles : [], nice: analysisNice() });
}
