import { readFileSync } from 'node:fs';
import path from 'node:path';
import { simulateCurve, singleDiodeCurrent, singleDiodeVoltage } from '@/lib/iv/diode';
import { IvInputError } from '@/lib/iv/errors';
import { keyFigures } from '@/lib/iv/key-figures';
import { parseIvText } from '@/lib/iv/parse';
import type { IvCurve, SingleDiodeParams } from '@/lib/iv/types';
import { REFERENCE_DATA_DIR } from '@/tests/support/reference-data';

const REF_DIR = REFERENCE_DATA_DIR;
const readRef = (file: string) => parseIvText(readFileSync(path.join(REF_DIR, file), 'utf8'), { fileName: file });

// Parameters written for these tests (the cell's published optimum, reference-data README).
const CELL: SingleDiodeParams = { iph_a: 0.760788, i0_a: 3.1068e-7, n: 1.47727, rs_ohm: 0.036547, rsh_ohm: 52.89 };

/** Exact key figures of a model, by an independent method written here: bisection and a fine scan. */
function exactFigures(p: SingleDiodeParams, cells: number, temp_c: number) {
  const current = (v: number) => singleDiodeCurrent(p, v, cells, temp_c);
  let lo = 0;
  let hi = 10 * cells;
  for (let k = 0; k < 200; k++) {
    const mid = (lo + hi) / 2;
    if (current(mid) > 0) lo = mid;
    else hi = mid;
  }
  const voc = (lo + hi) / 2;
  // Golden-section search of V·I on (0, Voc): V·I is unimodal there for a diode curve.
  let a = 0;
  let b = voc;
  for (let k = 0; k < 200; k++) {
    const c = a + (b - a) * 0.382;
    const d = a + (b - a) * 0.618;
    if (c * current(c) > d * current(d)) b = d;
    else a = c;
  }
  const vmp = (a + b) / 2;
  return { isc: current(0), voc, vmp, pmp: vmp * current(vmp) };
}

describe('keyFigures() — reference curves (Easwarakhanthan et al. 1986)', () => {
  // Expected: "Derived from the cell's true-current fit: Isc 0.76026 A, Voc 0.57278 V, Pmp 0.31070 W"
  // (reference-data README). The key figures come from the data, not the model, so they may
  // differ by the model's own misfit (RMSE 0.77 mA, about 0.1 %): tolerances say so.
  const { metrics, flags } = keyFigures(readRef('cell-57mm-33C.csv'));
  it.each([
    ['isc_a', 0.76026, 0.0005],
    ['voc_v', 0.57278, 0.0005],
    ['pmp_w', 0.3107, 0.002],
  ] as const)('cell %s ≈ %p (relative tolerance %p)', (key, expected, rel) => {
    expect(Math.abs(metrics[key] / expected - 1)).toBeLessThan(rel);
  });

  it('cell: FF = Pmp/(Isc·Voc), no efficiency without area and irradiance, no flags', () => {
    expect(metrics.ff).toBeCloseTo(metrics.pmp_w / (metrics.isc_a * metrics.voc_v), 12);
    expect(metrics.efficiency).toBeNull();
    expect(flags).toEqual([]);
  });

  it('module: the sweep starts at 0.1248 V, so Isc is extrapolated and says so', () => {
    const r = keyFigures(readRef('module-36cell-45C.csv'));
    expect(r.flags.map((f) => f.code)).toEqual(['isc-extrapolated']);
    expect(r.flags[0].message).toMatch(/starts at 0\.125 V/);
    // First sample 1.0315 A at 0.1248 V (data file). The current rises towards 0 V by about
    // 0.1248 V / Rsh ≈ 0.15 mA with Rsh ≈ 822 Ω (README optimum), so Isc lies just above it.
    expect(r.metrics.isc_a).toBeGreaterThanOrEqual(1.0315);
    expect(r.metrics.isc_a).toBeLessThan(1.0319);
  });
});

