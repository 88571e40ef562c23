/**
 * Temperature coefficients α (Isc), β (Voc), γ (Pmax) of one device from curves at (near) one
 * irradiance and several cell temperatures, by a least-squares line of the figure against the
 * cell temperature (lib/analysis/characterise/regression.ts).
 *
 * Rules, stated here:
 * - One irradiance: the curves within ±2 % of a level (the STC window's share, lib/analysis/stc.ts;
 *   common practice). 1000 W/m² is taken when it has enough temperatures, else the level with the
 *   most distinct temperatures. Isc and Pmax are scaled to the level's mean irradiance in
 *   proportion (Isc ∝ G, the assumption of IEC 60891; for Pmax an approximation within ±2 %).
 * - At least 3 curves at 3 distinct temperatures (1 K apart), spanning at least 20 K: fewer leave
 *   no degree of freedom for a standard error, a smaller span makes the slope's error large against
 *   its value (chosen here). IEC 60891 asks for a span of at least 30 K (memory; the standard was
 *   not at hand): below that the result carries a note.
 * - Relative coefficients are the slope over the line's value at 25 °C (% per K), their standard
 *   error the slope's over the same value (the value's own error neglected, said here).
 */
import { fitLine, lineAt } from '@/lib/analysis/characterise/regression';
import type { LineFit } from '@/lib/analysis/characterise/regression';
import type { CharCurve } from '@/lib/analysis/characterise/types';

export const COEFFICIENT_RULES = {
  irradiance_window_pct: 2,
  min_curves: 3,
  min_distinct_temps: 3,
  distinct_temp_k: 1,
  min_span_k: 20,
  recommended_span_k: 30,
} as const;

export type CoefficientKey = 'alpha' | 'beta' | 'gamma';
const FIGURE: Record<CoefficientKey, { metric: 'isc_a' | 'voc_v' | 'pmp_w'; scale: boolean; name: string; unit: string }> = {
  alpha: { metric: 'isc_a', scale: true, name: 'Isc', unit: 'A' },
  beta: { metric: 'voc_v', scale: false, name: 'Voc', unit: 'V' },
  gamma: { metric: 'pmp_w', scale: true, name: 'Pmax', unit: 'W' },
};

export type Coefficient = {
  key: CoefficientKey;
  /** The figure's name (Isc, Voc, Pmax) and unit. */
  figure: string;
  unit: string;
  pct_per_k: number;
  pct_per_k_se: number | null;
  /** Slope in the figure's unit per kelvin (A/K, V/K, W/K) at the group's irradiance. */
  per_k: number;
  per_k_se: number | null;
  /** The line's value at 25 °C. */
  value_at_25c: number;
  r2: number | null;
  /** The points regressed: temperature, °C, and the (scaled) figure. */
  points: { temp_c: number; value: number; curve_id: string }[];
  line: Pick<LineFit, 'slope' | 'intercept'>;
};

export type CoefficientSet = {
  irradiance_w_m2: number;
  curves: number;
  temp_min_c: number;
  temp_max_c: number;
  span_k: number;
  alpha: Coefficient;
  beta: Coefficient;
  gamma: Coefficient;
  notes: string[];
};

/** Irradiance levels: curves within ±window % of the level's first (lowest) irradiance. */
export function irradianceLevels(curves: readonly CharCurve[], windowPct: number = COEFFICIENT_RULES.irradiance_window_pct): CharCurve[][] {
  const sorted = [...curves].sort((a, b) => a.irradiance_w_m2 - b.irradiance_w_m2);
  const levels: CharCurve[][] = [];
  for (const c of sorted) {
    const last = levels[levels.length - 1];
    if (last && c.irradiance_w_m2 <= last[0].irradiance_w_m2 * (1 + (2 * windowPct) / 100)) last.push(c);
    else levels.push([c]);
  }
  return levels;
}

/** Temperature levels: curves within ±window K of the level's first (lowest) temperature. */
export function temperatureLevels(curves: readonly CharCurve[], windowK = 2): CharCurve[][] {
  const sorted = [...curves].sort((a, b) => a.temp_c - b.temp_c);
  const levels: CharCurve[][] = [];
  for (const c of sorted) {
    const last = levels[levels.length - 1];
    if (last && c.temp_c - last[0].temp_c <= 2 * windowK) last.push(c);
    else levels.push([c]);
  }
  return levels;
}

