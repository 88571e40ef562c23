/**
 * A small Levenberg–Marquardt least-squares solver with an analytic Jacobian and box bounds,
 * written for the diode fits (2–7 parameters, up to a few thousand points):
 * - Marquardt scaling: damping λ·diag(D), D the running maximum of diag(JᵀJ), so parameters of
 *   very different units (amperes, log amperes, ohms) take comparable steps;
 * - Nielsen's gain-ratio update of λ (Nielsen 1999, IMM-REP-1999-05);
 * - bounds by projection with an active set: a parameter sitting on a bound whose gradient
 *   points outward is frozen for that step;
 * - MINPACK-style stopping tests on gradient, step and relative reduction.
 */
import { invertSpd, solveSpd } from '@/lib/iv/local-fit';

/** A least-squares problem: residuals r(x) (length m) and their Jacobian dr/dx (m×p, row-major). */
export type LmProblem = {
  m: number;
  p: number;
  /** Fills r and J at x; returns false when the model cannot be evaluated there (non-finite). */
  evaluate(x: Float64Array, r: Float64Array, jac: Float64Array): boolean;
  lower: Float64Array;
  upper: Float64Array;
};

export type LmOptions = {
  maxEvaluations?: number;
  /** Relative reduction of the sum of squares below which the fit has converged. */
  ftol?: number;
  /** Relative scaled step below which the fit has converged. */
  xtol?: number;
  /** Largest cosine between the residual and a Jacobian column at convergence. */
  gtol?: number;
};

export type LmResult = {
  x: Float64Array;
  /** Sum of squared residuals at x. */
  sse: number;
  r: Float64Array;
  jac: Float64Array;
  evaluations: number;
  iterations: number;
  converged: boolean;
  reason: 'gradient' | 'step' | 'reduction' | 'stalled' | 'max-evaluations' | 'not-evaluable';
  /** Parameters sitting on a bound at the end. */
  atBound: boolean[];
};

function normalMatrix(jac: Float64Array, r: Float64Array, m: number, p: number, a: Float64Array, g: Float64Array): void {
  a.fill(0);
  g.fill(0);
  for (let i = 0; i < m; i++) {
    const row = i * p;
    const ri = r[i];
    for (let j = 0; j < p; j++) {
      const jj = jac[row + j];
      g[j] += jj * ri;
      for (let k = 0; k <= j; k++) a[j * p + k] += jj * jac[row + k];
    }
  }
  for (let j = 0; j < p; j++) for (let k = 0; k < j; k++) a[k * p + j] = a[j * p + k];
}

