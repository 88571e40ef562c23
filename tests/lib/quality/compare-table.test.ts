/**
 * The comparison's column form: rows go in and come back out unchanged (the grid must not see
 * a difference), missing or non-finite figures become null, and an answer whose parts do not
 * line up is refused rather than shown under the wrong batch.
 */
import fc from 'fast-check';
import { columnsOfRows, rowsOfColumns } from '@/lib/quality';
import type { CompareRowInput } from '@/lib/quality';

const batches = [
  { id: 'b-1', name: 'Line 2, lot 2611' },
  { id: 'b-2', name: 'Line 3, lot 2612' },
];

const row = (k: number, over: Partial<CompareRowInput> = {}): CompareRowInput => ({
  curve_id: `c-${k}`,
  device_id: `M-${k}`,
  cells: k === 2 ? null : 60,
  values: { pmp_w: 250 + k, rs_ohm: 0.3 + k / 100, n: k === 2 ? null : 1.1 },
  flags: k === 1 ? ['step'] : [],
  result: k === 1 ? 'fail' : 'pass',
  reasons: k === 1 ? ['Pmax below 250 W'] : [],
  power_class: '250 W',
  ...over,
});

describe('columnsOfRows / rowsOfColumns', () => {
  it('gives back every row field for field, batch by batch, with the batch id, name and outlier mark', () => {
    const first = [0, 1, 2].map((k) => row(k));
    const second = [3, 4].map((k) => row(k));
    const tables = [columnsOfRows(first), columnsOfRows(second)];
    expect(tables[0].length).toBe(3);
    expect(Object.keys(tables[0].values).sort()).toEqual(['n', 'pmp_w', 'rs_ohm']);
    const outliers = [[false, true, false], [null, null]];
    const rows = rowsOfColumns(tables, outliers, batches);
    const expected = [...first.map((r, j) => ({ r, b: 0, o: outliers[0][j] })), ...second.map((r, j) => ({ r, b: 1, o: outliers[1][j] }))];
    expect(rows).toHaveLength(5);
    rows.forEach((got, k) => {
      const { r, b, o } = expected[k];
      expect(got).toEqual({ curve_id: r.curve_id, batch_id: batches[b].id, batch_name: batches[b].name, device_id: r.device_id, cells: r.cells, flags: r.flags, result: r.result, reasons: r.reasons, power_class: r.power_class, outlier: o, ...r.values });
    });
  });

  it('writes a figure one row lacks, or a non-finite one, as null for that row', () => {
    const t = columnsOfRows([row(0, { values: { pmp_w: 1, efficiency: 0.21 } }), row(1, { values: { pmp_w: Number.NaN } })]);
    expect(t.values.efficiency).toEqual([0.21, null]);
    expect(t.values.pmp_w).toEqual([1, null]);
  });

  it('is smaller as JSON than one object per row (keys and batch names appear once)', () => {
    const input = Array.from({ length: 500 }, (_, k) => row(k));
    const tables = [columnsOfRows(input)];
    const outliers = [input.map(() => false)];
    const asRows = JSON.stringify(rowsOfColumns(tables, outliers, batches.slice(0, 1)));
    expect(JSON.stringify({ tables, outliers }).length).toBeLessThan(0.7 * asRows.length);
  });

  it('refuses parts that do not line up with the batches', () => {
    const t = columnsOfRows([row(0)]);
    expect(() => rowsOfColumns([t], [[false]], batches)).toThrow(/2 batches but 1 tables/);
    expect(() => rowsOfColumns([t, t], [[false], [false, true]], batches)).toThrow(/1 rows but 2 outlier marks/);
  });

  it('round-trips random rows through JSON unchanged (property)', () => {
    const num = fc.oneof(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.constant(null));
    const arbRow = fc.record({
      curve_id: fc.uuid(),
      device_id: fc.string(),
      cells: fc.option(fc.integer({ min: 1, max: 144 }), { nil: null }),
      values: fc.record({ pmp_w: num, ff: num, i0_a: num }),
      flags: fc.array(fc.constantFrom('step', 'noisy', 'fit-failed')),
      result: fc.constantFrom('pass' as const, 'fail' as const, null),
      reasons: fc.array(fc.string()),
      power_class: fc.option(fc.string(), { nil: null }),
    });
    fc.assert(
      fc.property(fc.array(arbRow, { maxLength: 20 }), fc.array(arbRow, { maxLength: 20 }), (a, b) => {
        const wire = JSON.parse(JSON.stringify({ tables: [columnsOfRows(a), columnsOfRows(b)], outliers: [a.map(() => null), b.map(() => true)] }));
        const back = rowsOfColumns(wire.tables, wire.outliers, batches);
        const all = [...a, ...b];
        expect(back).toHaveLength(all.length);
        back.forEach((r, k) => {
          for (const [key, v] of Object.entries(all[k].values)) expect(r[key]).toBe(Object.is(v, -0) ? 0 : v);
          expect(r.device_id).toBe(all[k].device_id);
          expect(r.cells).toBe(all[k].cells);
          expect(r.batch_id).toBe(batches[k < a.length ? 0 : 1].id);
          expect(r.outlier).toBe(k < a.length ? null : true);
        });
      }),
    );
  });
});
