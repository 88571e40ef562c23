/**
 * Where string sizing takes a module's voltages and temperature coefficients from, when a batch
 * or one curve is given: the rules (pure; the service loads the curves and fits). Voc at STC is
 * the batch's highest (worst case); Vmp at STC its lowest; a coefficient is measured across the
 * batch's cell temperatures when they span enough, else taken from the fitted diode model.
 */
import { singleParams } from '@/lib/analysis/analyse-file';
import type { FitResult, SingleDiodeParams } from '@/lib/iv';
import { circuitFigures, paramsAtTemperature, PhysicsError, singleDiodeCircuit, vocTempCoefficient } from '@/lib/physics';
import { STC } from '@/lib/physics/constants';
import { stcFiguresOf } from '@/lib/schemas/curves';
import type { StcOutcome } from '@/lib/schemas/curves';
import { MEASURED_MIN_SPAN_K } from '@/lib/schemas/strings';
import type { CoefficientSource, MeasuredPoint, ModuleSource } from '@/lib/schemas/strings';
import { betaVocFromMeasurements, worstModule } from '@/lib/strings/size-string';
import type { StringSizingResult } from '@/lib/strings/size-string';

/** Curves at irradiances outside this band are left out of the measured line (Voc also rises with light). */
export const IRRADIANCE_BAND_WM2 = { min: 900, max: 1100 } as const;

export const MEASURED_RULE =
  `Straight line through the batch-mean measured Voc at each cell temperature (rounded to 0.1 °C), ` +
  `over curves at ${IRRADIANCE_BAND_WM2.min}–${IRRADIANCE_BAND_WM2.max} W/m² or with no irradiance given; ` +
  `used when there are two or more temperatures spanning ≥ ${MEASURED_MIN_SPAN_K} K; relative to the line's Voc at 25 °C.`;
export const MODEL_LAW_TEXT =
  'From the fitted single-diode model moved to 25 °C and 1000 W/m²: I0(T) ∝ n_i(T)^(2/n), Iph +0.05 %/K (common practice), ' +
  'n, Rs and Rsh held; dV/dT by a central difference over ±0.5 K, relative to the model’s value at 25 °C.';

/** What sizing needs of one stored curve. */
export type CurveFacts = {
  id: string;
  device_id: string;
  temp_c: number | null;
  irradiance_w_m2: number | null;
  cells: number | null;
  voc_v: number;
  vmp_v: number;
  stc_voc_v: number | null;
  stc_vmp_v: number | null;
};

/** A curve's fitted model moved to 25 °C and 1000 W/m², with the conditions it was fitted at. */
export type StcModel = { p25: SingleDiodeParams; fit_temp_c: number; cells: number };

/** Rounds to 1 µV (or 1e-6 of any unit): exact enough, and free of binary noise in JSON. */
export const r6 = (x: number): number => Math.round(x * 1e6) / 1e6;
/** For figures inside sentences. */
export const round3 = (x: number): number => Math.round(x * 1000) / 1000;
const finite = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

/** The facts of a stored curve (its metadata, measured and STC figures); unusable values become null. */
export function curveFacts(x: {
  id: string;
  device_id: string;
  meta: { temp_c?: number; irradiance_w_m2?: number; cells?: number };
  voc_v: number;
  metrics: { vmp_v: number };
  stc: StcOutcome | null;
}): CurveFacts {
  // A curve without STC figures (no method held, lib/analysis/stc.ts) gives no STC voltages.
  const stc = stcFiguresOf(x.stc);
  return {
    id: x.id,
    device_id: x.device_id,
    temp_c: finite(x.meta.temp_c) ? x.meta.temp_c : null,
    irradiance_w_m2: finite(x.meta.irradiance_w_m2) ? x.meta.irradiance_w_m2 : null,
    cells: finite(x.meta.cells) && x.meta.cells >= 1 ? x.meta.cells : null,
    voc_v: x.voc_v,
    vmp_v: x.metrics.vmp_v,
    stc_voc_v: stc && finite(stc.voc_v) && stc.voc_v > 0 ? stc.voc_v : null,
    stc_vmp_v: stc && finite(stc.vmp_v) && stc.vmp_v > 0 ? stc.vmp_v : null,
  };
}

