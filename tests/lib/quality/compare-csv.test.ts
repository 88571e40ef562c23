/**
 * The comparison CSV (lib/quality/compare-csv.ts): one header row and one row per device, nothing
 * else, units in the column names, FF and efficiency in %, the batch, spec, release state and
 * export time on every row — read back with papaparse and with the strict RFC 4180 reader.
 * Invented rows.
 */
import type { CompareRow } from '@/lib/quality/compare-table';
import { comparisonColumnName, comparisonCsv, comparisonFileName, comparisonRows } from '@/lib/quality/compare-csv';
import { ALL_COLUMNS } from '@/lib/compare-columns';
import { checkExport } from '@/tests/support/export-checks';

const TRICKY = ['M-1, left', 'M "quoted"', 'two\r\nlines', 'bare\nfeed', '=HYPERLINK("http://evil.example","x")', '+SUM(1,1)', '@A1', '-2+3', ' padded ', 'Ωmega°'];

function row(device_id: string, batch: 'a' | 'b', k: number): CompareRow {
  return {
    curve_id: `c-${batch}-${k}`,
    batch_id: batch,
    batch_name: batch === 'a' ? 'Lot A, line 1' : '=Lot B',
    device_id,
    cells: 60,
    flags: k % 2 ? ['step', 'low_rsh'] : [],
    result: k % 3 ? 'pass' : 'fail',
    reasons: k % 3 ? [] : ['FF 59.2 % is below the minimum 70.0 %', 'Pmax 290 W is below the minimum 300 W'],
    power_class: k % 3 ? 'P400' : null,
    outlier: k === 1,
    isc_a: 10.123456 + k,
    voc_v: 49.56789,
    pmp_w: 401.123456,
    ff: 0.713456,
    efficiency: 0.213449,
    i0_a: 3.1068e-7,
    rs_ohm: k === 2 ? null : 0.36547,
  };
}

const rows = TRICKY.map((id, k) => row(id, k < 5 ? 'a' : 'b', k));
const batches = [
  { id: 'a', name: 'Lot A, line 1', state: 'released' },
  { id: 'b', name: '=Lot B', state: 'open' },
];
const exportedAt = new Date(Date.UTC(2026, 11, 2, 9, 41, 7));

describe('comparisonCsv()', () => {
  it('every column of the grid: one row per device, names with units, numbers rounded, provenance on every row', () => {
    const text = comparisonCsv({ rows, batches, spec: { name: 'Line "release"', version: 4 }, exportedAt });
    const read = checkExport(text, rows.length);
    expect(read.header.slice(0, 2)).toEqual(['device_id', 'batch_name']);
    expect(read.header).toEqual(expect.arrayContaining(['isc_a', 'voc_v', 'pmp_w', 'ff_pct', 'eff_pct', 'i0_a', 'rs_ohm', 'flags', 'reasons', 'outlier']));
    expect(read.header).not.toContain('ff');
    expect(read.header).not.toContain('efficiency');
    expect(read.header.slice(-4)).toEqual(['spec_name', 'spec_version', 'release_state', 'exported_at']);
    read.records.forEach((r, k) => {
      // FF in % as on the screens: 0.713456 × 100 rounded to 2 decimals (worked by hand).
      expect(Number(r.ff_pct)).toBe(71.35);
      expect(Number(r.eff_pct)).toBe(21.34);
      expect(Number(r.isc_a)).toBe(Number((10.123456 + k).toFixed(4)));
      expect(Number(r.i0_a)).toBe(3.107e-7);
      expect(r.rs_ohm).toBe(k === 2 ? '' : '0.36547');
      expect(r.spec_name).toBe('Line "release"');
      expect(r.spec_version).toBe('4');
      expect(r.release_state).toBe(k < 5 ? 'released' : 'open');
      expect(r.exported_at).toBe('2026-12-02T09:41:07Z');
      expect(r.batch_name).toBe(k < 5 ? 'Lot A, line 1' : "'=Lot B");
      expect(r.outlier).toBe(k === 1 ? 'yes' : 'no');
    });
  });

  it('a device name with a comma, a quote, a line break or a formula comes back whole (formulas behind one quote)', () => {
    const read = checkExport(comparisonCsv({ rows, batches, spec: null, exportedAt }), rows.length);
    expect(read.records.map((r) => r.device_id)).toEqual(TRICKY.map((id) => (/^[=+\-@]/.test(id) ? `'${id}` : id)));
    // Without a spec the spec cells are empty, not missing.
    expect(read.records.every((r) => r.spec_name === '' && r.spec_version === '')).toBe(true);
  });

  it('writes the view: its columns in its order, device and batch first and once, no row added or lost', () => {
    const { fields, data } = comparisonRows({ rows: rows.slice(0, 3), columns: ['device_id', 'ff', 'batch_name', 'pmp_w', 'ff'], batches, spec: null, exportedAt });
    // Pmax is followed by its expanded uncertainty (none in these rows: an empty cell); the decision rule (none without a spec) before the provenance.
    expect(fields).toEqual(['device_id', 'batch_name', 'ff_pct', 'pmp_w', 'u_pmp_w', 'decision_rule', 'spec_name', 'spec_version', 'release_state', 'exported_at']);
    expect(data).toHaveLength(3);
    expect(data[0].slice(0, 4)).toEqual(['M-1, left', 'Lot A, line 1', 71.35, 401.1235]);
  });

  it('an empty comparison is the header alone', () => {
    const text = comparisonCsv({ rows: [], batches, spec: null, exportedAt });
    // Every grid column, the uncertainties of Isc, Voc, Pmax and STC Pmax, decision_rule and the four provenance columns.
    expect(checkExport(text, 0).header).toHaveLength(ALL_COLUMNS.length + 4 + 1 + 4);
  });

  it('names the columns and the file', () => {
    expect(comparisonColumnName('ff')).toBe('ff_pct');
    expect(comparisonColumnName('efficiency')).toBe('eff_pct');
    expect(comparisonColumnName('flags')).toBe('flags');
    expect(comparisonFileName(exportedAt)).toBe('quasilevel-comparison-2026-12-02.csv');
  });
});
