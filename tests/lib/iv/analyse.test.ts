import { readFileSync } from 'node:fs';
import path from 'node:path';
import { analyseCurve } from '@/lib/iv/analyse';
import { singleDiodeVoltage } from '@/lib/iv/diode';
import { parseIvText } from '@/lib/iv/parse';
import type { IvCurve, SingleDiodeParams } from '@/lib/iv/types';
import { REFERENCE_DATA_DIR } from '@/tests/support/reference-data';

const REF_DIR = REFERENCE_DATA_DIR;
const readRef = (file: string) => parseIvText(readFileSync(path.join(REF_DIR, file), 'utf8'), { fileName: file });

describe('analyseCurve()', () => {
  it('returns key figures, flags and both fits in one call', () => {
    const r = analyseCurve(readRef('cell-57mm-33C.csv'), { temp_c: 33, cells: 1 });
    expect(r.fits.map((f) => f.model)).toEqual(['single-diode', 'double-diode']);
    expect(r.fits.every((f) => f.converged)).toBe(true);
    // Single-diode optimum 7.7301e-4 A (reference-data README) within 0.1 %.
    expect(Math.abs((r.fits[0].rmse_a as number) / 7.7301e-4 - 1)).toBeLessThan(1e-3);
    expect(r.flags).toEqual([]);
    expect(r.metrics.ff).toBeGreaterThan(0.7);
  });

  it('says when 25 °C was assumed and when the cell count looks wrong', () => {
    const r = analyseCurve(readRef('module-36cell-45C.csv'), { models: ['single'] });
    const codes = r.flags.map((f) => f.code);
    expect(codes).toContain('temperature-assumed');
    expect(codes).toContain('cells-unknown');
    expect(r.fits).toHaveLength(1);
  });

  it('temperature and cells from the file metadata count as given', () => {
    const curve = readRef('module-36cell-45C.csv');
    curve.meta = { ...curve.meta, temp_c: 45, cells: 36 };
    const r = analyseCurve(curve, { models: ['single'] });
    expect(r.flags.map((f) => f.code)).toEqual(['isc-extrapolated']);
    expect(Math.abs((r.fits[0].rmse_a as number) / 2.053e-3 - 1)).toBeLessThan(1e-3); // README optimum
  });

  it('a stepped curve (bypass diode conducting) is flagged and the single diode cannot follow it', () => {
    // 60-cell module, three 20-cell strings with bypass diodes, one string at 60 % light;
    // parameters written for this test.
    const full: SingleDiodeParams = { iph_a: 9.5, i0_a: 1e-10, n: 1.1, rs_ohm: 0.1, rsh_ohm: 300 };
    const shaded = { ...full, iph_a: 5.7 };
    const pts: [number, number][] = [];
    for (let k = 0; k < 200; k++) {
      const i = (k / 199) * 9.49;
      pts.push([2 * singleDiodeVoltage(full, i, 20, 25) + Math.max(singleDiodeVoltage(shaded, i, 20, 25), -0.5), i]);
    }
    pts.sort((a, b) => a[0] - b[0]);
    const curve: IvCurve = { voltage_v: pts.map((p) => p[0]), current_a: pts.map((p) => p[1]), meta: { cells: 60, temp_c: 25 }, notes: [] };
    const r = analyseCurve(curve, { models: ['single'] });
    const codes = r.flags.map((f) => f.code);
    expect(codes).toContain('step');
    expect(codes).toContain('poor-fit');
  });
});