/** Minimises ½‖r(x)‖² from x0 within the problem's bounds. */
export function levenbergMarquardt(problem: LmProblem, x0: ArrayLike<number>, opts: LmOptions = {}): LmResult {
  const { m, p, lower, upper } = problem;
  const maxEvaluations = opts.maxEvaluations ?? 400;
  const ftol = opts.ftol ?? 1e-12;
  const xtol = opts.xtol ?? 1e-10;
  const gtol = opts.gtol ?? 1e-10;

  const x = new Float64Array(p);
  for (let j = 0; j < p; j++) x[j] = Math.min(Math.max(x0[j], lower[j]), upper[j]);
  let r = new Float64Array(m);
  let jac = new Float64Array(m * p);
  let rTry = new Float64Array(m);
  let jacTry = new Float64Array(m * p);
  const xTry = new Float64Array(p);
  const a = new Float64Array(p * p);
  const g = new Float64Array(p);
  const d = new Float64Array(p);
  const free: number[] = [];

  const sumSq = (v: Float64Array) => {
    let s = 0;
    for (let i = 0; i < m; i++) s += v[i] * v[i];
    return s;
  };
  const atBoundOf = () => Array.from(x, (xj, j) => xj <= lower[j] || xj >= upper[j]);

  let evaluations = 1;
  if (!problem.evaluate(x, r, jac)) {
    return { x, sse: NaN, r, jac, evaluations, iterations: 0, converged: false, reason: 'not-evaluable', atBound: atBoundOf() };
  }
  let f = sumSq(r);
  let lambda = 1e-3;
  let nu = 2;
  let iterations = 0;
  let reason: LmResult['reason'] = 'max-evaluations';
  let converged = false;
  let fresh = true; // a and g need recomputing for the current x

  while (evaluations < maxEvaluations) {
    iterations++;
    if (fresh) {
      normalMatrix(jac, r, m, p, a, g);
      for (let j = 0; j < p; j++) d[j] = Math.max(d[j], a[j * p + j]);
      fresh = false;
    }
    free.length = 0;
    for (let j = 0; j < p; j++) {
      const pinnedLow = x[j] <= lower[j] && g[j] > 0;
      const pinnedHigh = x[j] >= upper[j] && g[j] < 0;
      if (!pinnedLow && !pinnedHigh && d[j] > 0) free.push(j);
    }
    let gmax = 0;
    for (const j of free) {
      const denom = Math.sqrt(a[j * p + j] * f);
      if (denom > 0) gmax = Math.max(gmax, Math.abs(g[j]) / denom);
    }
    if (free.length === 0 || gmax <= gtol || f === 0) {
      reason = 'gradient';
      converged = true;
      break;
    }

    // Solve on the free set; a parameter on a bound whose step still points outward (the
    // correlations can push it there even when its own gradient does not) joins the pinned
    // set and the step is solved again, so projection never bends the step.
    let step: Float64Array | null = null;
    for (let pass = 0; pass <= p; pass++) {
      const q = free.length;
      const aa = new Float64Array(q * q);
      const bb = new Float64Array(q);
      for (let s = 0; s < q; s++) {
        bb[s] = -g[free[s]];
        for (let t = 0; t < q; t++) aa[s * q + t] = a[free[s] * p + free[t]];
        aa[s * q + s] += lambda * d[free[s]];
      }
      step = solveSpd(aa, bb, q);
      if (!step) break;
      const outward = free.filter((j, s) => (x[j] <= lower[j] && (step as Float64Array)[s] < 0) || (x[j] >= upper[j] && (step as Float64Array)[s] > 0));
      if (outward.length === 0 || outward.length === free.length) break;
      for (const j of outward) free.splice(free.indexOf(j), 1);
    }
    if (!step) {
      lambda *= nu;
      nu *= 2;
      if (lambda > 1e20) {
        reason = 'stalled';
        break;
      }
      continue;
    }
    xTry.set(x);
    for (let s = 0; s < free.length; s++) {
      const j = free[s];
      xTry[j] = Math.min(Math.max(x[j] + step[s], lower[j]), upper[j]);
    }
    // Predicted reduction of the quadratic model along the (projected) step actually taken.
    let pred = 0;
    let stepNorm = 0;
    let xNorm = 0;
    for (let j = 0; j < p; j++) {
      const dj = xTry[j] - x[j];
      let adj = 0;
      for (let k = 0; k < p; k++) adj += a[j * p + k] * (xTry[k] - x[k]);
      pred -= 2 * g[j] * dj + dj * adj;
      stepNorm += d[j] * dj * dj;
      xNorm += d[j] * x[j] * x[j];
    }
    if (Math.sqrt(stepNorm) <= xtol * (Math.sqrt(xNorm) + xtol)) {
      reason = 'step';
      converged = true;
      break;
    }
    evaluations++;
    const ok = problem.evaluate(xTry, rTry, jacTry);
    const fTry = ok ? sumSq(rTry) : Infinity;
    const rho = pred > 0 ? (f - fTry) / pred : -1;
    if (ok && Number.isFinite(fTry) && fTry < f) {
      const actual = (f - fTry) / f;
      const predicted = pred / f;
      x.set(xTry);
      [r, rTry] = [rTry, r];
      [jac, jacTry] = [jacTry, jac];
      f = fTry;
      fresh = true;
      lambda *= Math.max(1 / 3, 1 - (2 * Math.max(rho, 0) - 1) ** 3);
      nu = 2;
      if (actual <= ftol && predicted <= ftol) {
        reason = 'reduction';
        converged = true;
        break;
      }
    } else {
      lambda *= nu;
      nu *= 2;
      if (lambda > 1e20) {
        // No step improves the sum of squares: a minimum to working precision when the
        // gradient is small, otherwise a genuine failure.
        reason = 'stalled';
        converged = gmax < 1e-6;
        break;
      }
    }
  }
  if (fresh) normalMatrix(jac, r, m, p, a, g);
  return { x, sse: f, r, jac, evaluations, iterations, converged, reason, atBound: atBoundOf() };
}

/**
 * Covariance of the parameters at the optimum, s²·(JᵀJ)⁻¹ with s² = SSE/(m − p), restricted to
 * the parameters not on a bound (the others get null). Null rows when JᵀJ is singular.
 */
export function parameterCovariance(res: LmResult, m: number, p: number, fixed: boolean[]): (number | null)[] {
  const free: number[] = [];
  for (let j = 0; j < p; j++) if (!fixed[j] && !res.atBound[j]) free.push(j);
  const out: (number | null)[] = new Array(p).fill(null);
  const dof = m - free.length;
  if (free.length === 0 || dof <= 0) return out;
  const q = free.length;
  const a = new Float64Array(q * q);
  for (let i = 0; i < m; i++) {
    for (let s = 0; s < q; s++) {
      const js = res.jac[i * p + free[s]];
      for (let t = 0; t < q; t++) a[s * q + t] += js * res.jac[i * p + free[t]];
    }
  }
  const inv = invertSpd(a, q);
  if (!inv) return out;
  const s2 = res.sse / dof;
  for (let s = 0; s < q; s++) {
    const variance = inv[s * q + s] * s2;
    out[free[s]] = Number.isFinite(variance) && variance >= 0 ? variance : null;
  }
  return out;
}