/** The single-diode parameters of a fit moved to STC (25 °C, 1000 W/m²) by the n_i law, or null. */
export function paramsAtStc(params: SingleDiodeParams, cells: number, fit_temp_c: number, irradiance_w_m2: number): SingleDiodeParams | null {
  try {
    const p = paramsAtTemperature(params, STC.temp_c, { cells, fit_temp_c });
    return { ...p, iph_a: (p.iph_a * STC.irradiance_w_m2) / irradiance_w_m2 };
  } catch (err) {
    if (err instanceof PhysicsError) return null;
    throw err;
  }
}

/**
 * The STC model of a curve's current single-diode fit, or null when it did not converge. The fit's
 * own conditions win over the curve's metadata (`fallback`); irradiance defaults to 1000 W/m².
 */
export function stcModelOf(fits: { result: FitResult; conditions: Record<string, unknown> }[], fallback: { temp_c: number | null; cells: number; irradiance_w_m2: number | null }): StcModel | null {
  const params = singleParams(fits.map((r) => r.result));
  if (!params) return null;
  const cond = fits[0].conditions as { temp_c?: unknown; cells?: unknown; irradiance_w_m2?: unknown };
  const fit_temp_c = finite(cond.temp_c) ? cond.temp_c : (fallback.temp_c ?? STC.temp_c);
  const cells = finite(cond.cells) && cond.cells >= 1 ? cond.cells : fallback.cells;
  const g = finite(cond.irradiance_w_m2) && cond.irradiance_w_m2 > 0 ? cond.irradiance_w_m2 : (fallback.irradiance_w_m2 ?? STC.irradiance_w_m2);
  const p25 = paramsAtStc(params, cells, fit_temp_c, g);
  return p25 ? { p25, fit_temp_c, cells } : null;
}

/** Relative Voc coefficient of a model at 25 °C, %/K (n_i law), or null when the physics refuses. */
export function modelBetaVoc(p25: SingleDiodeParams, cells: number): number | null {
  try {
    const b = vocTempCoefficient(p25, { cells, temp_c: STC.temp_c }).beta_pct_per_k;
    return finite(b) ? b : null;
  } catch (err) {
    if (err instanceof PhysicsError) return null;
    throw err;
  }
}

/** Relative Vmp coefficient of a model at 25 °C, %/K: central difference over ±0.5 K with the n_i law. */
export function modelBetaVmp(p25: SingleDiodeParams, cells: number): number | null {
  try {
    const at = (t: number) => circuitFigures(singleDiodeCircuit(paramsAtTemperature(p25, t, { cells, fit_temp_c: STC.temp_c })), cells, t).vmp_v;
    const v25 = at(STC.temp_c);
    const slope = (at(STC.temp_c + 0.5) - at(STC.temp_c - 0.5)) / 1;
    const beta = (100 * slope) / v25;
    return Number.isFinite(beta) && v25 > 0 ? beta : null;
  } catch (err) {
    if (err instanceof PhysicsError) return null;
    throw err;
  }
}

/** Batch-mean values per cell temperature, when the rule above says they make a measurement. */
export function measuredPoints(curves: readonly CurveFacts[], pick: (c: CurveFacts) => number): { points: MeasuredPoint[]; span_k: number } {
  const groups = new Map<number, { sum: number; n: number }>();
  for (const c of curves) {
    if (c.temp_c === null || !finite(c.temp_c)) continue;
    if (c.irradiance_w_m2 !== null && (c.irradiance_w_m2 < IRRADIANCE_BAND_WM2.min || c.irradiance_w_m2 > IRRADIANCE_BAND_WM2.max)) continue;
    const v = pick(c);
    if (!finite(v) || v <= 0) continue;
    const t = Math.round(c.temp_c * 10) / 10;
    const g = groups.get(t) ?? { sum: 0, n: 0 };
    g.sum += v;
    g.n += 1;
    groups.set(t, g);
  }
  const points = [...groups.entries()].sort((a, b) => a[0] - b[0]).map(([temp_c, g]) => ({ temp_c, voc_v: g.sum / g.n, curves: g.n }));
  const span_k = points.length ? points[points.length - 1].temp_c - points[0].temp_c : 0;
  return { points, span_k };
}

