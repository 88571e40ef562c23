/**
 * The comparison's column form: rows go in and come back out unchanged (the grid must not see
 * a difference), missing or non-finite figures become null, and a row naming a batch the answer
 * does not have is refused rather than shown under the wrong name.
 */
import fc from 'fast-check';
import { rowsOfTable, tableOfRows } from '@/lib/quality';
import type { CompareRowInput } from '@/lib/quality';

const batches = [
  { id: 'b-1', name: 'Line 2, lot 2611' },
  { id: 'b-2', name: 'Line 3, lot 2612' },
];

const row = (k: number, over: Partial<CompareRowInput> = {}): CompareRowInput => ({
  curveId: `c-${k}`,
  batch: k % 2,
  deviceId: `M-${k}`,
  values: { pmp_w: 250 + k, rs_ohm: 0.3 + k / 100, n: k === 2 ? null : 1.1 },
  flags: k === 1 ? ['step'] : [],
  result: k === 1 ? 'fail' : 'pass',
  reasons: k === 1 ? ['Pmax below 250 W'] : [],
  powerClass: '250 W',
  outlier: k === 3,
  ...over,
});

describe('tableOfRows / rowsOfTable', () => {
  it('gives back every row field for field, with the batch id and name', () => {
    const input = [0, 1, 2, 3].map((k) => row(k));
    const table = tableOfRows(input);
    expect(table.length).toBe(4);
    expect(Object.keys(table.values).sort()).toEqual(['n', 'pmp_w', 'rs_ohm']);
    const rows = rowsOfTable(table, batches);
    rows.forEach((r, k) => {
      const i = input[k];
      expect(r).toEqual({
        curveId: i.curveId,
        batchId: batches[i.batch].id,
        batchName: batches[i.batch].name,
        deviceId: i.deviceId,
        flags: i.flags,
        result: i.result,
        reasons: i.reasons,
        powerClass: i.powerClass,
        outlier: i.outlier,
        ...i.values,
      });
    });
  });

  it('writes a figure one row lacks, or a non-finite one, as null for that row', () => {
    const table = tableOfRows([row(0, { values: { pmp_w: 1, efficiency: 0.21 } }), row(1, { values: { pmp_w: Number.NaN } })]);
    expect(table.values.efficiency).toEqual([0.21, null]);
    expect(table.values.pmp_w).toEqual([1, null]);
  });

  it('is smaller as JSON than one object per row (keys and batch names appear once)', () => {
    const input = Array.from({ length: 500 }, (_, k) => row(k));
    const asRows = JSON.stringify(rowsOfTable(tableOfRows(input), batches));
    const asTable = JSON.stringify(tableOfRows(input));
    expect(asTable.length).toBeLessThan(0.7 * asRows.length);
  });

  it('refuses a row that names a batch the answer does not list', () => {
    expect(() => rowsOfTable(tableOfRows([row(0, { batch: 5 })]), batches)).toThrow(/names batch 5/);
  });

  it('round-trips random rows through JSON unchanged (property)', () => {
    const num = fc.oneof(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.constant(null));
    const arbRow = fc.record({
      curveId: fc.uuid(),
      batch: fc.integer({ min: 0, max: 1 }),
      deviceId: fc.string(),
      values: fc.record({ pmp_w: num, ff: num, i0_a: num }),
      flags: fc.array(fc.constantFrom('step', 'noisy', 'fit-failed')),
      result: fc.constantFrom('pass' as const, 'fail' as const, null),
      reasons: fc.array(fc.string()),
      powerClass: fc.option(fc.string(), { nil: null }),
      outlier: fc.option(fc.boolean(), { nil: null }),
    });
    fc.assert(
      fc.property(fc.array(arbRow, { maxLength: 30 }), (rows) => {
        const back = rowsOfTable(JSON.parse(JSON.stringify(tableOfRows(rows))), batches);
        expect(back).toHaveLength(rows.length);
        back.forEach((r, k) => {
          for (const [key, v] of Object.entries(rows[k].values)) expect(r[key]).toBe(Object.is(v, -0) ? 0 : v);
          expect(r.deviceId).toBe(rows[k].deviceId);
          expect(r.batchId).toBe(batches[rows[k].batch].id);
        });
      }),
    );
  });
});
