/**
 * The handler of one analysis thread of the pool in analysis-pool.ts (loaded through
 * analysis-worker.cjs): takes an AnalysisRequest, answers its AnalysisOutcome. The pool lowers
 * the thread's priority (piscina's niceIncrement); at load the thread warms up on the demo files.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { workerData } from 'node:worker_threads';
import { analyseToOutcome } from '@/server/services/analysis-pool';
import type { AnalysisOutcome, AnalysisRequest } from '@/server/services/analysis-pool';

/** Runs the pipeline ~200 times over the given files so the compiler has optimised it before real work. */
function warmUp(files: string[]): void {
  const bytes = files.flatMap((f) => {
    try {
      return [{ bytes: new Uint8Array(readFileSync(f)), fileName: path.basename(f) }];
    } catch {
      return [];
    }
  });
  if (!bytes.length) return;
  for (let k = 0; k < 200; k++) analyseToOutcome(bytes[k % bytes.length]);
}

warmUp(((workerData ?? {}) as { warmFiles?: string[] }).warmFiles ?? []);

/** One file or refit, analysed in this thread. */
export default function analyse(req: AnalysisRequest): AnalysisOutcome {
  return analyseToOutcome(req);
}
