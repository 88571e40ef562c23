/**
 * Single-diode fit: Levenberg–Marquardt on x = [Iph, ln I0, n, Rs, ln Rsh] with the analytic
 * Jacobian. For the true-current objective the model current comes from the explicit Lambert W
 * solution and its derivatives from the implicit-function theorem applied to
 * F(I; θ) = Iph − I0·(e^{(V+I·Rs)/a} − 1) − (V+I·Rs)/Rsh − I = 0, i.e. dI/dθ = (∂F/∂θ)/(1 + Rs·g)
 * with g = I0·e^{…}/a + 1/Rsh the junction conductance.
 */
import { thermal_voltage_v } from '@/lib/physics/constants';
import { sdCurrent } from '@/lib/iv/diode';
import { lambertWExp } from '@/lib/iv/lambert-w';
import { failedFit, fitConditions, fitObjective, nowMs, residualStats, tidy } from '@/lib/iv/fit-common';
import { keyFiguresOfSorted, validateCurve } from '@/lib/iv/key-figures';
import { levenbergMarquardt, parameterCovariance } from '@/lib/iv/lm';
import type { LmProblem, LmResult } from '@/lib/iv/lm';
import { phangStart } from '@/lib/iv/start';
import type { FitObjective, IvCurve, Metrics, SingleDiodeFit, SingleDiodeParams } from '@/lib/iv/types';

/** Options of `fitSingleDiode`. temp_c and cells override the curve's metadata. */
export type SingleFitOptions = {
  objective?: FitObjective;
  temp_c?: number;
  cells?: number;
  /** Start values instead of the automatic start from the key points. */
  start?: SingleDiodeParams;
  /** Key figures already computed for this curve (saves recomputing them). */
  metrics?: Metrics;
  maxEvaluations?: number;
};

const KEYS: readonly (keyof SingleDiodeParams)[] = ['iph_a', 'i0_a', 'n', 'rs_ohm', 'rsh_ohm'];

/** Bounds of the fitted vector [Iph, ln I0, n, Rs, ln Rsh] scaled to the device. */
export function singleDiodeBounds(metrics: Metrics): { lower: Float64Array; upper: Float64Array } {
  const rRef = metrics.voc_v / metrics.isc_a;
  return {
    lower: Float64Array.from([0, -230, 0.5, 0, Math.log(1e-2 * rRef)]),
    upper: Float64Array.from([3 * metrics.isc_a, Math.log(metrics.isc_a), 3, rRef, Math.log(1e8 * rRef)]),
  };
}

/** The least-squares problem of a single-diode fit, for this solver or another. */
export function singleDiodeProblem(
  v: readonly number[],
  i: readonly number[],
  cells: number,
  temp_c: number,
  objective: FitObjective,
  bounds: { lower: Float64Array; upper: Float64Array },
): LmProblem {
  const m = v.length;
  const cv = cells * thermal_voltage_v(temp_c);
  const evaluate = (x: Float64Array, r: Float64Array, jac: Float64Array): boolean => {
    const iph = x[0];
    const lnI0 = x[1];
    const i0 = Math.exp(lnI0);
    const n = x[2];
    const rs = x[3];
    const rsh = Math.exp(x[4]);
    const a = n * cv;
    // Constants of the Lambert W form hoisted out of the point loop (same algebra as sdCurrent).
    const s = rs + rsh;
    const lnC = Math.log((rs * i0 * rsh) / (a * s));
    const kx = rsh / (a * s);
    const xBase = rs * (iph + i0);
    const lnAoverRs = Math.log(a / rs);
    const linBase = rsh * (iph + i0);
    for (let k = 0; k < m; k++) {
      let current = i[k];
      if (objective === 'true-current') {
        if (rs > 0) {
          const x = lnC + kx * (xBase + v[k]);
          const w = lambertWExp(x);
          current = (linBase - v[k]) / s - (w < 1 ? Math.exp(x + lnAoverRs - w) : (a / rs) * w);
        } else {
          current = sdCurrent(iph, i0, a, rs, rsh, v[k]);
        }
      }
      const vd = v[k] + current * rs;
      const i0e = Math.exp(lnI0 + vd / a);
      const gd = i0e / a + 1 / rsh;
      const row = k * 5;
      if (objective === 'true-current') {
        const dd = 1 / (1 + rs * gd);
        r[k] = current - i[k];
        jac[row] = dd;
        jac[row + 1] = -(i0e - i0) * dd;
        jac[row + 2] = ((i0e * vd) / (a * n)) * dd;
        jac[row + 3] = -gd * current * dd;
        jac[row + 4] = (vd / rsh) * dd;
      } else {
        r[k] = iph - (i0e - i0) - vd / rsh - current;
        jac[row] = 1;
        jac[row + 1] = -(i0e - i0);
        jac[row + 2] = (i0e * vd) / (a * n);
        jac[row + 3] = -gd * current;
        jac[row + 4] = vd / rsh;
      }
      if (!Number.isFinite(r[k]) || !Number.isFinite(jac[row + 2])) return false;
    }
    return true;
  };
  return { m, p: 5, evaluate, ...bounds };
}

const toVector = (s: SingleDiodeParams) => [s.iph_a, Math.log(s.i0_a), s.n, s.rs_ohm, Math.log(s.rsh_ohm)];

/**
 * Fallback starts for curves whose slopes mislead the closed forms: n = 1, 1.5, 2 with I0 set so
 * the diode alone carries Isc at Voc, small Rs, and a shunt no lower than the Phang one. The
 * Phang start alone reaches the published optima of both reference curves; these cost time
 * only when it fails.
 */
