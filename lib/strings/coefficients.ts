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
  deviceId: string;
  tempC: number | null;
  irradiance_Wm2: number | null;
  cells: number | null;
  voc_V: number;
  vmp_V: number;
  stcVoc_V: number | null;
  stcVmp_V: number | null;
};

/** A curve's fitted model moved to 25 °C and 1000 W/m², with the conditions it was fitted at. */
export type StcModel = { p25: SingleDiodeParams; fitTempC: number; cells: number };

/** Rounds to 1 µV (or 1e-6 of any unit): exact enough, and free of binary noise in JSON. */
export const r6 = (x: number): number => Math.round(x * 1e6) / 1e6;
/** For figures inside sentences. */
export const round3 = (x: number): number => Math.round(x * 1000) / 1000;
const finite = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

/** The facts of a stored curve (its metadata, measured and STC figures); unusable values become null. */
export function curveFacts(x: {
  id: string;
  deviceId: string;
  meta: { tempC?: number; irradiance_Wm2?: number; cells?: number };
  voc_v: number;
  metrics: { vmp_v: number };
  stc: { voc_v: number; vmp_v: number } | null;
}): CurveFacts {
  return {
    id: x.id,
    deviceId: x.deviceId,
    tempC: finite(x.meta.tempC) ? x.meta.tempC : null,
    irradiance_Wm2: finite(x.meta.irradiance_Wm2) ? x.meta.irradiance_Wm2 : null,
    cells: finite(x.meta.cells) && x.meta.cells >= 1 ? x.meta.cells : null,
    voc_V: x.voc_v,
    vmp_V: x.metrics.vmp_v,
    stcVoc_V: x.stc && finite(x.stc.voc_v) && x.stc.voc_v > 0 ? x.stc.voc_v : null,
    stcVmp_V: x.stc && finite(x.stc.vmp_v) && x.stc.vmp_v > 0 ? x.stc.vmp_v : null,
  };
}

/** The single-diode parameters of a fit moved to STC (25 °C, 1000 W/m²) by the n_i law, or null. */
export function paramsAtStc(params: SingleDiodeParams, cells: number, fitTempC: number, irradiance_Wm2: number): SingleDiodeParams | null {
  try {
    const p = paramsAtTemperature(params, STC.tempC, { cells, fitTempC });
    return { ...p, iph_a: (p.iph_a * STC.irradiance_Wm2) / irradiance_Wm2 };
  } catch (err) {
    if (err instanceof PhysicsError) return null;
    throw err;
  }
}

/**
 * The STC model of a curve's current single-diode fit, or null when it did not converge. The fit's
 * own conditions win over the curve's metadata (`fallback`); irradiance defaults to 1000 W/m².
 */
export function stcModelOf(fits: { result: FitResult; conditions: Record<string, unknown> }[], fallback: { tempC: number | null; cells: number; irradiance_Wm2: number | null }): StcModel | null {
  const params = singleParams(fits.map((r) => r.result));
  if (!params) return null;
  const cond = fits[0].conditions as { tempC?: unknown; cells?: unknown; irradiance_Wm2?: unknown };
  const fitTempC = finite(cond.tempC) ? cond.tempC : (fallback.tempC ?? STC.tempC);
  const cells = finite(cond.cells) && cond.cells >= 1 ? cond.cells : fallback.cells;
  const g = finite(cond.irradiance_Wm2) && cond.irradiance_Wm2 > 0 ? cond.irradiance_Wm2 : (fallback.irradiance_Wm2 ?? STC.irradiance_Wm2);
  const p25 = paramsAtStc(params, cells, fitTempC, g);
  return p25 ? { p25, fitTempC, cells } : null;
}

/** Relative Voc coefficient of a model at 25 °C, %/K (n_i law), or null when the physics refuses. */
export function modelBetaVoc(p25: SingleDiodeParams, cells: number): number | null {
  try {
    const b = vocTempCoefficient(p25, { cells, tempC: STC.tempC }).beta_pct_per_K;
    return finite(b) ? b : null;
  } catch (err) {
    if (err instanceof PhysicsError) return null;
    throw err;
  }
}

/** Relative Vmp coefficient of a model at 25 °C, %/K: central difference over ±0.5 K with the n_i law. */
export function modelBetaVmp(p25: SingleDiodeParams, cells: number): number | null {
  try {
    const at = (t: number) => circuitFigures(singleDiodeCircuit(paramsAtTemperature(p25, t, { cells, fitTempC: STC.tempC })), cells, t).vmp_v;
    const v25 = at(STC.tempC);
    const slope = (at(STC.tempC + 0.5) - at(STC.tempC - 0.5)) / 1;
    const beta = (100 * slope) / v25;
    return Number.isFinite(beta) && v25 > 0 ? beta : null;
  } catch (err) {
    if (err instanceof PhysicsError) return null;
    throw err;
  }
}

