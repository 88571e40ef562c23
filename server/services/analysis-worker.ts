/**
 * One analysis thread of the pool in analysis-pool.ts: receives `{ id, req }`, answers
 * `{ id, outcome }`. Lowers its own scheduling priority first (Linux: setpriority on this
 * thread's id applies to this thread only), so fitting yields to the HTTP thread.
 */
import { readFileSync, readlinkSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parentPort, workerData } from 'node:worker_threads';
import { analyseToOutcome } from '@/server/services/analysis-pool';
import type { AnalysisRequest } from '@/server/services/analysis-pool';

function lowerPriority(nice: number): void {
  if (!nice) return;
  try {
    // "/proc/thread-self" links to "<pid>/task/<tid>".
    const tid = Number(readlinkSync('/proc/thread-self').split('/').pop());
    if (Number.isInteger(tid) && tid > 0) os.setPriority(tid, nice);
  } catch {
    /* not Linux, or not permitted: run at normal priority */
  }
}

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

const data = (workerData ?? {}) as { nice?: number; warmFiles?: string[] };
lowerPriority(Number(data.nice ?? 0));
warmUp(data.warmFiles ?? []);

parentPort!.on('message', (msg: { id: number; req: AnalysisRequest }) => {
  parentPort!.postMessage({ id: msg.id, outcome: analyseToOutcome(msg.req) });
});
