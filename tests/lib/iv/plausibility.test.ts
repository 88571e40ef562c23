/**
 * Unphysical results are said: n per cell outside 0.9–2.5, Voc per cell outside 0.3–0.95 V, a fit
 * pressed against an impossible parameter, and a cell count that contradicts Voc (with the nearest
 * plausible count from common designs). The ranges are rules of thumb (common practice,
 * lib/iv/plausibility.ts); the module voltages below are invented unless a file is named.
 * Reference module: 36 cells at 45 °C, Easwarakhanthan et al. (1986), tests/fixtures/reference-data.
 */
import { analyseFile } from '@/lib/analysis/analyse-file';
import { cellCountCheck, fitPlausibilityFlags, suggestCells, vocPerCellFlag } from '@/lib/iv/plausibility';
import type { SingleDiodeFit } from '@/lib/iv/types';
import { REFERENCE_MODULE, readReference } from '@/tests/support/reference-data';

const bytes = (text: string) => new TextEncoder().encode(text);

describe('a 36-cell module uploaded under a batch default of 60 cells (the reference module at 45 °C)', () => {
  const r = analyseFile(bytes(readReference(REFERENCE_MODULE)), { fileName: 'module.csv', overrides: { temp_c: 45, irradiance_w_m2: 1000 }, defaults: { cells: 60 } });
  const byCode = new Map(r.flags.map((f) => [f.code, f.message]));

  it('the fits use the 60 cells given, and a flag says the count contradicts Voc and suggests 36', () => {
    expect(r.conditions.cells).toBe(60);
    // By hand: Voc ≈ 16.8 V (README fit), 16.8/60 = 0.28 V a cell; at 25 °C about 0.28 + 20·0.0022 = 0.32 V.
    expect(byCode.get('cells-check')).toMatch(/over 60 cells is 0\.28 V a cell \(0\.32 V at 25 °C and 1000 W\/m²\), outside the 0\.50–0\.75 V/);
    // 36 cells: 16.8/36 = 0.47 V a cell (0.51 V at 25 °C): inside; the nearest plausible count to 60.
    expect(byCode.get('cells-check')).toMatch(/36 cells would give 0\.47 V a cell \(a common design\)\. The fits used 60 cells as given/);
  });

  it('Voc per cell below 0.3 V and the fitted n below 0.9 are flagged as unphysical', () => {
    expect(byCode.get('voc-per-cell-unphysical')).toMatch(/Voc per cell is 0\.28 V \(16\.8 V over 60 cells\), outside the 0\.3–0\.95 V/);
    expect(byCode.get('ideality-unphysical')).toMatch(/n = 0\.\d+ per cell, outside the 0\.9–2\.5/);
  });

  it('with the right count (36) none of these flags is raised', () => {
    const ok = analyseFile(bytes(readReference(REFERENCE_MODULE)), { fileName: 'module.csv', overrides: { temp_c: 45, irradiance_w_m2: 1000, cells: 36 } });
    const codes = ok.flags.map((f) => f.code);
    for (const c of ['cells-check', 'voc-per-cell-unphysical', 'ideality-unphysical', 'fit-parameter-impossible']) expect(codes).not.toContain(c);
  });
});

