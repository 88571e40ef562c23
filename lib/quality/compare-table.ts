/**
 * The comparison grid's rows as they travel: one array per column instead of one object per
 * row. For 10,000 curves the key names and batch names repeated on every row were about half
 * of a 6.6 MB answer; as columns they appear once, and writing and reading the answer cost
 * accordingly less. `rowsOfTable` gives the rows back exactly as the grid uses them.
 */

export type CompareResult = 'pass' | 'fail' | null;

/** One curve of the comparison, as the grid reads it (values under the engine's keys: pmp_w, rs_ohm…). */
export type CompareRow = Record<string, unknown> & {
  curveId: string;
  batchId: string;
  batchName: string;
  deviceId: string;
  flags: string[];
  result: CompareResult;
  reasons: string[];
  powerClass: string | null;
  outlier: boolean | null;
};

/** A row as the server builds it, before it is put into columns. */
export type CompareRowInput = {
  curveId: string;
  batch: number;
  deviceId: string;
  values: Partial<Record<string, number | null>>;
  flags: string[];
  result: CompareResult;
  reasons: string[];
  powerClass: string | null;
  outlier: boolean | null;
};

export type CompareTable = {
  length: number;
  /** Index into the answer's `batches`. */
  batch: number[];
  curveId: string[];
  deviceId: string[];
  flags: string[][];
  result: CompareResult[];
  reasons: string[][];
  powerClass: (string | null)[];
  outlier: (boolean | null)[];
  /** One column per figure; null where a curve has none (not fitted, no area…). */
  values: Record<string, (number | null)[]>;
};

/** Puts rows into columns; every figure any row has gets a column. */
export function tableOfRows(rows: readonly CompareRowInput[]): CompareTable {
  const keys = new Set<string>();
  for (const r of rows) for (const k of Object.keys(r.values)) keys.add(k);
  const values: Record<string, (number | null)[]> = {};
  for (const k of keys) {
    const col = new Array<number | null>(rows.length);
    for (let j = 0; j < rows.length; j++) {
      const v = rows[j].values[k];
      col[j] = typeof v === 'number' && Number.isFinite(v) ? v : null;
    }
    values[k] = col;
  }
  return {
    length: rows.length,
    batch: rows.map((r) => r.batch),
    curveId: rows.map((r) => r.curveId),
    deviceId: rows.map((r) => r.deviceId),
    flags: rows.map((r) => r.flags),
    result: rows.map((r) => r.result),
    reasons: rows.map((r) => r.reasons),
    powerClass: rows.map((r) => r.powerClass),
    outlier: rows.map((r) => r.outlier),
    values,
  };
}

/** The rows of a table, with the batch's id and name on each. */
export function rowsOfTable(t: CompareTable, batches: readonly { id: string; name: string }[]): CompareRow[] {
  const keys = Object.keys(t.values);
  const rows: CompareRow[] = new Array(t.length);
  for (let j = 0; j < t.length; j++) {
    const b = batches[t.batch[j]];
    if (!b) throw new Error(`comparison row ${j} names batch ${t.batch[j]}, but the answer has ${batches.length}`);
    const row: CompareRow = {
      curveId: t.curveId[j],
      batchId: b.id,
      batchName: b.name,
      deviceId: t.deviceId[j],
      flags: t.flags[j],
      result: t.result[j],
      reasons: t.reasons[j],
      powerClass: t.powerClass[j],
      outlier: t.outlier[j],
    };
    for (const k of keys) row[k] = t.values[k][j];
    rows[j] = row;
  }
  return rows;
}
