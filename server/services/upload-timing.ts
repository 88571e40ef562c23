/**
 * Where an upload's time goes, for profiling (QUASILEVEL_DEBUG_UPLOAD=1): the first and last time
 * each stage was reached (ms since the request arrived) and the summed time of the costly steps,
 * printed as one line when the upload answers. Off (every call a no-op) without the variable.
 * One upload at a time is meant: a second one at once mixes its marks into the first's.
 */
type Stage = { first: number; last: number; count: number; busy_ms: number };

let t0 = 0;
let stages = new Map<string, Stage>();

export const uploadTimingOn = () => !!process.env.QUASILEVEL_DEBUG_UPLOAD;

/** The request arrived: the clock starts again. */
export function timingStart(): void {
  if (!uploadTimingOn()) return;
  t0 = performance.now();
  stages = new Map();
}

/** A stage reached (once per file for per-file stages); `busyMs`: how long that step took. */
export function timingMark(stage: string, busyMs = 0): void {
  if (!uploadTimingOn() || !t0) return;
  const at = performance.now() - t0;
  const s = stages.get(stage) ?? { first: at, last: at, count: 0, busy_ms: 0 };
  s.last = at;
  s.count++;
  s.busy_ms += busyMs;
  stages.set(stage, s);
}

/** Runs `f` and marks `stage` with its duration. */
export async function timed<T>(stage: string, f: () => Promise<T>): Promise<T> {
  if (!uploadTimingOn()) return f();
  const t = performance.now();
  try {
    return await f();
  } finally {
    timingMark(stage, performance.now() - t);
  }
}

/** Prints the stages in the order first reached. */
export function timingReport(): void {
  if (!uploadTimingOn() || !t0) return;
  const rows = [...stages.entries()].sort((a, b) => a[1].first - b[1].first);
  const r = (x: number) => Math.round(x);
  console.log(`[upload] ${rows.map(([k, s]) => `${k} ×${s.count} ${r(s.first)}–${r(s.last)} ms${s.busy_ms ? ` (busy ${r(s.busy_ms)} ms)` : ''}`).join('; ')}`);
}
