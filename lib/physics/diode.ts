/**
 * The equivalent circuit as the physics functions see it: one or two diodes in parallel with a
 * shunt, behind a series resistance, for `cells` identical cells in series.
 *
 *   I = Iph − Σ I0k·[exp((V + I·Rs)/(nk·Ns·Vt)) − 1] − (V + I·Rs)/Rsh
 *
 * A thin layer over the I-V engine's solver (lib/iv/diode.ts: the explicit Lambert W form for
 * one diode, the monotone Newton iteration for two), so the fits, the physics, the translation
 * and the string sizing all evaluate the same model the same way. This layer adds the
 * circuit shape, PhysicsError checks that name the parameter, the maximum power point and the
 * branch currents.
 */
import { goldenMax } from '@/lib/numeric/golden';
import { thermal_voltage_v } from '@/lib/physics/constants';
import { PhysicsError, requireFinite, requireNonNegative, requirePositive } from '@/lib/physics/errors';
import { sdCurrent, sdVoltage, solveDoubleDiodeCurrent, solveDoubleDiodeVoltage } from '@/lib/iv/diode';
import type { DoubleDiodeParams, SingleDiodeParams } from '@/lib/iv/types';

export type DiodeTerm = { i0_a: number; n: number };
/** One diode (single-diode model) or two (double-diode model). */
export type Circuit = { iph_a: number; diodes: [DiodeTerm] | [DiodeTerm, DiodeTerm]; rs_ohm: number; rsh_ohm: number };

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
  // The type allows one or two diodes; a circuit built from JSON is checked all the same.
  const count = (c.diodes as readonly DiodeTerm[]).length;
  if (count !== 1 && count !== 2) throw new PhysicsError('diodes', `a circuit has one or two diodes (got ${count})`);
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

/** A checked circuit with each diode's modified ideality voltage a = n·cells·Vt, V. */
type Junction = { c: Circuit; a: number[] };

// exp() argument cap, as in lib/iv/diode.ts: beyond it the diode current is astronomically large anyway.
const EXP_CAP = 700;

function junction(c: Circuit, cells: number, temp_c: number): Junction {
  checkCircuit(c, cells);
  requireFinite('temp_c', temp_c);
  const vt = thermal_voltage_v(temp_c);
  if (!(vt > 0)) throw new PhysicsError('temp_c', `temp_c must be above absolute zero (got ${temp_c} °C)`);
  return { c, a: c.diodes.map((d) => d.n * cells * vt) };
}

function currentAt(j: Junction, voltage_v: number): number {
  const { c, a } = j;
  const [d1, d2] = c.diodes;
  return d2 === undefined
    ? sdCurrent(c.iph_a, d1.i0_a, a[0], c.rs_ohm, c.rsh_ohm, voltage_v)
    : solveDoubleDiodeCurrent(c.iph_a, d1.i0_a, a[0], d2.i0_a, a[1], c.rs_ohm, c.rsh_ohm, voltage_v);
}

function vocOf(j: Junction): number {
  const { c, a } = j;
  if (c.iph_a <= 0) return 0;
  const [d1, d2] = c.diodes;
  return d2 === undefined
    ? sdVoltage(c.iph_a, d1.i0_a, a[0], c.rs_ohm, c.rsh_ohm, 0)
    : solveDoubleDiodeVoltage(c.iph_a, d1.i0_a, a[0], d2.i0_a, a[1], c.rs_ohm, c.rsh_ohm, 0);
}

/** Terminal current I(V), A, of the circuit at cell temperature temp_c (°C). */
export function circuitCurrent(c: Circuit, voltage_v: number, cells: number, temp_c: number): number {
  requireFinite('voltage_v', voltage_v);
  const j = junction(c, cells, temp_c);
  return currentAt(j, voltage_v);
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
export function circuitVoc(c: Circuit, cells: number, temp_c: number): number {
  return vocOf(junction(c, cells, temp_c));
}

/** Isc, Voc, maximum power point (golden-section search on P(V)) and fill factor of the circuit. */
export function circuitFigures(c: Circuit, cells: number, temp_c: number): CircuitFigures {
  const j = junction(c, cells, temp_c);
  if (!(c.iph_a > 0)) throw new PhysicsError('iph_a', `iph_a must be greater than 0 for key figures (got ${c.iph_a})`);
  const isc_a = currentAt(j, 0);
  const voc_v = vocOf(j);
  const power = (v: number) => v * currentAt(j, v);
  const vmp_v = goldenMax(power, 0, voc_v, 1e-12 * voc_v);
  const imp_a = currentAt(j, vmp_v);
  const pmp_w = vmp_v * imp_a;
  return { isc_a, voc_v, pmp_w, vmp_v, imp_a, ff: isc_a > 0 && voc_v > 0 ? pmp_w / (isc_a * voc_v) : 0 };
}

/** The circuit's curve sampled at `points` voltages from v_min_v (default 0) to v_max_v (default Voc). */
export function circuitCurve(
  c: Circuit,
  cells: number,
  temp_c: number,
  options: { points?: number; v_min_v?: number; v_max_v?: number } = {},
): { voltage_v: number[]; current_a: number[] } {
  const j = junction(c, cells, temp_c);
  const points = options.points ?? 101;
  if (!Number.isInteger(points) || points < 2 || points > 100000) {
    throw new PhysicsError('points', `points must be a whole number from 2 to 100000 (got ${points})`);
  }
  const vMin = requireFinite('v_min_v', options.v_min_v ?? 0);
  const vMax = requireFinite('v_max_v', options.v_max_v ?? vocOf(j));
  if (!(vMax > vMin)) throw new PhysicsError('v_max_v', `v_max_v must be above v_min_v (got ${vMax} ≤ ${vMin})`);
  const voltage_v: number[] = [];
  const current_a: number[] = [];
  for (let i = 0; i < points; i++) {
    const v = vMin + ((vMax - vMin) * i) / (points - 1);
    voltage_v.push(v);
    current_a.push(currentAt(j, v));
  }
  return { voltage_v, current_a };
}

/** Per-diode currents, A, at terminal voltage V (what each recombination path carries there). */
export function circuitBranchCurrents(
  c: Circuit,
  voltage_v: number,
  cells: number,
  temp_c: number,
): { current_a: number; junction_v: number; diodes_a: number[]; shunt_a: number } {
  requireFinite('voltage_v', voltage_v);
  const j = junction(c, cells, temp_c);
  const current_a = currentAt(j, voltage_v);
  const vj = voltage_v + current_a * c.rs_ohm;
  const diodes_a = c.diodes.map((d, k) => d.i0_a * (Math.exp(Math.min(vj / j.a[k], EXP_CAP)) - 1));
  return { current_a, junction_v: vj, diodes_a, shunt_a: vj / c.rsh_ohm };
}