/** Whether measured points make a coefficient: two or more temperatures spanning MEASURED_MIN_SPAN_K. */
export function spansEnough(m: { points: MeasuredPoint[]; span_k: number }): boolean {
  return m.points.length >= 2 && m.span_k >= MEASURED_MIN_SPAN_K;
}

/** The measured coefficient through the points (%/K) and its source; `of` names the voltage in the rule's text. */
export function measuredCoefficient(m: { points: MeasuredPoint[] }, of: 'Voc' | 'Vmp'): { beta: number; source: CoefficientSource; warnings: string[] } {
  const fit = betaVocFromMeasurements(m.points.map((p) => ({ temp_c: p.temp_c, voc_v: p.voc_v })));
  const warnings = of === 'Voc' ? fit.warnings : [];
  return {
    beta: fit.beta_voc_pct_per_k,
    source: { kind: 'measured', points: m.points.map((p) => ({ ...p, voc_v: r6(p.voc_v) })), span_k: r6(fit.span_k), r2: r6(fit.r2), rule: of === 'Voc' ? MEASURED_RULE : MEASURED_RULE.replace(/Voc/g, 'Vmp'), warnings },
    warnings,
  };
}

/** The source of a coefficient taken from a curve's model. */
export function modelSource(m: StcModel, of: { id: string; device_id: string }, note: string | null = null): CoefficientSource {
  return { kind: 'model', law: 'ni-power', law_text: MODEL_LAW_TEXT, device_id: of.device_id, curve_id: of.id, fit_temp_c: m.fit_temp_c, cells: m.cells, note };
}

/** Voc at STC for sizing: the highest of the curves with STC figures (worst case), or null when none has one. */
export function highestVocStc(withStc: readonly CurveFacts[], mode: 'batch' | 'curve'): { voc_v: number; source: ModuleSource } | null {
  if (!withStc.length) return null;
  const w = worstModule(withStc.map((x) => ({ device_id: x.device_id, voc_v: x.stc_voc_v })));
  const top = withStc[w.index];
  return {
    voc_v: w.voc_v,
    source: {
      kind: mode,
      device_id: top.device_id,
      curve_id: top.id,
      value_v: r6(w.voc_v),
      modules: w.count,
      mean_v: r6(w.mean_voc_v),
      note: mode === 'batch' ? w.note : `Sized on the one curve chosen (${top.device_id}, Voc ${r6(w.voc_v)} V at STC).`,
    },
  };
}

/** Vmp at STC for the least modules: the lowest of the curves (not the mean), or null when none has one. */
export function lowestVmpStc(curves: readonly CurveFacts[], mode: 'batch' | 'curve'): { vmp_v: number; source: ModuleSource } | null {
  const withVmp = curves.filter((x) => x.stc_vmp_v !== null);
  if (!withVmp.length) return null;
  let low = withVmp[0];
  for (const x of withVmp) if ((x.stc_vmp_v as number) < (low.stc_vmp_v as number)) low = x;
  const mean = withVmp.reduce((s, x) => s + (x.stc_vmp_v as number), 0) / withVmp.length;
  const vmp = low.stc_vmp_v as number;
  return {
    vmp_v: vmp,
    source: {
      kind: mode,
      device_id: low.device_id,
      curve_id: low.id,
      value_v: r6(vmp),
      modules: withVmp.length,
      mean_v: r6(mean),
      note:
        withVmp.length > 1
          ? `The least modules use the lowest Vmp at STC of ${withVmp.length} modules (${low.device_id}, ${round3(vmp)} V), not the mean (${round3(mean)} V), so that a string reaches the MPP window even if every module were as low.`
          : `Vmp at STC of ${low.device_id}.`,
    },
  };
}

/** A sizing result with its voltages rounded to 1 µV. */
export function roundSizing(result: StringSizingResult): StringSizingResult {
  const out: StringSizingResult = {
    ...result,
    voc_max_per_module_v: r6(result.voc_max_per_module_v),
    string_voc_max_v: r6(result.string_voc_max_v),
    margin_v: r6(result.margin_v),
    margin_pct: r6(result.margin_pct),
  };
  if (result.vmp_min_per_module_v !== undefined) out.vmp_min_per_module_v = r6(result.vmp_min_per_module_v);
  if (result.vmp_max_per_module_v !== undefined) out.vmp_max_per_module_v = r6(result.vmp_max_per_module_v);
  return out;
}