/** Batch-mean values per cell temperature, when the rule above says they make a measurement. */
export function measuredPoints(curves: readonly CurveFacts[], pick: (c: CurveFacts) => number): { points: MeasuredPoint[]; span_K: number } {
  const groups = new Map<number, { sum: number; n: number }>();
  for (const c of curves) {
    if (c.tempC === null || !finite(c.tempC)) continue;
    if (c.irradiance_Wm2 !== null && (c.irradiance_Wm2 < IRRADIANCE_BAND_WM2.min || c.irradiance_Wm2 > IRRADIANCE_BAND_WM2.max)) continue;
    const v = pick(c);
    if (!finite(v) || v <= 0) continue;
    const t = Math.round(c.tempC * 10) / 10;
    const g = groups.get(t) ?? { sum: 0, n: 0 };
    g.sum += v;
    g.n += 1;
    groups.set(t, g);
  }
  const points = [...groups.entries()].sort((a, b) => a[0] - b[0]).map(([tempC, g]) => ({ tempC, voc_V: g.sum / g.n, curves: g.n }));
  const span_K = points.length ? points[points.length - 1].tempC - points[0].tempC : 0;
  return { points, span_K };
}

/** Whether measured points make a coefficient: two or more temperatures spanning MEASURED_MIN_SPAN_K. */
export function spansEnough(m: { points: MeasuredPoint[]; span_K: number }): boolean {
  return m.points.length >= 2 && m.span_K >= MEASURED_MIN_SPAN_K;
}

/** The measured coefficient through the points (%/K) and its source; `of` names the voltage in the rule's text. */
export function measuredCoefficient(m: { points: MeasuredPoint[] }, of: 'Voc' | 'Vmp'): { beta: number; source: CoefficientSource; warnings: string[] } {
  const fit = betaVocFromMeasurements(m.points.map((p) => ({ tempC: p.tempC, voc_v: p.voc_V })));
  const warnings = of === 'Voc' ? fit.warnings : [];
  return {
    beta: fit.betaVoc_pct_per_K,
    source: { kind: 'measured', points: m.points.map((p) => ({ ...p, voc_V: r6(p.voc_V) })), span_K: r6(fit.span_K), r2: r6(fit.r2), rule: of === 'Voc' ? MEASURED_RULE : MEASURED_RULE.replace(/Voc/g, 'Vmp'), warnings },
    warnings,
  };
}

/** The source of a coefficient taken from a curve's model. */
export function modelSource(m: StcModel, of: { id: string; deviceId: string }, note: string | null = null): CoefficientSource {
  return { kind: 'model', law: 'ni-power', lawText: MODEL_LAW_TEXT, deviceId: of.deviceId, curveId: of.id, fitTempC: m.fitTempC, cells: m.cells, note };
}

/** Voc at STC for sizing: the highest of the curves with STC figures (worst case), or null when none has one. */
export function highestVocStc(withStc: readonly CurveFacts[], mode: 'batch' | 'curve'): { voc_V: number; source: ModuleSource } | null {
  if (!withStc.length) return null;
  const w = worstModule(withStc.map((x) => ({ deviceId: x.deviceId, voc_v: x.stcVoc_V })));
  const top = withStc[w.index];
  return {
    voc_V: w.voc_v,
    source: {
      kind: mode,
      deviceId: top.deviceId,
      curveId: top.id,
      value_V: r6(w.voc_v),
      modules: w.count,
      mean_V: r6(w.mean_voc_v),
      note: mode === 'batch' ? w.note : `Sized on the one curve chosen (${top.deviceId}, Voc ${r6(w.voc_v)} V at STC).`,
    },
  };
}

/** Vmp at STC for the least modules: the lowest of the curves (not the mean), or null when none has one. */
export function lowestVmpStc(curves: readonly CurveFacts[], mode: 'batch' | 'curve'): { vmp_V: number; source: ModuleSource } | null {
  const withVmp = curves.filter((x) => x.stcVmp_V !== null);
  if (!withVmp.length) return null;
  let low = withVmp[0];
  for (const x of withVmp) if ((x.stcVmp_V as number) < (low.stcVmp_V as number)) low = x;
  const mean = withVmp.reduce((s, x) => s + (x.stcVmp_V as number), 0) / withVmp.length;
  const vmp = low.stcVmp_V as number;
  return {
    vmp_V: vmp,
    source: {
      kind: mode,
      deviceId: low.deviceId,
      curveId: low.id,
      value_V: r6(vmp),
      modules: withVmp.length,
      mean_V: r6(mean),
      note:
        withVmp.length > 1
          ? `The least modules use the lowest Vmp at STC of ${withVmp.length} modules (${low.deviceId}, ${round3(vmp)} V), not the mean (${round3(mean)} V), so that a string reaches the MPP window even if every module were as low.`
          : `Vmp at STC of ${low.deviceId}.`,
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
