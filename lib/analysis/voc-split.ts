/**
 * Why is this lot's Voc lower? The difference of two lots' typical Voc split into the part of the
 * cell temperature, of the light-generated current (Isc, which carries the irradiance) and of the
 * saturation current J0, from the single-diode picture Voc = n·Ns·kT/q·ln(Isc/I0 + 1)
 * (e.g. Green, "Solar Cells", 1982, ch. 5):
 *   ΔVoc ≈ ΔVoc(T) + n·Ns·kT/q·(Δln Isc − Δln I0)
 * Assumptions, said in the answer: both lots at one ideality factor (the mean of the two; what a
 * different n changes is left in `other_v`); the same cell area (then Δln I0 = Δln J0 and
 * Δln Isc = Δln Jsc); I0 moved between temperatures by the n_i-power law of the physics page
 * (I0 ∝ n_i^(2/n), lib/physics/fit-physics); Isc's own small temperature change neglected; series
 * and shunt resistance left in `other_v`. Pure.
 */
import { thermal_voltage_v } from '@/lib/physics/constants';
import { i0AtTemperature } from '@/lib/physics/fit-physics';

/** A lot's typical figures (medians) from its single-diode fits. */
export type LotDiode = { voc_v: number; isc_a: number; i0_a: number; n: number; temp_c: number; cells: number };

export type VocSplit = {
  /** Measured difference, lot b − lot a. */
  delta_voc_v: number;
  temperature_v: number;
  isc_v: number;
  j0_v: number;
  other_v: number;
  /** The ideality factor used for both lots. */
  n: number;
  sentence: string;
};

const mv = (x: number) => `${x >= 0 ? '+' : '−'}${Math.abs(x * 1000).toFixed(0)} mV`;

/** ΔVoc of lot b against lot a, split into temperature, Isc and J0 parts and what is left. */
export function splitVocDifference(a: LotDiode, b: LotDiode, names: { a: string; b: string } = { a: 'the first lot', b: 'this lot' }): VocSplit {
  if (a.cells !== b.cells) throw new Error(`the lots have ${a.cells} and ${b.cells} cells in series; their Voc cannot be compared this way`);
  const n = (a.n + b.n) / 2;
  const ns = a.cells;
  const voc = (isc: number, i0: number, t: number) => n * ns * thermal_voltage_v(t) * Math.log(isc / i0 + 1);
  // Lot b moved to lot a's temperature: its I0 by the n_i-power law, Isc kept.
  const i0bAtA = i0AtTemperature(b.i0_a, b.n, b.temp_c, a.temp_c);
  const temperature_v = voc(b.isc_a, b.i0_a, b.temp_c) - voc(b.isc_a, i0bAtA, a.temp_c);
  const nvt = n * ns * thermal_voltage_v(a.temp_c);
  const isc_v = nvt * Math.log(b.isc_a / a.isc_a);
  const j0_v = -nvt * Math.log(i0bAtA / a.i0_a);
  const delta_voc_v = b.voc_v - a.voc_v;
  const other_v = delta_voc_v - temperature_v - isc_v - j0_v;
  const parts = [
    { v: j0_v, words: `its saturation current J0 is ${i0bAtA > a.i0_a ? 'higher' : 'lower'} (×${(i0bAtA / a.i0_a).toPrecision(3)} at the same temperature: ${i0bAtA > a.i0_a ? 'more' : 'less'} recombination)` },
    { v: isc_v, words: `its Isc is ${b.isc_a > a.isc_a ? 'higher' : 'lower'} by ${Math.abs(100 * (b.isc_a / a.isc_a - 1)).toFixed(1)} % (light or current collection)` },
    { v: temperature_v, words: `it was measured ${Math.abs(b.temp_c - a.temp_c).toFixed(1)} K ${b.temp_c > a.temp_c ? 'warmer' : 'cooler'}` },
  ]
    // Lots at one temperature have no temperature part to speak of.
    .filter((p) => !(p.words.startsWith('it was measured') && a.temp_c === b.temp_c))
    .sort((x, y) => Math.abs(y.v) - Math.abs(x.v));
  const sentence =
    `Voc of ${names.b} differs from ${names.a} by ${mv(delta_voc_v)}: ` +
    parts.map((p) => `${mv(p.v)} because ${p.words}`).join('; ') +
    `; ${mv(other_v)} is left for resistances and a different ideality factor. ` +
    `(Single-diode picture with n = ${n.toFixed(2)} for both lots, the same cell area, J0 moved in temperature as n_i^(2/n).)`;
  return { delta_voc_v, temperature_v, isc_v, j0_v, other_v, n, sentence };
}
