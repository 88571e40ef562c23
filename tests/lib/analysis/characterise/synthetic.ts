/**
 * Invented module for the characterisation tests: a single-diode model of 60 cells in series
 * written here independently of the engine (its own bisection solver, I0 by the usual T³·exp(−Eg/kT)
 * law of diode physics, e.g. Green, "Solar Cells", 1982, ch. 5), curves made at chosen conditions.
 */
import { keyFigures } from '@/lib/iv/key-figures';
import type { CharCurve } from '@/lib/analysis/characterise';

const K_B = 1.380649e-23;
const Q = 1.602176634e-19;
export type InventedModule = { cells: number; n: number; rs_ohm: number; rsh_ohm: number; iph_stc_a: number; alpha_rel_per_k: number; i0_stc_a: number; eg_ev: number };
export const MODULE: Readonly<InventedModule> = { cells: 60, n: 1.1, rs_ohm: 0.35, rsh_ohm: 400, iph_stc_a: 9.0, alpha_rel_per_k: 0.0005, i0_stc_a: 2e-10, eg_ev: 1.12 };

export function truthCurrent(v: number, g: number, tC: number, m: Readonly<InventedModule> = MODULE): number {
  const t = tC + 273.15;
  const tr = 298.15;
  const iph = (g / 1000) * m.iph_stc_a * (1 + m.alpha_rel_per_k * (tC - 25));
  const i0 = m.i0_stc_a * (t / tr) ** 3 * Math.exp(((m.eg_ev * Q) / K_B) * (1 / tr - 1 / t));
  const a = (m.n * m.cells * K_B * t) / Q;
  const f = (i: number) => iph - i0 * (Math.exp((v + i * m.rs_ohm) / a) - 1) - (v + i * m.rs_ohm) / m.rsh_ohm - i;
  let lo = -50;
  let hi = 50;
  for (let k = 0; k < 200; k++) {
    const mid = (lo + hi) / 2;
    if (f(mid) > 0) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/** Voc of the model by bisection on V at I = 0. */
export function truthVoc(g: number, tC: number): number {
  let lo = 0;
  let hi = 60;
  for (let k = 0; k < 200; k++) {
    const mid = (lo + hi) / 2;
    if (truthCurrent(mid, g, tC) > 0) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/** Pmax of the model by golden-section search on V. */
export function truthPmax(g: number, tC: number): number {
  let a = 0;
  let b = truthVoc(g, tC);
  const r = (Math.sqrt(5) - 1) / 2;
  for (let k = 0; k < 100; k++) {
    const c = b - r * (b - a);
    const d = a + r * (b - a);
    if (c * truthCurrent(c, g, tC) > d * truthCurrent(d, g, tC)) b = d;
    else a = c;
  }
  const v = (a + b) / 2;
  return v * truthCurrent(v, g, tC);
}

export function synthCurve(g: number, tC: number, points = 200): CharCurve {
  const voc = truthVoc(g, tC);
  const voltage_v = Array.from({ length: points }, (_, k) => (k * 1.03 * voc) / (points - 1));
  const current_a = voltage_v.map((v) => truthCurrent(v, g, tC));
  const curve = { voltage_v, current_a, meta: {}, notes: [] };
  const m = keyFigures(curve).metrics;
  return { id: `G${g}-T${tC}`, irradiance_w_m2: g, temp_c: tC, voltage_v, current_a, metrics: m, cells: MODULE.cells };
}