describe('suggestCells(): the most common design whose Voc per cell fits', () => {
  it.each([
    // [Voc (V) at 25 °C and 1000 W/m², expected suggestion, why (by hand)]
    [40.5, 60, '40.5/60 = 0.675 V; 54 (0.75) and 66 (0.61) fit too, 60 is the more common design'],
    [48.6, 72, '48.6/72 = 0.675 V; 60 gives 0.81 V, too high; 66 and 78 fit but are less common'],
    [21.6, 36, '21.6/36 = 0.60 V; 32 (0.675) and 40 (0.54) fit too, 36 is the more common'],
    [0.68, 1, 'one cell'],
  ])('Voc %f V → %i (%s)', (voc, expected) => {
    const s = suggestCells(voc, 25, 1000);
    expect(s.cells).toBe(expected);
    expect(s.common).toBe(true);
  });

  it('a modern 36-cell module (21.6 V) under a batch default of 60 gets 36 suggested, not the count nearest 60', () => {
    const c = cellCountCheck({ voc_v: 21.6 }, 60, 25, 1000);
    expect(c.cells).toBe(60);
    expect(c.flag?.message).toMatch(/36 cells would give 0\.60 V a cell \(a common design\)/);
  });

  it('a voltage no common design fits is divided by 0.625 V a cell and said not to be a common design', () => {
    // 3.1 V: 3.1/0.625 = 4.96 → 5 cells (0.62 V a cell).
    const s = suggestCells(3.1, 25, 1000);
    expect(s).toEqual({ cells: 5, common: false, voc_per_cell_v: 3.1 / 5 });
    const c = cellCountCheck({ voc_v: 3.1 }, undefined, 25, 1000);
    expect(c.cells).toBe(5);
    expect(c.flag?.message).toMatch(/5 cells would give 0\.62 V a cell \(not one of the common module designs/);
  });

  it('a missing count above one cell’s Voc is suggested and used, and the flag says so', () => {
    const c = cellCountCheck({ voc_v: 40.5 }, undefined, 25, 1000);
    expect(c.cells).toBe(60);
    expect(c.flag?.code).toBe('cells-unknown');
    expect(c.flag?.message).toMatch(/The fits used 60 cells in series/);
    expect(cellCountCheck({ voc_v: 0.68 }, undefined, 25, 1000)).toEqual({ cells: 1, flag: null });
  });

  it('a given count that fits is used without a flag; one that does not is used and questioned', () => {
    expect(cellCountCheck({ voc_v: 40.5 }, 72, 25, 1000)).toEqual({ cells: 72, flag: null }); // 0.5625 V a cell
    const c = cellCountCheck({ voc_v: 40.5 }, 96, 25, 1000); // 0.42 V a cell
    expect(c.cells).toBe(96);
    expect(c.flag?.code).toBe('cells-check');
    // Plausible: 54 (0.75), 60, 66, 72 (0.5625), 78 (0.519); 60 is the most common of them.
    expect(c.flag?.message).toMatch(/60 cells would give 0\.68 V a cell/);
  });
});

describe('vocPerCellFlag() and fitPlausibilityFlags()', () => {
  it('Voc per cell outside 0.3–0.95 V is flagged; inside it is not', () => {
    expect(vocPerCellFlag(16.8, 60)?.code).toBe('voc-per-cell-unphysical'); // 0.28 V
    expect(vocPerCellFlag(16.8, 36)).toBeNull(); // 0.467 V
    expect(vocPerCellFlag(1.2, 1)?.message).toMatch(/1\.20 V/); // above 0.95 V
  });

  /** A converged single-diode fit with invented parameters. */
  const fit = (over: Partial<SingleDiodeFit>): SingleDiodeFit => ({
    model: 'single-diode',
    objective: 'true-current',
    iph_a: 9.5,
    i0_a: 1e-9,
    n: 1.1,
    rs_ohm: 0.3,
    rsh_ohm: 400,
    rmse_a: 0.01,
    rmse_true_current_a: 0.01,
    max_residual_a: 0.02,
    residuals_a: [],
    evaluations: 20,
    converged: true,
    elapsed_ms: 1,
    stderr: {},
    ...over,
  });

  it.each([
    [{ n: 0.55 }, ['ideality-unphysical']],
    [{ n: 2.8 }, ['ideality-unphysical']],
    [{ rs_ohm: 0, at_bounds: ['rs_ohm'] }, ['fit-parameter-impossible']],
    [{ iph_a: 0, at_bounds: ['iph_a'] }, ['fit-parameter-impossible']],
    [{ i0_a: 9.5, at_bounds: ['i0_a'] }, ['fit-parameter-impossible']],
    [{}, []],
    [{ n: 0.9 }, []],
    [{ n: 2.5 }, []],
  ])('%j → %j', (over, codes) => {
    expect(fitPlausibilityFlags(fit(over)).map((f) => f.code)).toEqual(codes);
  });

  it('the impossible parameter is named in words', () => {
    expect(fitPlausibilityFlags(fit({ rs_ohm: 0, at_bounds: ['rs_ohm'] }))[0].message).toMatch(/it would need a series resistance below 0 Ω/);
    expect(fitPlausibilityFlags(fit({ i0_a: 9.5, at_bounds: ['i0_a'] }))[0].message).toMatch(/a saturation current as large as Isc/);
  });
});
