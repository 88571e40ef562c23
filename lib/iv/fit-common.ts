/** Pieces shared by the single- and double-diode fits. */
import { IvInputError } from '@/lib/iv/errors';
import type { FitObjective, FitResult, IvCurve } from '@/lib/iv/types';

/** Temperature used when neither the caller nor the file gives one, °C. */
export const DEFAULT_TEMP_C = 25;

/** Cell temperature (°C) and cells in series for a fit: caller first, then file metadata, then defaults. */
export function fitConditions(curve: IvCurve, opts: { temp_c?: number; cells?: number }): { temp_c: number; cells: number } {
  const temp_c = opts.temp_c ?? curve.meta?.temp_c ?? DEFAULT_TEMP_C;
  const cells = opts.cells ?? curve.meta?.cells ?? 1;
  if (!(Number.isFinite(temp_c) && temp_c > -273.15 && temp_c < 1000)) throw new IvInputError('bad-option', `cell temperature must be a finite value in °C, got ${temp_c}`);
  if (!(Number.isInteger(cells) && cells >= 1)) throw new IvInputError('bad-option', `cells in series must be a whole number ≥ 1, got ${cells}`);
  return { temp_c, cells };
}

/** Checks the objective option. */
export function fitObjective(objective: FitObjective | undefined): FitObjective {
  const o = objective ?? 'true-current';
  if (o !== 'true-current' && o !== 'implicit') throw new IvInputError('bad-option', `objective must be "true-current" or "implicit", got "${String(o)}"`);
  return o;
}

/** Root mean square and largest absolute value of residuals. */
export function residualStats(res: readonly number[]): { rmse: number; maxAbs: number } {
  let s = 0;
  let maxAbs = 0;
  for (const x of res) {
    s += x * x;
    maxAbs = Math.max(maxAbs, Math.abs(x));
  }
  return { rmse: Math.sqrt(s / res.length), maxAbs };
}

/**
 * A fit that did not produce a trustworthy optimum: every number is null, the message says why.
 * `keys` are the model's parameter keys; each becomes a null field and a null standard error.
 */
export function failedFit<M extends FitResult['model']>(
  model: M,
  objective: FitObjective,
  keys: readonly string[],
  evaluations: number,
  elapsed_ms: number,
  message: string,
): Extract<FitResult, { model: M }> {
  const nulls = Object.fromEntries(keys.map((k) => [k, null]));
  // The caller's keys are its model's parameters, so the nulls complete the failed member.
  return {
    model,
    objective,
    ...nulls,
    rmse_a: null,
    rmse_true_current_a: null,
    max_residual_a: null,
    residuals_a: [],
    evaluations,
    converged: false,
    elapsed_ms,
    stderr: { ...nulls },
    message,
  } as unknown as Extract<FitResult, { model: M }>;
}

/** Wall-clock milliseconds, from the high-resolution clock when there is one. */
export function nowMs(): number {
  return typeof performance !== 'undefined' ? performance.now() : Date.now();
}

/** Rounds to 12 significant digits: the solver's last digits are noise and make JSON noisy. */
export function tidy(x: number): number {
  return Number(x.toPrecision(12));
}
