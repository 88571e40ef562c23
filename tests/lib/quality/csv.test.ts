import Papa from 'papaparse';
import { csvSafeCell, passFailRows } from '@/lib/quality/csv';
import { evaluateBatch } from '@/lib/quality/evaluate';
import { parseSpec } from '@/lib/quality/spec';

describe('csvSafeCell() — OWASP CSV-injection rule for strings', () => {
  it.each([
    ['=HYPERLINK("http://x")', `'=HYPERLINK("http://x")`],
    ['+1+2', `'+1+2`],
    ['-2+3', `'-2+3`],
    ['@SUM(A1)', `'@SUM(A1)`],
    ['\tcmd', `'\tcmd`],
    ['\rcmd', `'\rcmd`],
    ['-0.5', `'-0.5`], // a *string* that looks numeric is still escaped
    ['M-001', 'M-001'],
    ['pass', 'pass'],
    ['', ''],
  ])('%p → %p', (input, expected) => {
    expect(csvSafeCell(input)).toBe(expected);
  });

  it.each([
    [-0.5, -0.5],
    [0, 0],
    [3.1068e-7, 3.1068e-7],
    [true, true],
    [null, ''],
    [undefined, ''],
  ])('non-strings stay as they are: %p', (input, expected) => {
    expect(csvSafeCell(input)).toBe(expected);
  });

  it('rejects non-finite numbers', () => {
    expect(() => csvSafeCell(Number.NaN)).toThrow(/not a finite number/);
  });
});

describe('passFailRows()', () => {
  const spec = parseSpec({ name: 's', limits: { pmp_w: { min: 395 }, isc_a: { min: -1 } }, powerClasses: { step_w: 5 } });
  const batch = evaluateBatch(
    [
      { deviceId: '=cmd()', values: { pmp_w: 401, isc_a: -0.25, voc_v: 49.1 }, flags: [] },
      { deviceId: 'M2', values: { pmp_w: 390, isc_a: 10.1 }, flags: [] },
    ],
    spec,
  );
  const rows = passFailRows(batch, { specVersion: 3, releaseState: 'held' });

  it('has the agreed columns in order', () => {
    expect(rows.fields).toEqual([
      'device_id',
      'result',
      'reasons',
      'power_class',
      'outlier',
      'outlier_params',
      'isc_a',
      'voc_v',
      'pmp_w',
      'spec_version',
      'release_state',
    ]);
  });

  it('escapes string cells, keeps numbers numeric and blanks missing values', () => {
    expect(rows.data[0]).toEqual(["'=cmd()", 'pass', '', 'P400', 'no', '', -0.25, 49.1, 401, 3, 'held']);
    expect(rows.data[1]).toEqual(['M2', 'fail', 'pmp_w 390 W is below the minimum 395 W', 'P390', 'no', '', 10.1, '', 390, 3, 'held']);
  });

  it('round-trips through papaparse with the negative current still a number', () => {
    const csv = Papa.unparse(rows);
    const back = Papa.parse<string[]>(csv.trim(), { dynamicTyping: true }).data;
    expect(back[1][0]).toBe("'=cmd()");
    expect(back[1][6]).toBe(-0.25);
  });

  it('follows an explicit parameter list', () => {
    const r = passFailRows(batch, { specVersion: 'v1', releaseState: 'released', params: ['pmp_w'] });
    expect(r.fields.slice(6)).toEqual(['pmp_w', 'spec_version', 'release_state']);
  });
});