describe('keyFigures() — synthetic curves against the exact model figures', () => {
  it.each([
    // [name, params, cells, temp_c, points, rel. tolerance Isc/Voc, rel. tolerance Pmp]
    ['cell, 200 points', CELL, 1, 33, 200, 2e-5, 2e-4],
    ['cell, 26 points', CELL, 1, 33, 26, 1e-3, 1e-3],
    ['72-cell module, 200 points', { iph_a: 10.2, i0_a: 5e-11, n: 1.05, rs_ohm: 0.35, rsh_ohm: 800 }, 72, 25, 200, 2e-5, 2e-4],
  ] as const)('%s', (_name, p, cells, temp_c, points, tol, tolP) => {
    const exact = exactFigures(p, cells, temp_c);
    const curve = simulateCurve(p, { cells, temp_c, points, vMin: -0.05 * exact.voc, vMax: 1.05 * exact.voc });
    const { metrics } = keyFigures(curve);
    expect(Math.abs(metrics.isc_a / exact.isc - 1)).toBeLessThan(tol);
    expect(Math.abs(metrics.voc_v / exact.voc - 1)).toBeLessThan(tol);
    expect(Math.abs(metrics.pmp_w / exact.pmp - 1)).toBeLessThan(tolP);
    expect(metrics.imp_a * metrics.vmp_v).toBeCloseTo(metrics.pmp_w, 12);
  });

  it('slopes: Rsh0 ≈ Rsh + Rs and Rs0 ≈ Rs + a/(Isc + I0) for a dense clean curve', () => {
    const p = CELL;
    const exact = exactFigures(p, 1, 33);
    const curve = simulateCurve(p, { cells: 1, temp_c: 33, points: 400, vMin: -0.05 * exact.voc, vMax: 1.05 * exact.voc });
    const { metrics } = keyFigures(curve);
    // Small-signal resistances of the model (circuit algebra): at V = 0 the diode is nearly off,
    // so dV/dI ≈ −(Rs + Rsh·rd/(Rsh + rd)) with rd ≫ Rsh; at Voc rd = a/(I0·e^{Voc/a}) = a/(Iph − Voc/Rsh + I0).
    const a = p.n * 0.026382; // n·kT/q at 33 °C, kT/q = 26.382 mV (CODATA 2018 constants)
    const rd0 = a / (p.i0_a * Math.exp((exact.isc * p.rs_ohm) / a));
    const rsh0 = p.rs_ohm + (p.rsh_ohm * rd0) / (p.rsh_ohm + rd0);
    const rdOc = a / (p.iph_a - exact.voc / p.rsh_ohm + p.i0_a);
    const rs0 = p.rs_ohm + (p.rsh_ohm * rdOc) / (p.rsh_ohm + rdOc);
    expect(Math.abs((metrics.rsh0_ohm as number) / rsh0 - 1)).toBeLessThan(0.02);
    expect(Math.abs((metrics.rs0_ohm as number) / rs0 - 1)).toBeLessThan(0.02);
  });

  it('efficiency = Pmp/(G·A) when both are known', () => {
    const curve = simulateCurve(CELL, { cells: 1, temp_c: 33, points: 100 });
    curve.meta = { ...curve.meta, irradiance_w_m2: 1000, area_cm2: 25.5 };
    const { metrics } = keyFigures(curve);
    // 25.5 cm² = 2.55e-3 m²; efficiency = Pmp / (1000 W/m² · 2.55e-3 m²) (definition, DOMAIN.md)
    expect(metrics.efficiency).toBeCloseTo(metrics.pmp_w / 2.55, 12);
  });
});

/**
 * A 60-cell module of three 20-cell strings with one bypass diode each; one string gets 60 %
 * of the light. Built in this test from the single-diode voltage of each string at a common
 * current, with each string's voltage clamped at −0.5 V by its bypass diode.
 */
function shadedModule(): IvCurve {
  const full: SingleDiodeParams = { iph_a: 9.5, i0_a: 1e-10, n: 1.1, rs_ohm: 0.1, rsh_ohm: 300 };
  const shaded: SingleDiodeParams = { ...full, iph_a: 0.6 * full.iph_a };
  const points: [number, number][] = [];
  for (let k = 0; k < 200; k++) {
    const i = (k / 199) * full.iph_a * 0.999;
    const v = 2 * singleDiodeVoltage(full, i, 20, 25) + Math.max(singleDiodeVoltage(shaded, i, 20, 25), -0.5);
    points.push([v, i]);
  }
  points.sort((a, b) => a[0] - b[0]);
  return { voltage_v: points.map((p) => p[0]), current_a: points.map((p) => p[1]), meta: { cells: 60, temp_c: 25 }, notes: [] };
}

