/**
 * Double-diode fit: x = [Iph, ln I01, n1, ln I02, n2, Rs, ln Rsh]; with fixed idealities
 * (n1 = 1 for diffusion, n2 = 2 for depletion-region recombination) n1 and n2 are held.
 * The model current at each voltage comes from the monotone Newton solve in diode.ts, the
 * Jacobian from the implicit-function theorem as in the single-diode fit. The landscape has
 * several minima (the two diodes trade current), so the fit runs from a few splits of the
 * single-diode fit's diode current and keeps the best.
 */
import { thermal_voltage_v } from '@/lib/physics/constants';
import { IvInputError } from '@/lib/iv/errors';
import { solveDoubleDiodeCurrent } from '@/lib/iv/diode';
import { failedFit, fitConditions, fitObjective, nowMs, residualStats, tidy } from '@/lib/iv/fit-common';
import { singleDiodeParamsOf } from '@/lib/iv/fit-params';
import { fitSingleDiode } from '@/lib/iv/fit-single';
import { keyFiguresOfSorted, validateCurve } from '@/lib/iv/key-figures';
import { levenbergMarquardt, parameterCovariance } from '@/lib/iv/lm';
import type { LmProblem, LmResult } from '@/lib/iv/lm';
import { phangStart } from '@/lib/iv/start';
import type { DoubleDiodeFit, DoubleDiodeParams, FitObjective, IvCurve, Metrics, SingleDiodeFit } from '@/lib/iv/types';

/** Options of `fitDoubleDiode`. */
export type DoubleFitOptions = {
  /** 'fixed' (default): n1 = 1, n2 = 2. 'free': n1, n2 in [1, 2] and I01, I02 ≤ i0Max_a. */
  idealities?: 'fixed' | 'free';
  objective?: FitObjective;
  temp_c?: number;
  cells?: number;
  /** Upper bound of I01 and I02 with free idealities, A (default 1 µA). */
  i0Max_a?: number;
  metrics?: Metrics;
  /** A converged single-diode fit of the same curve, used for the starts. */
  single?: SingleDiodeFit;
  maxEvaluations?: number;
};

const KEYS: readonly (keyof DoubleDiodeParams)[] = ['iph_a', 'i01_a', 'n1', 'i02_a', 'n2', 'rs_ohm', 'rsh_ohm'];
const LOG_PARAMS = new Set([1, 3, 6]);

/** Default bound on I01 and I02 when the idealities are free, A. */
export const DEFAULT_I0_MAX_A = 1e-6;

function doubleDiodeProblem(
  v: readonly number[],
  i: readonly number[],
  cells: number,
  temp_c: number,
  objective: FitObjective,
  freeIdx: number[],
  fixedValues: number[],
  lower: Float64Array,
  upper: Float64Array,
): LmProblem {
  const m = v.length;
  const cv = cells * thermal_voltage_v(temp_c);
  const full = Float64Array.from(fixedValues);
  const q = freeIdx.length;
  const model = new Float64Array(m);
  for (let k = 0; k < m; k++) model[k] = i[k];
  const dfull = new Float64Array(7);
  const evaluate = (x: Float64Array, r: Float64Array, jac: Float64Array): boolean => {
    for (let s = 0; s < q; s++) full[freeIdx[s]] = x[s];
    const iph = full[0];
    const ln01 = full[1];
    const i01 = Math.exp(ln01);
    const n1 = full[2];
    const ln02 = full[3];
    const i02 = Math.exp(ln02);
    const n2 = full[4];
    const rs = full[5];
    const rsh = Math.exp(full[6]);
    const a1 = n1 * cv;
    const a2 = n2 * cv;
    for (let k = 0; k < m; k++) {
      // Warm start from the previous model current at this voltage (the measured one at first).
      const current = objective === 'true-current' ? solveDoubleDiodeCurrent(iph, i01, a1, i02, a2, rs, rsh, v[k], model[k]) : i[k];
      const vd = v[k] + current * rs;
      const e1 = Math.exp(ln01 + vd / a1);
      const e2 = Math.exp(ln02 + vd / a2);
      const gd = e1 / a1 + e2 / a2 + 1 / rsh;
      const scale = objective === 'true-current' ? 1 / (1 + rs * gd) : 1;
      dfull[0] = scale;
      dfull[1] = -(e1 - i01) * scale;
      dfull[2] = ((e1 * vd) / (a1 * n1)) * scale;
      dfull[3] = -(e2 - i02) * scale;
      dfull[4] = ((e2 * vd) / (a2 * n2)) * scale;
      dfull[5] = -gd * current * scale;
      dfull[6] = (vd / rsh) * scale;
      if (objective === 'true-current') {
        r[k] = current - i[k];
        if (Number.isFinite(current)) model[k] = current;
      } else {
        r[k] = iph - (e1 - i01) - (e2 - i02) - vd / rsh - current;
      }
      if (!Number.isFinite(r[k]) || !Number.isFinite(gd)) return false;
      for (let s = 0; s < q; s++) jac[k * q + s] = dfull[freeIdx[s]];
    }
    return true;
  };
  return { m, p: q, evaluate, lower, upper };
}

