/**
 * The fit result is a union by model; these helpers are how consumers read a model's
 * parameters. The stored JSON (fit.result) keeps the keys it always had, so a row written before
 * the union — the same object through JSON — must read the same way.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { REFERENCE_DATA_DIR } from '@/tests/support/reference-data';
import { doubleDiodeParamsOf, isDoubleDiodeFit, isSingleDiodeFit, singleDiodeParamsOf } from '@/lib/iv/fit-params';
import { fitDoubleDiode } from '@/lib/iv/fit-double';
import { fitSingleDiode } from '@/lib/iv/fit-single';
import { parseIvText } from '@/lib/iv/parse';
import type { FitResult } from '@/lib/iv/types';

const REF_DIR = REFERENCE_DATA_DIR;
const FILE = 'cell-57mm-33C.csv';
const curve = parseIvText(readFileSync(path.join(REF_DIR, FILE), 'utf8'), { fileName: FILE });

describe('reading parameters from a fit', () => {
  const single = fitSingleDiode(curve, { temp_c: 33, cells: 1 });
  const double = fitDoubleDiode(curve, { temp_c: 33, cells: 1, single });
  const failed = fitSingleDiode(curve, { temp_c: 33, cells: 1, maxEvaluations: 3 });

  it('tells the models apart', () => {
    const fits: FitResult[] = [single, double];
    expect(fits.filter(isSingleDiodeFit)).toEqual([single]);
    expect(fits.filter(isDoubleDiodeFit)).toEqual([double]);
    expect(isSingleDiodeFit(undefined)).toBe(false);
  });

  it('gives the parameters of a converged fit of the asked model only', () => {
    expect(singleDiodeParamsOf(single)).toEqual({ iph_a: single.iph_a, i0_a: single.i0_a, n: single.n, rs_ohm: single.rs_ohm, rsh_ohm: single.rsh_ohm });
    expect(doubleDiodeParamsOf(double)).toEqual({ iph_a: double.iph_a, i01_a: double.i01_a, n1: double.n1, i02_a: double.i02_a, n2: double.n2, rs_ohm: double.rs_ohm, rsh_ohm: double.rsh_ohm });
    expect(singleDiodeParamsOf(double)).toBeNull();
    expect(doubleDiodeParamsOf(single)).toBeNull();
  });

  it('gives nothing for a fit that did not converge', () => {
    expect(failed.converged).toBe(false);
    expect(singleDiodeParamsOf(failed)).toBeNull();
  });

  it('reads a stored row (the flat JSON of before) the same way', () => {
    // A row as the database hands it back: plain JSON with every key of the flat shape.
    const stored = JSON.parse(JSON.stringify(single)) as FitResult;
    expect(Object.keys(stored)).toEqual(expect.arrayContaining(['model', 'iph_a', 'i0_a', 'n', 'rs_ohm', 'rsh_ohm', 'rmse_a', 'stderr', 'converged']));
    expect(singleDiodeParamsOf(stored)).toEqual(singleDiodeParamsOf(single));
    const storedFailed = JSON.parse(JSON.stringify(failed)) as FitResult;
    // A failed fit keeps its model's keys, all null (db rows of failed fits look like this).
    expect(storedFailed).toMatchObject({ model: 'single-diode', iph_a: null, i0_a: null, n: null, rs_ohm: null, rsh_ohm: null });
  });
});
