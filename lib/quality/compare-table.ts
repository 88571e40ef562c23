/**
 * The comparison grid's rows as they travel: one array per column and one set of columns per
 * batch, instead of one object per row. For 10,000 curves the key names and batch names repeated
 * on every row were about half of a 6.6 MB answer; as columns they appear once. Per batch, so
 * the server can keep each batch's part serialized and send it again while that batch is
 * unchanged; the outlier marks, which depend on the parameter chosen, travel apart
 * (`outliers[b][j]`). `rowsOfColumns` gives the rows back exactly as the grid uses them.
 */

export type CompareResult = 'pass' | 'fail' | null;

/** One curve of the comparison, as the grid reads it (values under the engine's keys: pmp_w, rs_ohm…). */
export type CompareRow = Record<string, unknown> & {
  curve_id: string;
  batch_id: string;
  batch_name: string;
  device_id: string;
  /** Cells in series, null when the device does not say (per-cell figures between kinds). */
  cells: number | null;
  flags: string[];
  result: CompareResult;
  reasons: string[];
  power_class: string | null;
  outlier: boolean | null;
};

/** A row of one batch as the server builds it, before it is put into columns. */
export type CompareRowInput = {
  curve_id: string;
  device_id: string;
  cells: number | null;
  values: Partial<Record<string, number | null>>;
  flags: string[];
  result: CompareResult;
  reasons: string[];
  power_class: string | null;
};

/** One batch's rows as columns. */
export type BatchColumns = {
  length: number;
  curve_id: string[];
  device_id: string[];
  cells: (number | null)[];
  flags: string[][];
  result: CompareResult[];
  reasons: string[][];
  power_class: (string | null)[];
  /** One column per figure; null where a curve has none (not fitted, no area…). */
  values: Record<string, (number | null)[]>;
};

/** Puts one batch's rows into columns; every figure any row has gets a column. */
export function columnsOfRows(rows: readonly CompareRowInput[]): BatchColumns {
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
    curve_id: rows.map((r) => r.curve_id),
    device_id: rows.map((r) => r.device_id),
    cells: rows.map((r) => r.cells),
    flags: rows.map((r) => r.flags),
    result: rows.map((r) => r.result),
    reasons: rows.map((r) => r.reasons),
    power_class: rows.map((r) => r.power_class),
    values,
  };
}

/**
 * The rows of every batch, in batch order, with the batch's id and name on each and the outlier
 * mark from `outliers[b][j]` (null when no spec was applied).
 */
export function rowsOfColumns(tables: readonly BatchColumns[], outliers: readonly (readonly (boolean | null)[])[], batches: readonly { id: string; name: string }[]): CompareRow[] {
  if (tables.length !== batches.length || outliers.length !== batches.length) {
    throw new Error(`the comparison has ${batches.length} batches but ${tables.length} tables and ${outliers.length} outlier lists`);
  }
  const rows: CompareRow[] = [];
  tables.forEach((t, b) => {
    const batch = batches[b];
    const marks = outliers[b];
    if (marks.length !== t.length) throw new Error(`batch ${batch.name}: ${t.length} rows but ${marks.length} outlier marks`);
    const keys = Object.keys(t.values);
    for (let j = 0; j < t.length; j++) {
      const row: CompareRow = {
        curve_id: t.curve_id[j],
        batch_id: batch.id,
        batch_name: batch.name,
        device_id: t.device_id[j],
        // Parts cached before the column existed have none.
        cells: t.cells?.[j] ?? null,
        flags: t.flags[j],
        result: t.result[j],
        reasons: t.reasons[j],
        power_class: t.power_class[j],
        outlier: marks[j],
      };
      for (const k of keys) row[k] = t.values[k][j];
      rows.push(row);
    }
  });
  return rows;
}