function alternativeStarts(base: SingleDiodeParams, metrics: Metrics, cells: number, temp_c: number): SingleDiodeParams[] {
  const vt = cells * thermal_voltage_v(temp_c);
  const rRef = metrics.voc_v / metrics.isc_a;
  const out: SingleDiodeParams[] = [];
  for (const n of [1.0, 1.5, 2.0]) {
    const a = n * vt;
    const i0 = metrics.isc_a * Math.exp(-metrics.voc_v / a);
    out.push({ iph_a: metrics.isc_a, i0_a: i0, n, rs_ohm: 0.02 * rRef, rsh_ohm: Math.max(base.rsh_ohm, 50 * rRef) });
  }
  return out;
}

/**
 * Runs LM from each start in turn and keeps the lowest converged sum of squares; stops at the
 * first converged fit whose n is inside its bounds (n on a bound is how a wrong basin shows).
 */
export function runSingleDiode(
  problem: LmProblem,
  starts: SingleDiodeParams[],
  maxEvaluations: number,
): { best: LmResult | null; evaluations: number } {
  let best: LmResult | null = null;
  let evaluations = 0;
  for (let s = 0; s < starts.length; s++) {
    const res = levenbergMarquardt(problem, toVector(starts[s]), { maxEvaluations: maxEvaluations - evaluations });
    evaluations += res.evaluations;
    if (res.converged && Number.isFinite(res.sse) && (!best || res.sse < best.sse)) best = res;
    if (best && !best.atBound[2]) break;
    if (evaluations >= maxEvaluations) break;
  }
  return { best, evaluations };
}

/**
 * Fits the single-diode model (n per cell) to a measured curve, by default to the true current.
 * Temperature and cells come from opts, then the curve's metadata, then 25 °C and 1 cell.
 * Throws IvInputError for unusable curves; a fit that does not converge returns converged
 * false, null numbers and a message.
 */
export function fitSingleDiode(curve: IvCurve, opts: SingleFitOptions = {}): SingleDiodeFit {
  const t0 = nowMs();
  const objective = fitObjective(opts.objective);
  const { temp_c, cells } = fitConditions(curve, opts);
  const { v, i } = validateCurve(curve);
  const metrics = opts.metrics ?? keyFiguresOfSorted(v, i, curve, false).metrics;
  const bounds = singleDiodeBounds(metrics);
  const problem = singleDiodeProblem(v, i, cells, temp_c, objective, bounds);
  const base = opts.start ?? phangStart(metrics, cells, temp_c);
  const starts = [base, ...(opts.start ? [] : alternativeStarts(base, metrics, cells, temp_c))];
  const { best, evaluations } = runSingleDiode(problem, starts, opts.maxEvaluations ?? 600);
  return singleDiodeResult(best, evaluations, v, i, cells, temp_c, objective, t0);
}

/** Turns a solver result into a single-diode fit (numbers only for a converged fit). */
export function singleDiodeResult(
  best: LmResult | null,
  evaluations: number,
  v: readonly number[],
  i: readonly number[],
  cells: number,
  temp_c: number,
  objective: FitObjective,
  t0: number,
  message?: string,
): SingleDiodeFit {
  if (!best || !best.converged) {
    return failedFit(
      'single-diode',
      objective,
      KEYS,
      evaluations,
      nowMs() - t0,
      message ?? `The single-diode fit did not converge after ${evaluations} evaluations; the curve may not follow a diode shape (steps, noise or wrong cell count).`,
    );
  }
  const x = best.x;
  const p: SingleDiodeParams = { iph_a: x[0], i0_a: Math.exp(x[1]), n: x[2], rs_ohm: x[3], rsh_ohm: Math.exp(x[4]) };
  const a = p.n * cells * thermal_voltage_v(temp_c);
  const trueResiduals = v.map((vk, k) => sdCurrent(p.iph_a, p.i0_a, a, p.rs_ohm, p.rsh_ohm, vk) - i[k]);
  const objResiduals = objective === 'true-current' ? trueResiduals : Array.from(best.r);
  const stats = residualStats(objResiduals);
  const trueStats = residualStats(trueResiduals);
  const variance = parameterCovariance(best, v.length, 5, [false, false, false, false, false]);
  // Delta method back to own units: σ(I0) = I0·σ(ln I0), σ(Rsh) = Rsh·σ(ln Rsh).
  const sd = (j: number, scale: number) => (variance[j] === null ? null : tidy(Math.sqrt(variance[j] as number) * scale));
  const atBounds = KEYS.filter((_, j) => best.atBound[j]);
  const result: SingleDiodeFit = {
    model: 'single-diode',
    objective,
    iph_a: tidy(p.iph_a),
    i0_a: tidy(p.i0_a),
    n: tidy(p.n),
    rs_ohm: tidy(p.rs_ohm),
    rsh_ohm: tidy(p.rsh_ohm),
    rmse_a: tidy(stats.rmse),
    rmse_true_current_a: tidy(trueStats.rmse),
    max_residual_a: tidy(stats.maxAbs),
    residuals_a: objResiduals,
    evaluations,
    converged: true,
    elapsed_ms: nowMs() - t0,
    stderr: { iph_a: sd(0, 1), i0_a: sd(1, p.i0_a), n: sd(2, 1), rs_ohm: sd(3, 1), rsh_ohm: sd(4, p.rsh_ohm) },
  };
  if (atBounds.length) {
    result.at_bounds = atBounds;
    result.message = `Parameters at the edge of their allowed range: ${atBounds.join(', ')}; their standard errors are not given.`;
  }
  if (message) result.message = message;
  return result;
}
