/**
 * A small equivalent-circuit solver for the physics functions: any number of diodes in
 * parallel with a shunt, behind a series resistance, for `cells` identical cells in series.
 *
 *   I = Iph − Σ I0k·[exp((V + I·Rs)/(nk·Ns·Vt)) − 1] − (V + I·Rs)/Rsh
 *
 * Solved per point for the junction voltage Vj = V + I·Rs (the residual is strictly decreasing
 * in Vj) by Newton's method inside an expanding bracket, so it also covers the double-diode
 * model, which has no closed form.
 */
import { goldenMax } from '@/lib/numeric/golden';
import { thermalVoltage_V } from '@/lib/physics/constants';
import { PhysicsError, requireFinite, requireNonNegative, requirePositive } from '@/lib/physics/errors';
import type { DoubleDiodeParams, SingleDiodeParams } from '@/lib/iv/types';

export type DiodeTerm = { i0_a: number; n: number };
export type Circuit = { iph_a: number; diodes: DiodeTerm[]; rs_ohm: number; rsh_ohm: number };

/** The single-diode parameters as a circuit. */
export function singleDiodeCircuit(p: SingleDiodeParams): Circuit {
  return { iph_a: p.iph_a, diodes: [{ i0_a: p.i0_a, n: p.n }], rs_ohm: p.rs_ohm, rsh_ohm: p.rsh_ohm };
}

/** The double-diode parameters as a circuit. */
export function doubleDiodeCircuit(p: DoubleDiodeParams): Circuit {
  return {
    iph_a: p.iph_a,
    diodes: [
      { i0_a: p.i01_a, n: p.n1 },
      { i0_a: p.i02_a, n: p.n2 },
    ],
    rs_ohm: p.rs_ohm,
    rsh_ohm: p.rsh_ohm,
  };
}

/** Throws a PhysicsError naming the first unphysical parameter. */
export function checkCircuit(c: Circuit, cells: number): void {
  requireFinite('iph_a', c.iph_a);
  c.diodes.forEach((d, k) => {
    requirePositive(c.diodes.length === 1 ? 'i0_a' : `i0${k + 1}_a`, d.i0_a);
    requirePositive(c.diodes.length === 1 ? 'n' : `n${k + 1}`, d.n);
  });
  requireNonNegative('rs_ohm', c.rs_ohm);
  requirePositive('rsh_ohm', c.rsh_ohm);
  if (!Number.isInteger(cells) || cells < 1 || cells > 10000) {
    throw new PhysicsError('cells', `cells must be a whole number from 1 to 10000 (got ${cells})`);
  }
}

type Junction = { scale: number[]; c: Circuit };

// exp() argument cap: beyond it the diode current is astronomically large anyway.
const EXP_CAP = 700;

function diodeCurrents(j: Junction, vj: number): { total: number; slope: number; each: number[] } {
  let total = 0;
  let slope = 0;
  const each: number[] = [];
  j.c.diodes.forEach((d, k) => {
    const x = Math.min(vj / j.scale[k], EXP_CAP);
    const e = Math.exp(x);
    const i = d.i0_a * (e - 1);
    each.push(i);
    total += i;
    slope += (d.i0_a * e) / j.scale[k];
  });
  return { total, slope, each };
}

function junction(c: Circuit, cells: number, tempC: number): Junction {
  checkCircuit(c, cells);
  requireFinite('tempC', tempC);
  const vt = thermalVoltage_V(tempC);
  if (!(vt > 0)) throw new PhysicsError('tempC', `tempC must be above absolute zero (got ${tempC} °C)`);
  return { scale: c.diodes.map((d) => d.n * cells * vt), c };
}

/** Junction voltage at terminal voltage V: root of Iph − D(Vj) − Vj/Rsh − (Vj − V)/Rs. */
function solveJunction(j: Junction, voltage_V: number): number {
  const { c } = j;
  if (c.rs_ohm === 0) return voltage_V;
  const residual = (vj: number) => {
    const d = diodeCurrents(j, vj);
    return {
      r: c.iph_a - d.total - vj / c.rsh_ohm - (vj - voltage_V) / c.rs_ohm,
      dr: -d.slope - 1 / c.rsh_ohm - 1 / c.rs_ohm,
    };
  };
  let lo = voltage_V;
  let hi = voltage_V;
  let step = Math.max(1e-3, c.rs_ohm * Math.abs(c.iph_a));
  if (residual(voltage_V).r > 0) {
    for (hi = voltage_V + step; residual(hi).r > 0; hi += step) step *= 2;
  } else {
    for (lo = voltage_V - step; residual(lo).r < 0; lo -= step) step *= 2;
  }
  let vj = 0.5 * (lo + hi);
  for (let iter = 0; iter < 200; iter++) {
    const { r, dr } = residual(vj);
    if (r > 0) lo = vj;
    else hi = vj;
    if (r === 0) return vj;
    let next = vj - r / dr;
    if (Math.abs(next - vj) <= 4e-16 * Math.max(1, Math.abs(vj)) && next >= lo && next <= hi) return next;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (hi - lo <= 4e-16 * Math.max(1, Math.abs(vj))) return next;
    vj = next;
  }
  return vj;
}

