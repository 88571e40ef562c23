/**
 * The benchmark's comparison solver (bench/fit-ml.ts, ml-levenberg-marquardt) must reach the
 * engine's optimum, or the benchmark compares the speed of two different answers.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { REFERENCE_DATA_DIR } from '@/tests/support/reference-data';
import { fitSingleDiodeMl } from '@/bench/fit-ml';
import { parseIvText } from '@/lib/iv/parse';

const REF_DIR = REFERENCE_DATA_DIR;
const FILE = 'cell-57mm-33C.csv';
const rel = (a: number | null | undefined, b: number) => Math.abs((a as number) / b - 1);

describe('fitSingleDiodeMl() — cell of Easwarakhanthan et al. (1986), true current', () => {
  it('the ml-levenberg-marquardt path reaches the same cell optimum (comparison solver)', () => {
    const curve = parseIvText(readFileSync(path.join(REF_DIR, FILE), 'utf8'), { fileName: FILE });
    for (const jacobian of ['central', 'analytic'] as const) {
      const fit = fitSingleDiodeMl(curve, { temp_c: 33, cells: 1, jacobian, maxIterations: 30 });
      expect(fit.converged).toBe(true);
      expect(rel(fit.rmse_a, 7.7301e-4)).toBeLessThan(1e-3); // tests/fixtures/reference-data/README.md optimum
    }
  });
});
