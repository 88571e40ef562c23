/**
 * The single-diode fit through ml-levenberg-marquardt, kept for comparison with the engine's
 * own solver (the benchmark prints both). The library is parametrised for this stiff problem:
 * p = [Iph/Isc, ln(I0/Isc), n, Rs/Rref, ln(Rsh/Rref)] with Rref = Voc/Isc, so every component
 * is of order one and its plain additive damping λ·I and finite-difference steps suit all of
 * them. Its result carries no convergence verdict, so convergence is judged afterwards by the
 * stationarity test of our own solver (largest cosine between residual and Jacobian columns).
 * It lives in bench/ because only the benchmark (and its test) use it: the engine and the web
 * bundle do not carry ml-matrix.
 */
import { levenbergMarquardt as mlLevenbergMarquardt } from 'ml-levenberg-marquardt';
import { thermal_voltage_v } from '@/lib/physics/constants';
import { sdCurrent } from '@/lib/iv/diode';
import { fitConditions, nowMs } from '@/lib/iv/fit-common';
import { singleDiodeBounds, singleDiodeProblem, singleDiodeResult } from '@/lib/iv/fit-single';
import { keyFiguresOfSorted, validateCurve } from '@/lib/iv/key-figures';
import type { LmResult } from '@/lib/iv/lm';
import { phangStart } from '@/lib/iv/start';
import type { IvCurve, Metrics, SingleDiodeFit } from '@/lib/iv/types';

/** Options of the library-based fit (true-current objective only). */
export type MlFitOptions = {
  temp_c?: number;
  cells?: number;
  metrics?: Metrics;
  /** 'analytic' passes our Jacobian to the library; 'central' lets it difference (default). */
  jacobian?: 'analytic' | 'central';
  maxIterations?: number;
};

/** Single-diode fit (true current) by ml-levenberg-marquardt from the same Phang start. */
export function fitSingleDiodeMl(curve: IvCurve, opts: MlFitOptions = {}): SingleDiodeFit {
  const t0 = nowMs();
  const { temp_c, cells } = fitConditions(curve, opts);
  const { v, i } = validateCurve(curve);
  const metrics = opts.metrics ?? keyFiguresOfSorted(v, i, curve, false).metrics;
  const isc = metrics.isc_a;
  const rRef = metrics.voc_v / isc;
  const cv = cells * thermal_voltage_v(temp_c);
  const start = phangStart(metrics, cells, temp_c);
  const toPhysical = (p: ArrayLike<number>) => ({ iph: p[0] * isc, lnI0: p[1] + Math.log(isc), n: p[2], rs: p[3] * rRef, lnRsh: p[4] + Math.log(rRef) });
  const bounds = singleDiodeBounds(metrics);
  const scaleMin = [bounds.lower[0] / isc, bounds.lower[1] - Math.log(isc), bounds.lower[2], bounds.lower[3] / rRef, bounds.lower[4] - Math.log(rRef)];
  const scaleMax = [bounds.upper[0] / isc, bounds.upper[1] - Math.log(isc), bounds.upper[2], bounds.upper[3] / rRef, bounds.upper[4] - Math.log(rRef)];

  let evaluations = 0;
  const model = (p: number[]) => {
    evaluations++;
    const q = toPhysical(p);
    const i0 = Math.exp(q.lnI0);
    const rsh = Math.exp(q.lnRsh);
    const a = q.n * cv;
    return (x: number) => {
      const value = sdCurrent(q.iph, i0, a, q.rs, rsh, x);
      // The library has no way to reject a point; a huge residual makes it back off instead.
      return Number.isFinite(value) ? value : 1e6;
    };
  };
  const jacobianFunction = (p: number[]) => {
    const q = toPhysical(p);
    const i0 = Math.exp(q.lnI0);
    const rsh = Math.exp(q.lnRsh);
    const a = q.n * cv;
    return (x: number) => {
      const current = sdCurrent(q.iph, i0, a, q.rs, rsh, x);
      const vd = x + current * q.rs;
      const i0e = Math.exp(q.lnI0 + vd / a);
      const gd = i0e / a + 1 / rsh;
      const dd = 1 / (1 + q.rs * gd);
      return [isc * dd, -(i0e - i0) * dd, ((i0e * vd) / (a * q.n)) * dd, -gd * current * dd * rRef, (vd / rsh) * dd];
    };
  };
  const initialValues = [start.iph_a / isc, Math.log(start.i0_a / isc), start.n, start.rs_ohm / rRef, Math.log(start.rsh_ohm / rRef)];
  const out = mlLevenbergMarquardt({ x: v, y: i }, model, {
    initialValues,
    minValues: scaleMin,
    maxValues: scaleMax,
    damping: 1e-2,
    gradientDifference: [1e-6, 1e-5, 1e-6, 1e-6, 1e-5],
    centralDifference: true,
    maxIterations: opts.maxIterations ?? 200,
    // Its errorTolerance is an absolute sum of squares used both to stop and to decide what
    // counts as an improvement; tiny, so that neither cuts the fit short.
    errorTolerance: 1e-14,
    ...(opts.jacobian === 'analytic' ? { jacobianFunction } : {}),
  });
  const q = toPhysical(out.parameterValues);
  const x = Float64Array.from([q.iph, q.lnI0, q.n, q.rs, q.lnRsh]);

  // Judge convergence with the engine's own stationarity test at the library's answer.
  const problem = singleDiodeProblem(v, i, cells, temp_c, 'true-current', bounds);
  const r = new Float64Array(v.length);
  const jac = new Float64Array(v.length * 5);
  const ok = problem.evaluate(x, r, jac);
  let sse = 0;
  for (const e of r) sse += e * e;
  const atBound = Array.from(x, (xj, j) => xj <= bounds.lower[j] || xj >= bounds.upper[j]);
  let gmax = 0;
  for (let j = 0; j < 5; j++) {
    if (atBound[j]) continue;
    let g = 0;
    let col = 0;
    for (let k = 0; k < v.length; k++) {
      g += jac[k * 5 + j] * r[k];
      col += jac[k * 5 + j] ** 2;
    }
    if (col > 0 && sse > 0) gmax = Math.max(gmax, Math.abs(g) / Math.sqrt(col * sse));
  }
  const converged = ok && Number.isFinite(sse) && gmax < 1e-4;
  const res: LmResult = { x, sse, r, jac, evaluations, iterations: out.iterations, converged, reason: converged ? 'gradient' : 'max-evaluations', atBound };
  return singleDiodeResult(
    res,
    evaluations,
    v,
    i,
    cells,
    temp_c,
    'true-current',
    t0,
    converged ? undefined : `ml-levenberg-marquardt stopped after ${out.iterations} iterations away from a stationary point (largest residual–Jacobian cosine ${gmax.toExponential(1)}).`,
  );
}
