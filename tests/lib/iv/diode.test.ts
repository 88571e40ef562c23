import { KB_EV_PER_K, thermal_voltage_v, ZERO_C_IN_K } from '@/lib/physics/constants';
import {
  doubleDiodeCurrent,
  doubleDiodeVoltage,
  simulateCurve,
  solveDoubleDiodeCurrent,
  singleDiodeCurrent,
  singleDiodeCurrents,
  singleDiodeVoltage,
} from '@/lib/iv/diode';
import { IvInputError } from '@/lib/iv/errors';
import type { DoubleDiodeParams, SingleDiodeParams } from '@/lib/iv/types';

// Parameter sets written for these tests: the 57 mm reference cell's published optimum
// (reference-data README), a modern 72-cell module and a near-ideal cell with tiny Rs.
const CELL: SingleDiodeParams = { iph_a: 0.760788, i0_a: 3.1068e-7, n: 1.47727, rs_ohm: 0.036547, rsh_ohm: 52.89 };
const MODULE72: SingleDiodeParams = { iph_a: 10.2, i0_a: 5e-11, n: 1.05, rs_ohm: 0.35, rsh_ohm: 800 };
const TINY_RS: SingleDiodeParams = { iph_a: 9, i0_a: 1e-12, n: 1, rs_ohm: 1e-9, rsh_ohm: 1e4 };

