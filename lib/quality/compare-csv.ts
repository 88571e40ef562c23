/**
 * The comparison CSV: the grid's rows as a file a program can read — one header row and one row
 * per device (curve), nothing else; the same column names, units and rounding as the pass/fail
 * list (lib/quality/export-columns.ts); the batch, spec, release state and export time on every
 * row. The screen writes the view it shows (its filter, sort and columns), the API every column.
 */
import { ALL_COLUMNS } from '@/lib/compare-columns';
import type { CompareColumnId } from '@/lib/compare-columns';
import type { CompareRow } from '@/lib/quality/compare-table';
import { isoUtc, PROVENANCE_COLUMNS, toCsv } from '@/lib/quality/csv';
import type { CsvCell } from '@/lib/quality/csv';
import { exportColumnName, exportValue } from '@/lib/quality/export-columns';
import { isParamKey, type ParamKey } from '@/lib/quality/params';
import { uncertaintyKey } from '@/lib/quality/uncertainty';

export type ComparisonCsvInput = {
  /** The rows in the order to write them. */
  rows: readonly CompareRow[];
  /** The grid's columns to write (default: all of them); device_id and batch_name always lead. */
  columns?: readonly CompareColumnId[];
  /** The compared batches, for each row's release state. */
  batches: readonly { id: string; name: string; state: string }[];
  /** The spec the rows were judged against, or null; its decision rule ("simple" when not said). */
  spec: { name: string; version: number; decision_rule?: string } | null;
  exportedAt: Date;
};

/** The header name of a grid column in the file ("ff" → "ff_pct"). */
export function comparisonColumnName(id: CompareColumnId): string {
  return isParamKey(id) ? exportColumnName(id) : id;
}

function cell(id: CompareColumnId, r: CompareRow): CsvCell {
  if (isParamKey(id)) return exportValue(id, typeof r[id] === 'number' ? (r[id] as number) : null);
  switch (id) {
    case 'flags':
      return (r.flags ?? []).join(' ');
    case 'reasons':
      return (r.reasons ?? []).join('; ');
    case 'outlier':
      return r.outlier == null ? '' : r.outlier ? 'yes' : 'no';
    case 'result':
      return r.result ?? '';
    case 'power_class':
      return r.power_class ?? '';
    default:
      return r[id] == null ? '' : String(r[id]);
  }
}

/** The header and rows of the comparison export (plain cells; `comparisonCsv` writes them formula-safe). */
export function comparisonRows(input: ComparisonCsvInput): { fields: string[]; data: CsvCell[][] } {
  const chosen = (input.columns ?? ALL_COLUMNS).filter((id) => id !== 'device_id' && id !== 'batch_name');
  const ids: CompareColumnId[] = ['device_id', 'batch_name', ...new Set(chosen)];
  const state = new Map(input.batches.map((b) => [b.id, b.state]));
  const at = isoUtc(input.exportedAt);
  // A figure with an uncertainty is followed by its expanded uncertainty (k = 2), same unit and rounding.
  const cols = ids.flatMap((id) => (isParamKey(id) && uncertaintyKey(id) ? [{ id, u: false }, { id, u: true }] : [{ id, u: false }]));
  const fields = [...cols.map((c) => (c.u ? uncertaintyKey(c.id as ParamKey)! : comparisonColumnName(c.id))), 'decision_rule', ...PROVENANCE_COLUMNS];
  const rule = input.spec ? (input.spec.decision_rule ?? 'simple') : '';
  const uCell = (id: ParamKey, r: CompareRow): CsvCell => {
    const u = r[uncertaintyKey(id)!];
    return typeof r[id] === 'number' && typeof u === 'number' ? exportValue(id, u) : null;
  };
  const data = input.rows.map((r) => [...cols.map((c) => (c.u ? uCell(c.id as ParamKey, r) : cell(c.id, r))), rule, input.spec?.name ?? '', input.spec?.version ?? '', state.get(r.batch_id) ?? '', at]);
  return { fields, data };
}

/** The comparison CSV (RFC 4180, CRLF, formula-safe like the pass/fail list). */
export function comparisonCsv(input: ComparisonCsvInput): string {
  const { fields, data } = comparisonRows(input);
  return toCsv(fields, data);
}

/** "quasilevel-comparison-2026-12-02.csv": the file name of a comparison exported then (UTC date). */
export function comparisonFileName(exportedAt: Date): string {
  return `quasilevel-comparison-${isoUtc(exportedAt).slice(0, 10)}.csv`;
}