/**
 * Fits the double-diode model (n1, n2 per cell). Fixed idealities (n1 = 1, n2 = 2) by default;
 * 'free' lets both move in [1, 2] with I01, I02 ≤ 1 µA (the bounds change the optimum, so they
 * are part of the result's meaning). Same conventions as fitSingleDiode.
 */
export function fitDoubleDiode(curve: IvCurve, opts: DoubleFitOptions = {}): DoubleDiodeFit {
  const t0 = nowMs();
  const objective = fitObjective(opts.objective);
  const idealities = opts.idealities ?? 'fixed';
  if (idealities !== 'fixed' && idealities !== 'free') throw new IvInputError('bad-option', `idealities must be "fixed" or "free", got "${String(idealities)}"`);
  const i0Max = opts.i0Max_a ?? DEFAULT_I0_MAX_A;
  if (!(i0Max > 0 && Number.isFinite(i0Max))) throw new IvInputError('bad-option', `i0Max_a must be a positive number of amperes, got ${i0Max}`);
  const { temp_c, cells } = fitConditions(curve, opts);
  const { v, i } = validateCurve(curve);
  const metrics = opts.metrics ?? keyFiguresOfSorted(v, i, curve, false).metrics;
  const free = idealities === 'free';

  // Starting point: the single-diode fit (true current), else the Phang closed form.
  let single = opts.single;
  let evaluations = 0;
  if (!single || !single.converged) {
    single = fitSingleDiode(curve, { temp_c, cells, metrics });
    evaluations += single.evaluations;
  }
  const sp = singleDiodeParamsOf(single) ?? phangStart(metrics, cells, temp_c);
  const cv = cells * thermal_voltage_v(temp_c);
  const rRef = metrics.voc_v / metrics.isc_a;
  const i0Upper = free ? i0Max : metrics.isc_a;
  const lower = [0, -230, 1, -230, 1, 0, Math.log(1e-2 * rRef)];
  const upper = [3 * metrics.isc_a, Math.log(i0Upper), free ? 2 : 1, Math.log(i0Upper), 2, rRef, Math.log(1e8 * rRef)];
  const freeIdx = free ? [0, 1, 2, 3, 4, 5, 6] : [0, 1, 3, 5, 6];

  // Split the single diode's current at the MPP between the two diodes in a few proportions.
  const as = sp.n * cv;
  const vref = metrics.vmp_v + metrics.imp_a * sp.rs_ohm;
  const idRef = sp.i0_a * Math.expm1(vref / as);
  const idealityPairs: [number, number][] = free ? [[1, 2], [Math.min(Math.max(sp.n, 1), 2), 2], [1, Math.min(Math.max(sp.n, 1), 2)]] : [[1, 2]];
  const starts: number[][] = [];
  for (const [n1, n2] of idealityPairs) {
    for (const share of [0.5, 0.1, 0.9]) {
      const i01 = Math.min((share * idRef) / Math.expm1(vref / (n1 * cv)), i0Upper);
      const i02 = Math.min(((1 - share) * idRef) / Math.expm1(vref / (n2 * cv)), i0Upper);
      starts.push([sp.iph_a, Math.log(i01), n1, Math.log(i02), n2, sp.rs_ohm, Math.log(sp.rsh_ohm)]);
    }
  }

  const fixedValues = [0, 0, 1, 0, 2, 0, 0];
  const problem = doubleDiodeProblem(
    v,
    i,
    cells,
    temp_c,
    objective,
    freeIdx,
    fixedValues,
    Float64Array.from(freeIdx.map((j) => lower[j])),
    Float64Array.from(freeIdx.map((j) => upper[j])),
  );
  let best: LmResult | null = null;
  const budget = opts.maxEvaluations ?? 3000;
  for (const start of starts) {
    const x0 = freeIdx.map((j) => start[j]);
    const res = levenbergMarquardt(problem, x0, { maxEvaluations: 400 });
    evaluations += res.evaluations;
    if (!res.converged || !Number.isFinite(res.sse)) continue;
    // Two starts landing on the same sum of squares is taken as the optimum found.
    const agrees = best !== null && Math.abs(res.sse - best.sse) <= 1e-6 * best.sse;
    if (!best || res.sse < best.sse) best = res;
    if (agrees || evaluations >= budget) break;
  }
  if (!best) {
    return failedFit('double-diode', objective, KEYS, evaluations, nowMs() - t0, `The double-diode fit did not converge from any of ${starts.length} starts (${evaluations} evaluations).`);
  }

  const x = Float64Array.from(fixedValues);
  freeIdx.forEach((j, s) => (x[j] = best.x[s]));
  const p: DoubleDiodeParams = { iph_a: x[0], i01_a: Math.exp(x[1]), n1: x[2], i02_a: Math.exp(x[3]), n2: x[4], rs_ohm: x[5], rsh_ohm: Math.exp(x[6]) };
  const a1 = p.n1 * cv;
  const a2 = p.n2 * cv;
  const trueResiduals = v.map((vk, k) => solveDoubleDiodeCurrent(p.iph_a, p.i01_a, a1, p.i02_a, a2, p.rs_ohm, p.rsh_ohm, vk, i[k]) - i[k]);
  const objResiduals = objective === 'true-current' ? trueResiduals : Array.from(best.r);
  const stats = residualStats(objResiduals);
  const trueStats = residualStats(trueResiduals);
  const variance = parameterCovariance(best, v.length, freeIdx.length, freeIdx.map(() => false));
  const stderr: Record<string, number | null> = Object.fromEntries(KEYS.map((k) => [k, null]));
  freeIdx.forEach((j, s) => {
    const value = variance[s];
    if (value === null) return;
    const own = LOG_PARAMS.has(j) ? Math.exp(x[j]) : 1;
    stderr[KEYS[j]] = tidy(Math.sqrt(value) * own);
  });
  const atBounds = freeIdx.filter((_, s) => best.atBound[s]).map((j) => {
    const atUpper = best.x[freeIdx.indexOf(j)] >= upper[j];
    const limit = LOG_PARAMS.has(j) ? Math.exp(atUpper ? upper[j] : lower[j]) : atUpper ? upper[j] : lower[j];
    return `${KEYS[j]} ${atUpper ? '≤' : '≥'} ${Number(limit.toPrecision(4))}`;
  });
  const result: DoubleDiodeFit = {
    model: 'double-diode',
    objective,
    iph_a: tidy(p.iph_a),
    i01_a: tidy(p.i01_a),
    n1: tidy(p.n1),
    i02_a: tidy(p.i02_a),
    n2: tidy(p.n2),
    rs_ohm: tidy(p.rs_ohm),
    rsh_ohm: tidy(p.rsh_ohm),
    rmse_a: tidy(stats.rmse),
    rmse_true_current_a: tidy(trueStats.rmse),
    max_residual_a: tidy(stats.maxAbs),
    residuals_a: objResiduals,
    evaluations,
    converged: true,
    elapsed_ms: nowMs() - t0,
    stderr,
  };
  const notes: string[] = [];
  if (!free) notes.push('Idealities held at n1 = 1 and n2 = 2.');
  if (atBounds.length) {
    result.at_bounds = atBounds;
    notes.push(`At the limit of the allowed range: ${atBounds.join(', ')} (no standard error for these).`);
  }
  if (single.converged && single.rmse_true_current_a !== null && objective === 'true-current' && trueStats.rmse > 1.2 * single.rmse_true_current_a) {
    notes.push(
      `This double-diode fit is worse than the single-diode fit (RMSE ${Number(trueStats.rmse.toPrecision(3))} A vs ${Number(single.rmse_true_current_a.toPrecision(3))} A): the device's recombination is not described by these idealities.`,
    );
  }
  if (free && Math.abs(p.n1 - p.n2) < 0.01) {
    // Equal idealities make one diode with I0 = I01 + I02: only the sum is determined.
    notes.push('The two diodes merged into one (the same ideality factor): the data do not support a second diode, so I01, I02, n1 and n2 get no standard error.');
    for (const key of ['i01_a', 'n1', 'i02_a', 'n2']) stderr[key] = null;
  }
  if (notes.length) result.message = notes.join(' ');
  return result;
}