/** Terminal current I(V), A, of the circuit at cell temperature tempC (°C). */
export function circuitCurrent(c: Circuit, voltage_V: number, cells: number, tempC: number): number {
  requireFinite('voltage_V', voltage_V);
  const j = junction(c, cells, tempC);
  return currentAt(j, voltage_V);
}

function currentAt(j: Junction, voltage_V: number): number {
  const vj = solveJunction(j, voltage_V);
  if (j.c.rs_ohm === 0) return j.c.iph_a - diodeCurrents(j, vj).total - vj / j.c.rsh_ohm;
  return (vj - voltage_V) / j.c.rs_ohm;
}

function vocOf(j: Junction): number {
  const { c } = j;
  if (c.iph_a <= 0) return 0;
  // At I = 0 the junction voltage is the terminal voltage.
  const f = (v: number) => c.iph_a - diodeCurrents(j, v).total - v / c.rsh_ohm;
  let lo = 0;
  let hi = 0.1 * j.scale[0];
  while (f(hi) > 0) {
    lo = hi;
    hi *= 2;
  }
  let v = 0.5 * (lo + hi);
  for (let iter = 0; iter < 200; iter++) {
    const r = f(v);
    if (r > 0) lo = v;
    else hi = v;
    const dr = -diodeCurrents(j, v).slope - 1 / c.rsh_ohm;
    if (r === 0) return v;
    let next = v - r / dr;
    if (Math.abs(next - v) <= 4e-16 * Math.max(1, v) && next >= lo && next <= hi) return next;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (hi - lo <= 4e-16 * Math.max(1, v)) return next;
    v = next;
  }
  return v;
}

/** Model key figures and, optionally, a sampled curve. */
export type CircuitFigures = {
  isc_a: number;
  voc_v: number;
  pmp_w: number;
  vmp_v: number;
  imp_a: number;
  ff: number;
};

/** Open-circuit voltage, V. */
export function circuitVoc(c: Circuit, cells: number, tempC: number): number {
  return vocOf(junction(c, cells, tempC));
}

/** Isc, Voc, maximum power point (golden-section search on P(V)) and fill factor of the circuit. */
export function circuitFigures(c: Circuit, cells: number, tempC: number): CircuitFigures {
  const j = junction(c, cells, tempC);
  if (!(c.iph_a > 0)) throw new PhysicsError('iph_a', `iph_a must be greater than 0 for key figures (got ${c.iph_a})`);
  const isc_a = currentAt(j, 0);
  const voc_v = vocOf(j);
  const power = (v: number) => v * currentAt(j, v);
  const vmp_v = goldenMax(power, 0, voc_v, 1e-12 * voc_v);
  const imp_a = currentAt(j, vmp_v);
  const pmp_w = vmp_v * imp_a;
  return { isc_a, voc_v, pmp_w, vmp_v, imp_a, ff: isc_a > 0 && voc_v > 0 ? pmp_w / (isc_a * voc_v) : 0 };
}

/** The circuit's curve sampled at `points` voltages from vMin_V (default 0) to vMax_V (default Voc). */
export function circuitCurve(
  c: Circuit,
  cells: number,
  tempC: number,
  options: { points?: number; vMin_V?: number; vMax_V?: number } = {},
): { voltage_V: number[]; current_A: number[] } {
  const j = junction(c, cells, tempC);
  const points = options.points ?? 101;
  if (!Number.isInteger(points) || points < 2 || points > 100000) {
    throw new PhysicsError('points', `points must be a whole number from 2 to 100000 (got ${points})`);
  }
  const vMin = requireFinite('vMin_V', options.vMin_V ?? 0);
  const vMax = requireFinite('vMax_V', options.vMax_V ?? vocOf(j));
  if (!(vMax > vMin)) throw new PhysicsError('vMax_V', `vMax_V must be above vMin_V (got ${vMax} ≤ ${vMin})`);
  const voltage_V: number[] = [];
  const current_A: number[] = [];
  for (let i = 0; i < points; i++) {
    const v = vMin + ((vMax - vMin) * i) / (points - 1);
    voltage_V.push(v);
    current_A.push(currentAt(j, v));
  }
  return { voltage_V, current_A };
}

/** Per-diode currents, A, at terminal voltage V (what each recombination path carries there). */
export function circuitBranchCurrents(
  c: Circuit,
  voltage_V: number,
  cells: number,
  tempC: number,
): { current_A: number; junction_V: number; diodes_A: number[]; shunt_A: number } {
  requireFinite('voltage_V', voltage_V);
  const j = junction(c, cells, tempC);
  const vj = solveJunction(j, voltage_V);
  const d = diodeCurrents(j, vj);
  return { current_A: currentAt(j, voltage_V), junction_V: vj, diodes_A: d.each, shunt_A: vj / c.rsh_ohm };
}
