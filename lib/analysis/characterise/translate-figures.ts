/**
 * Key figures of a curve moved to other conditions by IEC 60891 procedure 1 or 2
 * (lib/physics/translate.ts). Isc follows from the procedure's current equation directly
 * (procedure 1: Isc2 = Isc1·G2/G1 + α·ΔT; procedure 2: Isc2 = Isc1·(1 + α_rel·ΔT)·G2/G1), because a
 * curve moved to lower irradiance no longer reaches V = 0; Voc and Pmax come from the moved
 * points through the key-figure engine.
 */
import { keyFiguresOfSorted, validateCurve } from '@/lib/iv/key-figures';
import { translateIec60891Proc1, translateIec60891Proc2 } from '@/lib/physics/translate';
import type { Conditions } from '@/lib/physics/translate';
import type { CellFigures, CharCurve } from '@/lib/analysis/characterise/types';

/** Procedure 1 parameters: absolute α (A/K) and β (V/K), Rs (Ω), κ (Ω/K). */
export type Proc1Params = { alpha_a_per_k: number; beta_v_per_k: number; rs_ohm: number; kappa_ohm_per_k: number };
/** Procedure 2 parameters: relative α and β (1/K), the irradiance correction a, Rs′ (Ω), κ′ (Ω/K). */
export type Proc2Params = { alpha_rel_per_k: number; beta_rel_per_k: number; a_irradiance: number; rs_ohm: number; kappa_ohm_per_k: number };

export type Procedure = { procedure: 1; params: Proc1Params } | { procedure: 2; params: Proc2Params };

/** The moved points of the curve. */
export function movedCurve(c: CharCurve, to: Conditions, p: Procedure): { voltage_v: number[]; current_a: number[] } {
  const from = { irradiance_w_m2: c.irradiance_w_m2, temp_c: c.temp_c };
  const arrays = { voltage_v: c.voltage_v, current_a: c.current_a };
  return p.procedure === 1
    ? translateIec60891Proc1(arrays, { from, to, ...p.params, isc1_a: c.metrics.isc_a })
    : translateIec60891Proc2(arrays, { from, to, ...p.params, voc1_v: c.metrics.voc_v });
}

/**
 * Pmax of moved points: the largest V·I, refined by the parabola through it and its neighbours.
 * Needs no Voc, so a curve moved up in irradiance by procedure 1 (whose current rises everywhere
 * and may no longer fall to zero) still has one.
 */
export function movedPmax(c: CharCurve, to: Conditions, p: Procedure): number {
  const m = movedCurve(c, to, p);
  const order = m.voltage_v.map((_, k) => k).sort((a, b) => m.voltage_v[a] - m.voltage_v[b]);
  const v = order.map((k) => m.voltage_v[k]);
  const pw = order.map((k) => m.voltage_v[k] * m.current_a[k]);
  let k = 0;
  for (let j = 1; j < pw.length; j++) if (pw[j] > pw[k]) k = j;
  if (k === 0 || k === pw.length - 1) return pw[k];
  const [x0, x1, x2] = [v[k - 1], v[k], v[k + 1]];
  const [y0, y1, y2] = [pw[k - 1], pw[k], pw[k + 1]];
  const d = (x0 - x1) * (x0 - x2) * (x1 - x2);
  const a = (x2 * (y1 - y0) + x1 * (y0 - y2) + x0 * (y2 - y1)) / d;
  const b = (x2 * x2 * (y0 - y1) + x1 * x1 * (y2 - y0) + x0 * x0 * (y1 - y2)) / d;
  const c0 = y1 - a * x1 * x1 - b * x1;
  if (!(a < 0)) return pw[k];
  const xv = -b / (2 * a);
  return xv > x0 && xv < x2 ? c0 - (b * b) / (4 * a) : pw[k];
}

/** The curve moved to `to`; throws when the moved points have no key figures. */
export function translatedFigures(c: CharCurve, to: Conditions, p: Procedure): CellFigures {
  const dT = to.temp_c - c.temp_c;
  const g = to.irradiance_w_m2 / c.irradiance_w_m2;
  const moved = movedCurve(c, to, p);
  const isc = p.procedure === 1 ? c.metrics.isc_a * g + p.params.alpha_a_per_k * dT : c.metrics.isc_a * (1 + p.params.alpha_rel_per_k * dT) * g;
  const curve = { voltage_v: moved.voltage_v, current_a: moved.current_a, meta: {}, notes: [] };
  const { v, i } = validateCurve(curve);
  const m = keyFiguresOfSorted(v, i, curve, false).metrics;
  return { pmp_w: m.pmp_w, voc_v: m.voc_v, isc_a: isc, ff_pct: (100 * m.pmp_w) / (isc * m.voc_v) };
}