/** Independent solution written in this test: bisection on the implicit single-diode equation. */
function implicitCurrentByBisection(p: SingleDiodeParams, v: number, cells: number, temp_c: number): number {
  const a = p.n * cells * thermal_voltage_v(temp_c);
  const f = (i: number) => {
    const vd = v + i * p.rs_ohm;
    return p.iph_a - p.i0_a * Math.expm1(vd / a) - vd / p.rsh_ohm - i;
  };
  let lo = -1e4;
  let hi = p.iph_a + p.i0_a + Math.abs(v) / p.rsh_ohm + 1;
  for (let k = 0; k < 300; k++) {
    const mid = (lo + hi) / 2;
    if (f(mid) > 0) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

describe('singleDiodeCurrent() — explicit Lambert W form', () => {
  it.each([
    ['cell', CELL, 1, 33, [-0.2, 0, 0.3, 0.45, 0.5733, 0.65]],
    ['72-cell module', MODULE72, 72, 25, [-5, 0, 30, 40, 48, 60, 90]],
    ['tiny Rs', TINY_RS, 1, 25, [0, 0.5, 0.7, 0.8]],
  ] as const)('%s: agrees with bisection on the implicit equation', (_name, p, cells, temp_c, voltages) => {
    for (const v of voltages) {
      const i = singleDiodeCurrent(p, v, cells, temp_c);
      const ref = implicitCurrentByBisection(p, v, cells, temp_c);
      expect(Number.isFinite(i)).toBe(true);
      expect(Math.abs(i - ref)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(ref)));
    }
  });

  it('does not overflow deep in forward bias of a 72-cell module (V = 2·Voc)', () => {
    const voc = singleDiodeVoltage(MODULE72, 0, 72, 25);
    const i = singleDiodeCurrent(MODULE72, 2 * voc, 72, 25);
    expect(Number.isFinite(i)).toBe(true);
    // The explicit result must still satisfy the implicit equation (independent check).
    const ref = implicitCurrentByBisection(MODULE72, 2 * voc, 72, 25);
    expect(Math.abs(i - ref) / Math.abs(ref)).toBeLessThan(1e-9);
  });

  it('handles Rs = 0 exactly (explicit equation)', () => {
    const p = { ...CELL, rs_ohm: 0 };
    const a = p.n * thermal_voltage_v(33);
    const v = 0.5;
    const direct = p.iph_a - p.i0_a * Math.expm1(v / a) - v / p.rsh_ohm;
    expect(singleDiodeCurrent(p, v, 1, 33)).toBeCloseTo(direct, 14);
  });

  it('vector helper matches the scalar one', () => {
    const vs = [0, 0.2, 0.4, 0.55];
    expect(singleDiodeCurrents(CELL, vs, 1, 33)).toEqual(vs.map((v) => singleDiodeCurrent(CELL, v, 1, 33)));
  });

  it.each([
    [{ ...CELL, i0_a: -1 }, 1, 25],
    [{ ...CELL, rs_ohm: -0.1 }, 1, 25],
    [{ ...CELL, n: Number.NaN }, 1, 25],
    [CELL, 0, 25],
    [CELL, 1.5, 25],
    [CELL, 1, -300],
  ])('rejects bad parameters or conditions with IvInputError (%#)', (p, cells, temp_c) => {
    expect(() => singleDiodeCurrent(p, 0.3, cells, temp_c)).toThrow(IvInputError);
  });
});

describe('singleDiodeVoltage() — inverse of the current', () => {
  it.each([
    ['cell', CELL, 1, 33, [0, 0.1, 0.5, 0.75, -0.2]],
    ['72-cell module', MODULE72, 72, 25, [0, 1, 5, 9.5, 10.1]],
  ] as const)('%s: V(I(V)) round trip', (_name, p, cells, temp_c, currents) => {
    for (const i of currents) {
      const v = singleDiodeVoltage(p, i, cells, temp_c);
      expect(singleDiodeCurrent(p, v, cells, temp_c)).toBeCloseTo(i, 9);
    }
  });

  it('stays accurate when Rsh is huge (no cancellation of two large numbers)', () => {
    const p = { ...CELL, rsh_ohm: 1e12 };
    const voc = singleDiodeVoltage(p, 0, 1, 33);
    // Without shunt Voc = a·ln(Iph/I0 + 1) exactly (Rs carries no current at open circuit).
    const a = p.n * thermal_voltage_v(33);
    expect(voc).toBeCloseTo(a * Math.log(p.iph_a / p.i0_a + 1), 9);
  });
});

describe('doubleDiodeCurrent() — bracketed Newton', () => {
  const DD: DoubleDiodeParams = { iph_a: 0.7608, i01_a: 7.03e-8, n1: 1.364, i02_a: 1e-6, n2: 1.796, rs_ohm: 0.0378, rsh_ohm: 56.3 };

  /** Independent: bisection on the implicit double-diode equation, written in this test. */
  function ddBisection(p: DoubleDiodeParams, v: number, cells: number, temp_c: number): number {
    const vt = cells * thermal_voltage_v(temp_c);
    const f = (i: number) => {
      const vd = v + i * p.rs_ohm;
      return p.iph_a - p.i01_a * Math.expm1(vd / (p.n1 * vt)) - p.i02_a * Math.expm1(vd / (p.n2 * vt)) - vd / p.rsh_ohm - i;
    };
    let lo = -1e4;
    let hi = p.iph_a + p.i01_a + p.i02_a + Math.abs(v) / p.rsh_ohm + 1;
    for (let k = 0; k < 300; k++) {
      const mid = (lo + hi) / 2;
      if (f(mid) > 0) lo = mid;
      else hi = mid;
    }
    return (lo + hi) / 2;
  }

  it.each([-0.3, 0, 0.3, 0.5, 0.57, 0.62, 0.8])('agrees with bisection at %p V', (v) => {
    expect(doubleDiodeCurrent(DD, v, 1, 33)).toBeCloseTo(ddBisection(DD, v, 1, 33), 11);
  });

  it('reduces to the single diode when the second diode vanishes', () => {
    const dd: DoubleDiodeParams = { iph_a: CELL.iph_a, i01_a: CELL.i0_a, n1: CELL.n, i02_a: 1e-300, n2: 2, rs_ohm: CELL.rs_ohm, rsh_ohm: CELL.rsh_ohm };
    for (const v of [0, 0.3, 0.5, 0.6]) expect(doubleDiodeCurrent(dd, v, 1, 33)).toBeCloseTo(singleDiodeCurrent(CELL, v, 1, 33), 12);
  });

  it('voltage at zero current inverts the current', () => {
    const voc = doubleDiodeVoltage(DD, 0, 1, 33);
    expect(Math.abs(doubleDiodeCurrent(DD, voc, 1, 33))).toBeLessThan(1e-12);
  });

  it('is finite for a 72-cell module far past Voc', () => {
    const dd: DoubleDiodeParams = { iph_a: 10, i01_a: 1e-12, n1: 1, i02_a: 1e-7, n2: 2, rs_ohm: 0.4, rsh_ohm: 500 };
    const i = doubleDiodeCurrent(dd, 120, 72, 25);
    expect(Number.isFinite(i)).toBe(true);
    expect(i).toBeLessThan(-10);
  });
});

describe('simulateCurve()', () => {
  it('spans 0 V to just past Voc by default, sorted, generator convention', () => {
    const c = simulateCurve(CELL, { cells: 1, temp_c: 33, points: 50 });
    expect(c.voltage_v).toHaveLength(50);
    expect(c.voltage_v[0]).toBe(0);
    expect(c.current_a[0]).toBeGreaterThan(0.75);
    expect(c.current_a[49]).toBeLessThan(0);
    expect(c.meta).toEqual({ cells: 1, temp_c: 33 });
  });

  it('adds reproducible Gaussian noise of the requested size', () => {
    const clean = simulateCurve(CELL, { cells: 1, temp_c: 33, points: 2000 });
    const a = simulateCurve(CELL, { cells: 1, temp_c: 33, points: 2000, noise_a: 0.002, seed: 5 });
    const b = simulateCurve(CELL, { cells: 1, temp_c: 33, points: 2000, noise_a: 0.002, seed: 5 });
    expect(a.current_a).toEqual(b.current_a);
    const d = a.current_a.map((x, k) => x - clean.current_a[k]);
    const sd = Math.sqrt(d.reduce((s, x) => s + x * x, 0) / d.length);
    // Sample sd of 2000 normal deviates lies within ±5 % of σ with ~97 % probability; seed fixed.
    expect(sd).toBeGreaterThan(0.0019);
    expect(sd).toBeLessThan(0.0021);
  });

  it('accepts double-diode parameters', () => {
    const c = simulateCurve({ iph_a: 1, i01_a: 1e-10, n1: 1, i02_a: 1e-7, n2: 2, rs_ohm: 0.02, rsh_ohm: 100 }, { cells: 1, temp_c: 25, points: 20 });
    expect(c.current_a[19]).toBeLessThan(0);
  });
});

describe('vanishing series resistance', () => {
  // Found by the property tests: for Rs near the smallest doubles, rs·i0·rsh and a/rs over- or
  // underflow. The limit Rs → 0 is the explicit Shockley equation, computed here independently.
  it.each([1e-300, 1e-320, 5e-324])('Rs = %p Ω gives the Rs = 0 current', (rs) => {
    const [iph, i0, a, rsh, v] = [1, 1e-9, 0.03, 100, 0.4];
    const shockley = iph - i0 * (Math.exp(v / a) - 1) - v / rsh;
    const got = singleDiodeCurrent({ iph_a: iph, i0_a: i0, n: 1, rs_ohm: rs, rsh_ohm: rsh }, v, 1, a / KB_EV_PER_K - ZERO_C_IN_K);
    expect(Number.isFinite(got)).toBe(true);
    expect(got).toBeCloseTo(shockley, 9);
  });
});

describe('solveDoubleDiodeCurrent() against bisection (an independent method)', () => {
  // Bisection on F(I) = Iph − I01·(e^(Vd/a1) − 1) − I02·(e^(Vd/a2) − 1) − Vd/Rsh − I, Vd = V + I·Rs,
  // F strictly decreasing: 400 halvings of [−1e6, Iph + 1] A reach the root to the last bit.
  const bisect = (iph: number, i01: number, a1: number, i02: number, a2: number, rs: number, rsh: number, v: number) => {
    const F = (i: number) => iph - i01 * Math.expm1((v + i * rs) / a1) - i02 * Math.expm1((v + i * rs) / a2) - (v + i * rs) / rsh - i;
    let lo = -1e6;
    let hi = iph + 1;
    for (let j = 0; j < 400; j++) {
      const m = (lo + hi) / 2;
      if (F(m) > 0) lo = m;
      else hi = m;
    }
    return (lo + hi) / 2;
  };

  it.each([
    ['a cell, 25 °C', 1, 0.0257],
    ['a 60-cell module, 25 °C', 60, 0.0257],
  ])('%s: within 1e-12 A from short circuit past Voc, near Voc too (where I → 0)', (_name, cells, vt) => {
    let seed = 7;
    const rand = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
    let worst = 0;
    for (let k = 0; k < 40; k++) {
      const iph = 1 + 9 * rand();
      const i01 = 1e-12 * 10 ** (2 * rand());
      const i02 = 1e-8 * 10 ** (2 * rand());
      const a1 = cells * vt;
      const rs = cells * 0.005 * (1 + rand());
      const rsh = cells * 50 * (1 + rand());
      for (let v = 0; v < 0.8 * cells; v += 0.01 * cells) {
        worst = Math.max(worst, Math.abs(solveDoubleDiodeCurrent(iph, i01, a1, i02, 2 * a1, rs, rsh, v) - bisect(iph, i01, a1, i02, 2 * a1, rs, rsh, v)));
      }
    }
    expect(worst).toBeLessThan(1e-12);
  });
});
