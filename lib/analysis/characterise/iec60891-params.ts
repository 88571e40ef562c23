/**
 * The correction parameters of IEC 60891 procedures 1 and 2 determined from the device's own
 * curves, as the standard describes it (memory of IEC 60891:2009 clauses on the determination of
 * Rs and κ; the standard was not at hand to quote):
 * - **Rs** (procedure 1) / **Rs′** (procedure 2): curves at one cell temperature and at least three
 *   irradiances are each corrected to the irradiance of the highest one; Rs is the value for which
 *   the corrected curves' Pmax agree with the measured Pmax there (the standard adjusts Rs "until
 *   the curves coincide"; here the adjustment is a least-squares fit of the Pmax differences).
 * - **κ** / **κ′**: with Rs found, curves at one irradiance and at least three temperatures are
 *   corrected to the temperature of the one nearest 25 °C; κ is fitted the same way.
 * - **a** (procedure 2's irradiance correction of Voc): from Voc at one temperature over the
 *   irradiances, Voc(G) = Voc(Gt)·(1 + a·ln(G/Gt)), fitted by least squares.
 * The fits are done by ml-levenberg-marquardt (the residual vector is handed to it as data y = 0
 * at x = 0…m−1). The residual of each determination is the RMS of what is left, in % of Pmax
 * (V for a).
 * α and β come from the temperature regression (coefficients.ts): procedure 1 takes them absolute
 * (α scaled to 1000 W/m², Isc ∝ G), procedure 2 relative.
 */
import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import { COEFFICIENT_RULES, irradianceLevels, temperatureLevels } from '@/lib/analysis/characterise/coefficients';
import type { CoefficientSet } from '@/lib/analysis/characterise/coefficients';
import { movedPmax } from '@/lib/analysis/characterise/translate-figures';
import type { Proc1Params, Proc2Params, Procedure } from '@/lib/analysis/characterise/translate-figures';
import type { CharCurve, Refusal } from '@/lib/analysis/characterise/types';

/** At least this many irradiance levels (2 % apart) at one temperature for Rs and a (chosen here; the standard's own minimum, memory, is three). */
export const MIN_IRRADIANCE_LEVELS = 3;

export type Determination = { value: number; residual_pct: number; curves: string[]; iterations: number };

export type Procedure1Result = Proc1Params & { rs: Determination; kappa: Determination };
export type Procedure2Result = Proc2Params & { a: Determination & { residual_v: number }; rs: Determination; kappa: Determination };
export type Iec60891Result = { procedure1: Procedure1Result | Refusal; procedure2: Procedure2Result | Refusal };

const mean = (xs: number[]) => xs.reduce((s, v) => s + v, 0) / xs.length;
const rms = (xs: number[]) => Math.sqrt(mean(xs.map((x) => x * x)));

/** Least squares through ml-levenberg-marquardt of a residual vector r(p). */
function lmFit(residuals: (p: number[]) => number[], m: number, initial: number[], step: number[]): { p: number[]; iterations: number; r: number[] } {
  const x = Array.from({ length: m }, (_, k) => k);
  const out = levenbergMarquardt({ x, y: x.map(() => 0) }, (p: number[]) => {
    const r = residuals(p);
    return (k: number) => r[k];
  }, {
    initialValues: initial,
    damping: 1e-3,
    gradientDifference: step,
    centralDifference: true,
    maxIterations: 40,
    errorTolerance: 1e-12,
  });
  const p = out.parameterValues;
  return { p, iterations: out.iterations, r: residuals(p) };
}

/** The temperature level with the most irradiance levels, nearest 25 °C among equals. */
export function rsGroup(curves: readonly CharCurve[]): CharCurve[] | null {
  const levels = temperatureLevels(curves)
    .map((l) => ({ l, g: irradianceLevels(l).length, t: Math.abs(mean(l.map((c) => c.temp_c)) - 25) }))
    .filter((x) => x.g >= MIN_IRRADIANCE_LEVELS)
    .sort((a, b) => b.g - a.g || a.t - b.t);
  return levels.length ? levels[0].l : null;
}

/** Pmax differences (% of the target's) of each curve corrected to the target's conditions. */
function pmaxDifferences(group: CharCurve[], target: CharCurve, proc: Procedure): number[] {
  const to = { irradiance_w_m2: target.irradiance_w_m2, temp_c: target.temp_c };
  return group
    .filter((c) => c !== target)
    .map((c) => {
      try {
        const pmp = movedPmax(c, to, proc);
        return Number.isFinite(pmp) ? (100 * (pmp - target.metrics.pmp_w)) / target.metrics.pmp_w : 1e3;
      } catch {
        return 1e3; // a correction without key figures: pushes the fit away from that value
      }
    });
}

