/**
 * The quantity columns of the CSV exports (lib/quality/export-columns.ts): each named with the
 * unit its values are written in (a key of lib/vocabulary.ts), FF and efficiency in %, every
 * value rounded to the stated precision, and that precision listed in the README.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { EXPORT_COLUMNS, exportColumnName, exportValue, precisionText } from '@/lib/quality/export-columns';
import { PARAM_KEYS } from '@/lib/quality/params';
import { quantity } from '@/lib/vocabulary';
import { DIMENSIONLESS, unitOfSuffix } from '@/tests/support/export-checks';

describe('export columns', () => {
  it('every parameter has one column, named once, a key of the key table with the unit the value is written in', () => {
    const names = PARAM_KEYS.map(exportColumnName);
    expect(new Set(names).size).toBe(names.length);
    for (const param of PARAM_KEYS) {
      const column = exportColumnName(param);
      const q = quantity(column);
      expect({ column, known: q !== undefined }).toEqual({ column, known: true });
      // The column's unit is the unit the screens show the parameter in (FF in %, not a fraction).
      expect({ column, unit: q!.unit }).toEqual({ column, unit: quantity(param)!.unit });
      expect({ column, suffix: DIMENSIONLESS.has(column) ? '' : unitOfSuffix(column) }).toEqual({ column, suffix: q!.unit });
    }
    expect(exportColumnName('ff')).toBe('ff_pct');
    expect(exportColumnName('efficiency')).toBe('eff_pct');
  });

  it('where the key table fixes decimals for a column, the export uses them', () => {
    for (const param of PARAM_KEYS) {
      const q = quantity(exportColumnName(param))!;
      if (q.decimals !== null) expect({ param, precision: EXPORT_COLUMNS[param].precision }).toEqual({ param, precision: { decimals: q.decimals } });
    }
  });

  it.each([
    // Worked by hand from the stated precision.
    ['ff', 0.713456, 71.35],
    ['ff', 0.7, 70],
    ['efficiency', 0.213449, 21.34],
    ['pmp_w', 401.123456, 401.1235],
    ['rs_ohm', 0.036547, 0.03655],
    ['i0_a', 3.1068e-7, 3.107e-7],
    ['j0_a_cm2', 1.23456e-12, 1.235e-12],
    ['isc_a', -0.00001, 0], // never "-0"
    ['rmse_a', 7.7301e-4, 0.000773],
  ] as const)('exportValue(%s, %p) = %p', (param, stored, written) => {
    const v = exportValue(param, stored);
    expect(v).toBe(written);
    expect(Object.is(v, -0)).toBe(false);
  });

  it('missing stays missing; a non-finite value is refused', () => {
    expect(exportValue('pmp_w', null)).toBeNull();
    expect(exportValue('pmp_w', undefined)).toBeNull();
    expect(() => exportValue('pmp_w', Number.NaN)).toThrow(/not a finite number/);
    expect(() => exportValue('pmp_w', Number.POSITIVE_INFINITY)).toThrow(/not a finite number/);
  });

  it('the benchmark cell keeps three or more significant digits in every column (the smallest device)', () => {
    // Easwarakhanthan et al. 1986 cell, true-current fit and derived figures (tests/fixtures/reference-data/README.md).
    const cell = { isc_a: 0.76026, voc_v: 0.57278, pmp_w: 0.3107, iph_a: 0.760788, i0_a: 3.1068e-7, n: 1.47727, rs_ohm: 0.036547, rsh_ohm: 52.89, rmse_a: 7.7301e-4 } as const;
    for (const [param, value] of Object.entries(cell) as [keyof typeof cell, number][]) {
      const written = exportValue(param, value)!;
      const digits = written.toExponential().split('e')[0].replace(/[-.]/g, '').replace(/^0+/, '').length;
      expect({ param, enough: digits >= 3 || Math.abs(written - value) / value < 5e-3 }).toEqual({ param, enough: true });
    }
  });

  it('the README lists every column with its precision', () => {
    const readme = readFileSync(path.resolve(__dirname, '../../../README.md'), 'utf8');
    for (const param of PARAM_KEYS) {
      const c = EXPORT_COLUMNS[param];
      expect(readme).toMatch(new RegExp(`\`${c.column}\`[^\\n]*\\|[^\\n]*${precisionText(c.precision)}`));
    }
  });
});
