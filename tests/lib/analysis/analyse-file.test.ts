import { readFileSync } from 'node:fs';
import path from 'node:path';
import { analyseFile } from '@/lib/analysis/analyse-file';
import type { FileAnalysis, FileOverrides } from '@/lib/analysis/analyse-file';
import { compareFits } from '@/lib/analysis/compare-fits';
import { IvInputError } from '@/lib/iv/errors';
import { stcFiguresOf } from '@/lib/schemas/curves';
import { REFERENCE_DATA_DIR } from '@/tests/support/reference-data';

const REF_DIR = REFERENCE_DATA_DIR;
const CELL_CSV = readFileSync(path.join(REF_DIR, 'cell-57mm-33C.csv'), 'utf8');
const bytesOf = (text: string) => new TextEncoder().encode(text);
const single = (r: FileAnalysis) => r.fits.find((f) => f.model === 'single-diode');
const double = (r: FileAnalysis) => r.fits.find((f) => f.model === 'double-diode');

/** The reference cell with metadata lines before the header, written for the precedence tests. */
const withMeta = (lines: string[]) => bytesOf(`${lines.map((l) => `# ${l}`).join('\n')}\n${CELL_CSV}`);

describe('analyseFile() on the 57 mm reference cell at 33 °C, 1000 W/m² (reference-data README)', () => {
  // One run shared by the checks below (a full single + double fit).
  let r: FileAnalysis;
  beforeAll(() => {
    r = analyseFile(bytesOf(CELL_CSV), { fileName: 'cell-57mm-33C.csv', overrides: { temp_c: 33, irradiance_w_m2: 1000, cells: 1 } });
  });

  it('single-diode RMSE 7.7301e-4 A within 0.1 % (true-current optimum, README)', () => {
    const s = single(r);
    expect(s?.converged).toBe(true);
    expect(s?.objective).toBe('true-current');
    expect(Math.abs((s?.rmse_a as number) / 7.7301e-4 - 1)).toBeLessThan(1e-3);
    expect(s?.residuals_a).toHaveLength(26); // 26 points (README)
  });

  it('measured key figures agree with the README’s derived Isc 0.76026 A, Voc 0.57278 V, Pmp 0.31070 W within 0.2 %', () => {
    expect(Math.abs(r.metrics.isc_a / 0.76026 - 1)).toBeLessThan(2e-3);
    expect(Math.abs(r.metrics.voc_v / 0.57278 - 1)).toBeLessThan(2e-3);
    expect(Math.abs(r.metrics.pmp_w / 0.3107 - 1)).toBeLessThan(2e-3);
    // 33 °C with no coefficients: no STC method holds (lib/analysis/stc.ts), which is the one flag.
    expect(r.flags.map((f) => f.code)).toEqual(['stc-unavailable']);
    expect(r.conditions).toEqual({ temp_c: 33, cells: 1, irradiance_w_m2: 1000, idealities: 'fixed' });
  });

  it('without the batch’s coefficients, 8 K from STC, there are no STC figures, and the reason says why', () => {
    expect(r.stc.method).toBe('none');
    expect(stcFiguresOf(r.stc)).toBeNull();
    const reason = r.stc.method === 'none' ? r.stc.reason : '';
    expect(reason).toMatch(/measured at 33\.0 °C and 1000 W\/m², outside ±2 °C/);
    expect(reason).toMatch(/IEC 60891 procedure 1 needs the module type's temperature coefficients α \(Isc\) and β \(Voc\)/);
    expect(reason).toMatch(/only within ±2 K of 25 °C/);
    expect(r.stc.from).toEqual({ irradiance_w_m2: 1000, temp_c: 33 });
  });

  it('with β and γ that the model agrees with, the model moves it to STC: cooling raises Voc and Pmax (Voc falls with temperature, DOMAIN.md)', () => {
    // β −0.35 %/K and γ −0.45 %/K: typical crystalline-silicon values (common practice, docs/domain.md).
    const withCoefficients = analyseFile(bytesOf(CELL_CSV), {
      fileName: 'cell-57mm-33C.csv',
      overrides: { temp_c: 33, irradiance_w_m2: 1000, cells: 1 },
      defaults: { coefficients: { beta_pct_per_k: -0.35, gamma_pct_per_k: -0.45 } },
    });
    const stc = stcFiguresOf(withCoefficients.stc)!;
    expect(stc.method).toBe('model');
    expect(stc.voc_v).toBeGreaterThan(r.metrics.voc_v);
    expect(stc.pmp_w).toBeGreaterThan(r.metrics.pmp_w);
    for (const k of ['isc_a', 'voc_v', 'pmp_w', 'imp_a', 'vmp_v', 'ff'] as const) expect(Number.isFinite(stc[k])).toBe(true);
    expect(stc.efficiency).toBeNull(); // no area given
    // Bound, not a value: an 8 K change moves a silicon cell's Voc by well under 40 mV
    // (|dVoc/dT| < 5 mV/K per cell, common practice); Isc moves by well under 1 %.
    expect(stc.voc_v - r.metrics.voc_v).toBeLessThan(0.04);
    expect(Math.abs(stc.isc_a / r.metrics.isc_a - 1)).toBeLessThan(0.01);
    // Internal consistency: FF = Pmax/(Isc·Voc) at STC too, to 1e-9 relative.
    expect(stc.ff).toBeCloseTo(stc.pmp_w / (stc.isc_a * stc.voc_v), 9);
    expect(stc.inputs?.beta_pct_per_k).toBe(-0.35);
    expect(Math.abs((stc.inputs?.model_beta_pct_per_k as number) / -0.35 - 1)).toBeLessThanOrEqual(0.25);
  });

  it('the fixed-ideality double diode (n1 = 1, n2 = 2) fits worse and loses to the single diode by BIC', () => {
    const d = double(r);
    expect(d?.converged).toBe(true);
    expect(d?.n1).toBe(1);
    expect(d?.n2).toBe(2);
    // README: with n1 = 1, n2 = 2 fixed the cell fits worse, RMSE ≈ 1.356e-3 A (1 % tolerance for the "≈").
    expect(Math.abs((d?.rmse_a as number) / 1.356e-3 - 1)).toBeLessThan(0.01);
    const c = compareFits(single(r), d);
    expect(c?.preferred).toBe('single-diode');
    // Both fits have k = 5 free parameters and m = 26 points, so ΔBIC = 26·ln(SSE2/SSE1) = 52·ln(RMSE2/RMSE1);
    // with the README's RMSEs: 52·ln(1.356e-3/7.7301e-4) = 52·0.562034 = 29.23 (computed by hand in this test).
    expect(c?.delta_bic).toBeCloseTo(52 * Math.log((d?.rmse_a as number) / (single(r)?.rmse_a as number)), 6);
    expect(Math.abs((c?.delta_bic as number) - 29.23)).toBeLessThan(0.6);
    expect(c?.sentence).toContain('even fits worse');
  });
});

describe('analyseFile() metadata precedence: overrides > file metadata > batch defaults', () => {
  // Metadata written for this test: 40 °C, 800 W/m², 2 cells, 20 cm² in the file.
  const FILE_META = ['temperature: 40 °C', 'irradiance: 800 W/m2', 'cells: 2', 'area: 20 cm2'];

  it('the file beats the batch defaults', () => {
    const r = analyseFile(withMeta(FILE_META), { fileName: 'meta.csv', defaults: { cells: 36, area_cm2: 100 } });
    expect(r.conditions).toMatchObject({ temp_c: 40, cells: 2, irradiance_w_m2: 800 });
    expect(r.curve.meta.area_cm2).toBe(20);
    // Efficiency uses the file's area and irradiance: Pmp/(800 W/m² · 20e-4 m²) = Pmp/1.6 W.
    expect(r.metrics.efficiency).toBeCloseTo(r.metrics.pmp_w / 1.6, 12);
    expect(r.stc.from).toEqual({ irradiance_w_m2: 800, temp_c: 40 });
  });

  it('the overrides beat the file', () => {
    const r = analyseFile(withMeta(FILE_META), {
      fileName: 'meta.csv',
      overrides: { temp_c: 33, irradiance_w_m2: 1000, cells: 1, area_cm2: 25 },
      defaults: { cells: 36, area_cm2: 100 },
    });
    expect(r.conditions).toMatchObject({ temp_c: 33, cells: 1, irradiance_w_m2: 1000 });
    expect(r.curve.meta.area_cm2).toBe(25);
    // Pmp/(1000 W/m² · 25e-4 m²) = Pmp/2.5 W.
    expect(r.metrics.efficiency).toBeCloseTo(r.metrics.pmp_w / 2.5, 12);
    // With the true conditions the fit is the README optimum again.
    expect(Math.abs((single(r)?.rmse_a as number) / 7.7301e-4 - 1)).toBeLessThan(1e-3);
  });

  it('an override left blank (null/undefined) does not wipe the file’s value', () => {
    // uploadOverridesSchema turns a blank form field into null, so nulls do reach analyseFile.
    const blank: Record<string, number | null | undefined> = { temp_c: undefined, cells: null, area_cm2: 30 };
    const r = analyseFile(withMeta(FILE_META), { fileName: 'meta.csv', overrides: blank as FileOverrides });
    expect(r.conditions).toMatchObject({ temp_c: 40, cells: 2 });
    expect(r.curve.meta.area_cm2).toBe(30);
  });

  it('the batch defaults fill in only what the file does not say', () => {
    const r = analyseFile(withMeta(['temperature: 33 °C', 'area: 20 cm2']), { fileName: 'partial.csv', defaults: { cells: 1, area_cm2: 100 } });
    expect(r.conditions.cells).toBe(1); // default
    expect(r.curve.meta.area_cm2).toBe(20); // file
    expect(r.conditions.temp_c).toBe(33);
  });

  it('overrides beat the defaults when the file is silent', () => {
    const r = analyseFile(bytesOf(CELL_CSV), { fileName: 'plain.csv', overrides: { cells: 1, area_cm2: 25 }, defaults: { cells: 36, area_cm2: 100 } });
    expect(r.conditions.cells).toBe(1);
    expect(r.curve.meta.area_cm2).toBe(25);
  });

  it('efficiency uses the batch’s area and irradiance when the file has none', () => {
    const r = analyseFile(withMeta(['temperature: 33 °C']), { fileName: 'no-area.csv', defaults: { cells: 1, area_cm2: 25, irradiance_w_m2: 1000 } });
    expect(r.curve.meta).toMatchObject({ area_cm2: 25, irradiance_w_m2: 1000 });
    // By hand: Pmp/(1000 W/m² · 25e-4 m²) = Pmp/2.5 W.
    expect(r.metrics.efficiency).toBeCloseTo(r.metrics.pmp_w / 2.5, 12);
    // The file's irradiance wins over the batch's: Pmp/(800 · 20e-4) = Pmp/1.6 W.
    const f = analyseFile(withMeta(FILE_META), { fileName: 'meta.csv', defaults: { area_cm2: 100, irradiance_w_m2: 1000 } });
    expect(f.metrics.efficiency).toBeCloseTo(f.metrics.pmp_w / 1.6, 12);
  });

  it('with nothing given: 25 °C and 1 cell are assumed and said (flag and STC note), device id from the file name', () => {
    const r = analyseFile(bytesOf(CELL_CSV), { fileName: 'CELL-0007.csv' });
    expect(r.conditions).toEqual({ temp_c: 25, cells: 1, irradiance_w_m2: null, idealities: 'fixed' });
    expect(r.curve.meta.device_id).toBe('CELL-0007');
    expect(r.flags.map((f) => f.code)).toContain('temperature-assumed');
    expect(r.stc.notes).toContain('No irradiance given (file or batch): the measurement was taken as 1000 W/m².');
    expect(r.stc.notes).toContain('No cell temperature given: the measurement was taken as 25 °C.');
    expect(r.metrics.efficiency).toBeNull();
  });
});

describe('analyseFile() on unusable bytes', () => {
  it('throws IvInputError (a clear message for the upload answer), not a crash or NaN', () => {
    expect(() => analyseFile(bytesOf('V,I\n0,1\n'), { fileName: 'short.csv' })).toThrow(IvInputError);
    expect(() => analyseFile(withMeta(['temperature: hot']), { fileName: 'bad-meta.csv' })).toThrow(IvInputError);
  });
});
