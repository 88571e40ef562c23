import Papa from 'papaparse';
import { csvSafeCell, isoUtc, passFailCsv, passFailRows, toCsv } from '@/lib/quality/csv';
import { evaluateBatch } from '@/lib/quality/evaluate';
import { parseSpec } from '@/lib/quality/spec';
import { checkExport } from '@/tests/support/export-checks';

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

describe('passFailRows() and passFailCsv()', () => {
  // Invented devices: a formula-like id, a negative current, FF and efficiency as fractions.
  const spec = parseSpec({ name: 's', limits: { pmp_w: { min: 395 }, isc_a: { min: -1 } }, power_classes: { step_w: 5 } });
  const batch = evaluateBatch(
    [
      { device_id: '=cmd()', values: { pmp_w: 401.123456, isc_a: -0.25, voc_v: 49.1, ff: 0.713456, efficiency: 0.213449 }, flags: [] },
      { device_id: 'M2', values: { pmp_w: 390, isc_a: 10.1 }, flags: [] },
    ],
    spec,
  );
  const at = new Date(Date.UTC(2026, 11, 2, 9, 41, 7, 345));
  const meta = { batchName: 'Lot 7, line "B"', spec: { name: 'Line spec', version: 3 }, releaseState: 'on_hold', exportedAt: at };
  const rows = passFailRows(batch, meta);

  it('has the agreed columns in order: units in the quantity names, provenance last', () => {
    expect(rows.fields).toEqual([
      'device_id',
      'batch_name',
      'result',
      'reasons',
      'power_class',
      'outlier',
      'outlier_params',
      'in_guard_band',
      'isc_a',
      'u_isc_a',
      'voc_v',
      'u_voc_v',
      'pmp_w',
      'u_pmp_w',
      'ff_pct',
      'eff_pct',
      'decision_rule',
      'spec_name',
      'spec_version',
      'release_state',
      'exported_at',
    ]);
  });

  it('gives plain cells: numbers rounded in their column unit (FF and efficiency in %), missing values blank, ISO 8601 UTC time', () => {
    // Worked by hand: 401.123456 W to 4 decimals = 401.1235; FF 0.713456 → 71.3456 % → 71.35; 0.213449 → 21.3449 % → 21.34.
    // These invented devices carry no uncertainty (no setup): the u_ cells are empty.
    expect(rows.data[0]).toEqual(['=cmd()', 'Lot 7, line "B"', 'pass', '', 'P400', 'no', '', 'no', -0.25, '', 49.1, '', 401.1235, '', 71.35, 21.34, 'simple', 'Line spec', 3, 'on_hold', '2026-12-02T09:41:07Z']);
    expect(rows.data[1]).toEqual(['M2', 'Lot 7, line "B"', 'fail', expect.stringMatching(/below the minimum/), 'P390', 'no', '', 'no', 10.1, '', '', '', 390, '', '', '', 'simple', 'Line spec', 3, 'on_hold', '2026-12-02T09:41:07Z']);
  });

  it('writes one header row and one row per device, nothing else, readable by papaparse and by a strict RFC 4180 reader', () => {
    const csv = passFailCsv(batch, meta);
    const read = checkExport(csv, 2);
    expect(read.records[0].device_id).toBe("'=cmd()"); // formula text escaped
    expect(read.records[0].isc_a).toBe('-0.25'); // the negative current is still a number
    expect(read.records.map((r) => r.batch_name)).toEqual(['Lot 7, line "B"', 'Lot 7, line "B"']);
    expect(csv).not.toMatch(/High voltage|caution/i);
    expect(csv.endsWith('\r\n')).toBe(false);
    expect(csv.split('\r\n')).toHaveLength(3);
  });

  it('names outlier parameters by their column', () => {
    const many = Array.from({ length: 12 }, (_, k) => ({ device_id: `D${k}`, values: { pmp_w: 400 + (k % 3) * 0.1, ff: 0.75 + (k % 2) * 0.001 }, flags: [] }));
    many.push({ device_id: 'low-ff', values: { pmp_w: 400, ff: 0.5 }, flags: [] });
    const e = evaluateBatch(many, parseSpec({ name: 'x', limits: {} }), { outlier_params: ['pmp_w', 'ff'] });
    const r = passFailRows(e, meta);
    const low = r.data[r.data.length - 1];
    expect(low[r.fields.indexOf('outlier')]).toBe('yes');
    expect(low[r.fields.indexOf('outlier_params')]).toBe('ff_pct');
  });

  it('refuses a non-finite figure instead of writing "NaN"', () => {
    const bad = { ...batch, devices: [{ ...batch.devices[0], values: { ...batch.devices[0].values, pmp_w: Number.NaN } }] };
    expect(() => passFailRows(bad, meta)).toThrow(/not a finite number/);
  });

  it('follows an explicit parameter list', () => {
    const r = passFailRows(batch, { ...meta, params: ['pmp_w', 'ff'] });
    expect(r.fields.slice(8)).toEqual(['pmp_w', 'u_pmp_w', 'ff_pct', 'decision_rule', 'spec_name', 'spec_version', 'release_state', 'exported_at']);
  });
});

describe('isoUtc()', () => {
  it('writes ISO 8601 in UTC to the second, whatever the time zone', () => {
    expect(isoUtc(new Date('2026-12-02T10:41:07.999+01:00'))).toBe('2026-12-02T09:41:07Z');
    expect(() => isoUtc(new Date('not a date'))).toThrow(/not a valid date/);
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