describe('keyFigures() — flags', () => {
  const codes = (curve: IvCurve) => keyFigures(curve).flags.map((f) => f.code);
  const voc = singleDiodeVoltage(CELL, 0, 1, 33);

  it('a clean dense curve raises no flag', () => {
    expect(codes(simulateCurve(CELL, { cells: 1, temp_c: 33, points: 200, vMin: -0.02, noise_a: 0.0001, seed: 3 }))).toEqual([]);
  });

  it('a bypass-diode step is flagged as a failure and located', () => {
    const r = keyFigures(shadedModule());
    const step = r.flags.find((f) => f.code === 'step');
    expect(step?.severity).toBe('fail');
    expect(step?.message).toMatch(/bypass diode/);
  });

  it('noise of 2 % of Isc is flagged, 0.05 % is not', () => {
    expect(codes(simulateCurve(CELL, { cells: 1, temp_c: 33, points: 200, vMin: -0.02, noise_a: 0.015, seed: 4 }))).toContain('noisy');
    expect(codes(simulateCurve(CELL, { cells: 1, temp_c: 33, points: 200, vMin: -0.02, noise_a: 0.0004, seed: 4 }))).not.toContain('noisy');
  });

  it('a strong shunt (Rsh = 5·Voc/Isc) is flagged', () => {
    const p = { ...CELL, rsh_ohm: (5 * voc) / CELL.iph_a };
    expect(codes(simulateCurve(p, { cells: 1, temp_c: 33, points: 200, vMin: -0.02 }))).toContain('low-shunt');
  });

  it('a high series resistance (Rs = 0.3·Voc/Isc) is flagged', () => {
    const p = { ...CELL, rs_ohm: (0.3 * voc) / CELL.iph_a };
    expect(codes(simulateCurve(p, { cells: 1, temp_c: 33, points: 200, vMin: -0.02 }))).toContain('high-series-resistance');
  });

  it('a sweep stopping just short of Voc is extrapolated with a warning', () => {
    const exact = exactFigures(CELL, 1, 33);
    // End where 2 % of Isc still flows (inside the 5 % extrapolation limit).
    const vEnd = singleDiodeVoltage(CELL, 0.02 * CELL.iph_a, 1, 33);
    const r = keyFigures(simulateCurve(CELL, { cells: 1, temp_c: 33, points: 120, vMin: -0.02, vMax: vEnd }));
    expect(r.flags.map((f) => f.code)).toContain('voc-extrapolated');
    expect(Math.abs(r.metrics.voc_v / exact.voc - 1)).toBeLessThan(0.005);
  });

  it('Voc above 60 V carries the touch-voltage caution', () => {
    const p: SingleDiodeParams = { iph_a: 10, i0_a: 1e-10, n: 1.05, rs_ohm: 0.5, rsh_ohm: 1000 };
    const r = keyFigures(simulateCurve(p, { cells: 144, temp_c: 25, points: 200, vMin: -1 }));
    expect(r.flags.find((f) => f.code === 'high-voltage')?.message).toMatch(/60 V/);
  });
});

describe('keyFigures() — bad curves', () => {
  it.each([
    ['arrays of different length', { voltage_v: [0, 1], current_a: [1], meta: {}, notes: [] }, 'bad-curve'],
    ['too few points', { voltage_v: [0, 0.1, 0.2], current_a: [1, 0.5, -0.1], meta: {}, notes: [] }, 'too-few-points'],
    ['NaN inside', { voltage_v: [...Array(12).keys()], current_a: [1, 1, 1, NaN, 1, 1, 1, 1, 1, 0.5, 0, -1], meta: {}, notes: [] }, 'non-finite'],
    ['never reaches zero current', simulateCurve(CELL, { cells: 1, temp_c: 33, points: 30, vMax: 0.45 }), 'no-voc'],
  ] as const)('%s → IvInputError %s', (_name, curve, code) => {
    let err: unknown;
    try {
      keyFigures(curve as IvCurve);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(IvInputError);
    expect((err as IvInputError).code).toBe(code);
  });
});
