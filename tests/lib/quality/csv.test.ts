import Papa from 'papaparse';
import { csvSafeCell, passFailCsv, passFailRows, toCsv } from '@/lib/quality/csv';
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
  const spec = parseSpec({ name: 's', limits: { pmp_w: { min: 395 }, isc_a: { min: -1 } }, power_classes: { step_w: 5 } });
  const batch = evaluateBatch(
    [
      { device_id: '=cmd()', values: { pmp_w: 401, isc_a: -0.25, voc_v: 49.1 }, flags: [] },
      { device_id: 'M2', values: { pmp_w: 390, isc_a: 10.1 }, flags: [] },
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

  it('gives plain cells: numbers numeric, missing values blank', () => {
    expect(rows.data[0]).toEqual(['=cmd()', 'pass', '', 'P400', 'no', '', -0.25, 49.1, 401, 3, 'held']);
    expect(rows.data[1]).toEqual(['M2', 'fail', 'Pmax 390 W is below the minimum 395 W', 'P390', 'no', '', 10.1, '', 390, 3, 'held']);
  });

  it('writes the CSV with formula text escaped and the negative current still a number, notes last', () => {
    const csv = passFailCsv(batch, { specVersion: 3, releaseState: 'held' }, ['# a note']);
    expect(csv.endsWith('\r\n# a note\r\n')).toBe(true);
    const back = Papa.parse<string[]>(csv.trim(), { dynamicTyping: true }).data;
    expect(back[1][0]).toBe("'=cmd()");
    expect(back[1][6]).toBe(-0.25);
    expect(back[3]).toEqual(['# a note']);
  });

  it('refuses a non-finite figure instead of writing "NaN"', () => {
    const bad = { ...batch, devices: [{ ...batch.devices[0], values: { ...batch.devices[0].values, pmp_w: Number.NaN } }] };
    expect(() => passFailRows(bad, { specVersion: 1, releaseState: 'open' })).toThrow(/not a finite number/);
  });

  it('follows an explicit parameter list', () => {
    const r = passFailRows(batch, { specVersion: 'v1', releaseState: 'released', params: ['pmp_w'] });
    expect(r.fields.slice(6)).toEqual(['pmp_w', 'spec_version', 'release_state']);
  });
});

describe('toCsv() — papaparse escapeFormulae with Quasilevel\'s rule', () => {
  // OWASP CSV Injection: a text cell beginning with = + - @ tab or CR is neutralised by a leading quote.
  it.each([
    ['=1+2', `"'=1+2"`],
    ['+1', `"'+1"`],
    ['-2+3', `"'-2+3"`],
    ['@A1', `"'@A1"`],
    ['\tx', `"'\tx"`],
    ['\rx', `"'\rx"`],
    ['=HYPERLINK("http://x")\nsecond line', `"'=HYPERLINK(""http://x"")\nsecond line"`], // papaparse's default rule misses this one
    ['-0.5', `"'-0.5"`], // text that looks numeric is still text
    ['M-001', 'M-001'],
  ])('%p → %p', (cell, written) => {
    expect(toCsv(['c'], [[cell]])).toBe(`c\r\n${written}`);
  });

  it('leaves numbers, negative ones included, as numbers', () => {
    expect(toCsv(['a', 'b', 'c'], [[-0.5, -3.1e-7, 0]])).toBe('a,b,c\r\n-0.5,-3.1e-7,0');
  });
});
