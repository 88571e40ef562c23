/**
 * The circuit layer (lib/physics/diode.ts) solves through lib/iv's solver; these checks do not
 * use that solver: each answer is put back into the circuit equation
 *   I = Iph − Σ I0k·[exp((V + I·Rs)/(nk·Ns·Vt)) − 1] − (V + I·Rs)/Rsh
 * (DOMAIN.md) and must leave a residual at rounding level.
 */
import { thermal_voltage_v } from '@/lib/physics/constants';
import { circuitBranchCurrents, circuitCurrent, circuitCurve, circuitFigures, circuitVoc, doubleDiodeCircuit, singleDiodeCircuit } from '@/lib/physics/diode';
import type { Circuit } from '@/lib/physics/diode';
import { PhysicsError } from '@/lib/physics/errors';

// Reference data README: 36-cell module at 45 °C, true-current single-diode fit.
const MODULE = { iph_a: 1.031434, i0_a: 2.6381e-6, n: 1.32217, rs_ohm: 1.235634, rsh_ohm: 821.64 };
// A made-up double-diode cell (n1 = 1, n2 = 2) of the size of the README's 57 mm cell.
const DD = { iph_a: 0.7608, i01_a: 2e-10, n1: 1, i02_a: 5e-7, n2: 2, rs_ohm: 0.036, rsh_ohm: 55 };

/** Leftover of the circuit equation at (V, I), A. */
function residual(c: Circuit, cells: number, temp_c: number, v: number, i: number): number {
  const vj = v + i * c.rs_ohm;
  const vt = thermal_voltage_v(temp_c);
  const diodes = c.diodes.reduce((s, d) => s + d.i0_a * Math.expm1(vj / (d.n * cells * vt)), 0);
  return c.iph_a - diodes - vj / c.rsh_ohm - i;
}

describe('circuit answers satisfy the circuit equation', () => {
  it.each([
    ['single diode, module', singleDiodeCircuit(MODULE), 36, 45, [-2, 0, 5, 12, 16, 18]],
    ['single diode, Rs = 0', singleDiodeCircuit({ ...MODULE, rs_ohm: 0 }), 36, 45, [-2, 0, 12, 17]],
    ['double diode, cell', doubleDiodeCircuit(DD), 1, 33, [-0.1, 0, 0.3, 0.5, 0.6]],
    ['double diode, Rs = 0', doubleDiodeCircuit({ ...DD, rs_ohm: 0 }), 1, 33, [0, 0.45, 0.6]],
  ] as const)('%s: current within 1e-12 A of the equation', (_name, c, cells, temp_c, voltages) => {
    for (const v of voltages) {
      const i = circuitCurrent(c, v, cells, temp_c);
      expect(Math.abs(residual(c, cells, temp_c, v, i))).toBeLessThan(1e-12 * Math.max(1, Math.abs(i)));
    }
  });

  it.each([
    ['single', singleDiodeCircuit(MODULE), 36, 45],
    ['double', doubleDiodeCircuit(DD), 1, 33],
  ] as const)('%s: Voc leaves no current (equation at I = 0)', (_name, c, cells, temp_c) => {
    const voc = circuitVoc(c, cells, temp_c);
    expect(Math.abs(residual(c, cells, temp_c, voc, 0))).toBeLessThan(1e-12);
    expect(Math.abs(circuitCurrent(c, voc, cells, temp_c))).toBeLessThan(1e-10);
  });

  it('a circuit without light has no open-circuit voltage above 0 (defined as 0)', () => {
    expect(circuitVoc(singleDiodeCircuit({ ...MODULE, iph_a: 0 }), 36, 45)).toBe(0);
  });

  it('branch currents add up to the terminal current (Kirchhoff) for one and two diodes', () => {
    for (const [c, cells, temp_c, v] of [
      [singleDiodeCircuit(MODULE), 36, 45, 12],
      [doubleDiodeCircuit(DD), 1, 33, 0.48],
    ] as const) {
      const b = circuitBranchCurrents(c, v, cells, temp_c);
      expect(b.diodes_a).toHaveLength(c.diodes.length);
      expect(b.junction_v).toBeCloseTo(v + b.current_a * c.rs_ohm, 14);
      expect(Math.abs(c.iph_a - b.diodes_a.reduce((s, x) => s + x, 0) - b.shunt_a - b.current_a)).toBeLessThan(1e-12);
    }
  });

  it('the maximum power point is one: the sampled curve has no higher power', () => {
    const f = circuitFigures(doubleDiodeCircuit(DD), 1, 33);
    const curve = circuitCurve(doubleDiodeCircuit(DD), 1, 33, { points: 501 });
    const best = Math.max(...curve.voltage_v.map((v, k) => v * curve.current_a[k]));
    expect(best).toBeLessThanOrEqual(f.pmp_w * (1 + 1e-12));
  });

  it('rejects a circuit with no diode, naming it', () => {
    const bad = { iph_a: 1, diodes: [], rs_ohm: 0, rsh_ohm: 10 } as unknown as Circuit;
    expect(() => circuitCurrent(bad, 0, 1, 25)).toThrow(PhysicsError);
    expect(() => circuitCurrent(bad, 0, 1, 25)).toThrow(/diodes/);
  });
});