export function distinctTemps(curves: readonly CharCurve[]): number {
  const t = curves.map((c) => c.temp_c).sort((a, b) => a - b);
  let count = 0;
  let last = -Infinity;
  for (const x of t) {
    if (x - last >= COEFFICIENT_RULES.distinct_temp_k) {
      count++;
      last = x;
    }
  }
  return count;
}

const mean = (xs: number[]) => xs.reduce((s, v) => s + v, 0) / xs.length;

/** The level the coefficients are taken at: 1000 W/m² when it has enough temperatures, else the one with the most. */
export function coefficientLevel(curves: readonly CharCurve[]): CharCurve[] | null {
  const levels = irradianceLevels(curves).filter((l) => distinctTemps(l) >= COEFFICIENT_RULES.min_distinct_temps && l.length >= COEFFICIENT_RULES.min_curves);
  if (!levels.length) return null;
  const stc = levels.find((l) => Math.abs(mean(l.map((c) => c.irradiance_w_m2)) / 1000 - 1) * 100 <= COEFFICIENT_RULES.irradiance_window_pct);
  if (stc) return stc;
  return [...levels].sort((a, b) => distinctTemps(b) - distinctTemps(a) || b.length - a.length)[0];
}

function one(key: CoefficientKey, level: CharCurve[], g: number): Coefficient {
  const f = FIGURE[key];
  const points = level.map((c) => ({ temp_c: c.temp_c, value: c.metrics[f.metric] * (f.scale ? g / c.irradiance_w_m2 : 1), curve_id: c.id }));
  const line = fitLine(
    points.map((p) => p.temp_c),
    points.map((p) => p.value),
  );
  const v25 = lineAt(line, 25);
  return {
    key,
    figure: f.name,
    unit: f.unit,
    pct_per_k: (100 * line.slope) / v25,
    pct_per_k_se: line.slope_se === null ? null : (100 * line.slope_se) / Math.abs(v25),
    per_k: line.slope,
    per_k_se: line.slope_se,
    value_at_25c: v25,
    r2: line.r2,
    points,
    line: { slope: line.slope, intercept: line.intercept },
  };
}

/** α, β, γ with their standard errors, or the reason they cannot be had from these curves. */
export function temperatureCoefficients(curves: readonly CharCurve[]): CoefficientSet | { error: string } {
  const R = COEFFICIENT_RULES;
  const level = coefficientLevel(curves);
  if (!level) {
    const best = irradianceLevels(curves).map((l) => distinctTemps(l));
    return {
      error:
        `temperature coefficients need at least ${R.min_curves} curves at ${R.min_distinct_temps} different cell temperatures (${R.distinct_temp_k} K apart) within ±${R.irradiance_window_pct} % of one irradiance; ` +
        `the most these curves have at one irradiance is ${Math.max(0, ...best)}`,
    };
  }
  const g = mean(level.map((c) => c.irradiance_w_m2));
  const temps = level.map((c) => c.temp_c);
  const span = Math.max(...temps) - Math.min(...temps);
  if (span < R.min_span_k) {
    return {
      error: `temperature coefficients need cell temperatures spanning at least ${R.min_span_k} K at one irradiance; the curves at ${g.toFixed(0)} W/m² span ${span.toFixed(1)} K`,
    };
  }
  const notes: string[] = [];
  if (span < R.recommended_span_k) notes.push(`The temperatures span ${span.toFixed(1)} K, less than the ${R.recommended_span_k} K IEC 60891 asks for: the coefficients are less certain.`);
  if (Math.abs(g / 1000 - 1) * 100 > R.irradiance_window_pct) notes.push(`No curves at 1000 W/m² over enough temperatures: the coefficients are those at ${g.toFixed(0)} W/m².`);
  return {
    irradiance_w_m2: g,
    curves: level.length,
    temp_min_c: Math.min(...temps),
    temp_max_c: Math.max(...temps),
    span_k: span,
    alpha: one('alpha', level, g),
    beta: one('beta', level, g),
    gamma: one('gamma', level, g),
    notes,
  };
}