function determine(group: CharCurve[], target: CharCurve, proc: (v: number) => Procedure, scale: number): Determination {
  const others = group.filter((c) => c !== target);
  const fit = lmFit((p) => pmaxDifferences(group, target, proc(p[0])), others.length, [0], [scale * 1e-3]);
  return { value: fit.p[0], residual_pct: rms(fit.r), curves: group.map((c) => c.id), iterations: fit.iterations };
}

/** Procedure 1 and 2 parameters, each or the reason it cannot be had. */
export function iec60891Parameters(curves: readonly CharCurve[], coefficients: CoefficientSet | Refusal): Iec60891Result {
  if ('error' in coefficients) {
    const error = `IEC 60891 parameters need α and β first: ${coefficients.error}`;
    return { procedure1: { error }, procedure2: { error } };
  }
  const group = rsGroup(curves);
  if (!group) {
    const error = `Rs needs curves at one cell temperature (±2 K) and at least ${MIN_IRRADIANCE_LEVELS} irradiances (${COEFFICIENT_RULES.irradiance_window_pct * 2} % apart); these curves do not have them`;
    return { procedure1: { error }, procedure2: { error } };
  }
  const tGroup = coefficients.alpha.points.map((p) => curves.find((c) => c.id === p.curve_id)).filter((c): c is CharCurve => !!c);
  const rsTarget = group.reduce((a, b) => (b.irradiance_w_m2 > a.irradiance_w_m2 ? b : a));
  const kTarget = tGroup.reduce((a, b) => (Math.abs(b.temp_c - 25) < Math.abs(a.temp_c - 25) ? b : a));
  const scale = rsTarget.metrics.voc_v / rsTarget.metrics.isc_a;

  const alpha_a_per_k = (coefficients.alpha.per_k * 1000) / coefficients.irradiance_w_m2;
  const beta_v_per_k = coefficients.beta.per_k;
  const p1 = (rs: number, kappa: number): Procedure => ({ procedure: 1, params: { alpha_a_per_k, beta_v_per_k, rs_ohm: rs, kappa_ohm_per_k: kappa } });
  const rs1 = determine(group, rsTarget, (rs) => p1(rs, 0), scale);
  const k1 = determine(tGroup, kTarget, (k) => p1(rs1.value, k), scale / 100);
  const procedure1: Procedure1Result = { alpha_a_per_k, beta_v_per_k, rs_ohm: rs1.value, kappa_ohm_per_k: k1.value, rs: rs1, kappa: k1 };

  // Procedure 2: a from Voc over irradiance at the Rs group's temperature (each Voc moved to the group's mean temperature by β first).
  const alpha_rel_per_k = coefficients.alpha.pct_per_k / 100;
  const beta_rel_per_k = coefficients.beta.pct_per_k / 100;
  const tMean = mean(group.map((c) => c.temp_c));
  const gT = rsTarget.irradiance_w_m2;
  const vocs = group.map((c) => c.metrics.voc_v + beta_v_per_k * (tMean - c.temp_c));
  const aFit = lmFit(
    (p) => group.map((c, k) => p[0] * (1 + p[1] * Math.log(c.irradiance_w_m2 / gT)) - vocs[k]),
    group.length,
    [Math.max(...vocs), 0.05],
    [1e-4 * Math.max(...vocs), 1e-5],
  );
  const aValue = aFit.p[1];
  const residual_v = rms(aFit.r);
  const a = { value: aValue, residual_pct: (100 * residual_v) / mean(vocs), residual_v, curves: group.map((c) => c.id), iterations: aFit.iterations };
  const p2 = (rs: number, kappa: number): Procedure => ({ procedure: 2, params: { alpha_rel_per_k, beta_rel_per_k, a_irradiance: aValue, rs_ohm: rs, kappa_ohm_per_k: kappa } });
  const rs2 = determine(group, rsTarget, (rs) => p2(rs, 0), scale);
  const k2 = determine(tGroup, kTarget, (k) => p2(rs2.value, k), scale / 100);
  const procedure2: Procedure2Result = { alpha_rel_per_k, beta_rel_per_k, a_irradiance: aValue, rs_ohm: rs2.value, kappa_ohm_per_k: k2.value, a, rs: rs2, kappa: k2 };
  return { procedure1, procedure2 };
}
