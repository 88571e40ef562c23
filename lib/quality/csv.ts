/**
 * Quasilevel's CSV files — the pass/fail list that ships with a batch, and the rules the comparison
 * export (lib/quality/compare-csv.ts) shares — written by papaparse with its formula escaping.
 */
import Papa from 'papaparse';
import type { BatchEvaluation } from '@/lib/quality/evaluate';
import { QualityError } from '@/lib/quality/errors';
import { exportColumnName, exportValue } from '@/lib/quality/export-columns';
import { uncertaintyKey } from '@/lib/quality/uncertainty';
import { PARAM_KEYS, type ParamKey } from '@/lib/quality/params';

export type CsvCell = string | number | boolean | null;

/**
 * Text cells a spreadsheet would run as a formula (OWASP "CSV Injection"): those beginning with
 * =, +, -, @, tab or carriage return. Given to papaparse's `escapeFormulae`, which puts a single
 * quote before such a *string* and quotes the cell. Numbers are never strings there, so a
 * negative current written as the number −0.5 stays a number, while the text "-0.5" (a device
 * id, a power-class label) is escaped. Not papaparse's own default (`true`, /^[=+\-@\t\r].*$/):
 * its `.*$` does not cross a line break, so "=HYPERLINK(…)\nx" would pass unescaped.
 */
export const FORMULA_START = /^[=+\-@\t\r]/;

/** papaparse's unparse options for every CSV Quasilevel writes. */
export const CSV_UNPARSE_OPTIONS = { newline: '\r\n', escapeFormulae: FORMULA_START } as const;

/**
 * One cell made safe by the same rule, for writers that do not go through papaparse's unparse:
 * a string matching FORMULA_START gets a leading single quote; numbers (finite only) and booleans
 * pass; null and undefined become ''. Prefer `toCsv`, which applies the rule itself.
 */
export function csvSafeCell(value: string | number | boolean | null | undefined): CsvCell {
  const v = plainCell(value);
  return typeof v === 'string' && FORMULA_START.test(v) ? `'${v}` : v;
}

/** A cell as written: null and undefined → '', a non-finite number refused (the CSV would say "NaN"). */
function plainCell(value: string | number | boolean | null | undefined): CsvCell {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw new QualityError(`csv cell is ${value}, not a finite number`);
    return value;
  }
  if (typeof value === 'boolean' || typeof value === 'string') return value;
  throw new QualityError(`csv cell of type ${typeof value} is not supported`);
}

/**
 * CSV text of a header and rows, formula-safe (CSV_UNPARSE_OPTIONS): CRLF between records and
 * none after the last, so a reader sees exactly one header row and the rows given.
 */
export function toCsv(fields: readonly string[], data: readonly (readonly CsvCell[])[]): string {
  const text = Papa.unparse({ fields: [...fields], data: data.map((r) => [...r]) }, CSV_UNPARSE_OPTIONS);
  // papaparse ends a header without rows with a line break, which a reader takes for an empty row.
  return data.length ? text : text.replace(/\r\n$/, '');
}

/** What every row of an export says about where it comes from (columns batch_name … exported_at). */
export type ExportMeta = {
  batchName: string;
  /** The spec judged against, or null when none was (a comparison without a spec). */
  spec: { name: string; version: number } | null;
  /** The batch's state when exported: "open", "in_review", "on_hold", "released". */
  releaseState: string;
  /** When the file was made (for a release: the moment of the release). */
  exportedAt: Date;
};

/** The columns that close every row of both exports, in order. */
export const PROVENANCE_COLUMNS = ['spec_name', 'spec_version', 'release_state', 'exported_at'] as const;

/** ISO 8601 in UTC to the second: "2026-12-02T09:41:07Z". */
export function isoUtc(at: Date): string {
  if (!Number.isFinite(at.getTime())) throw new QualityError('the export time is not a valid date');
  return at.toISOString().replace(/\.\d{3}Z$/, 'Z');
}

/** The cells of PROVENANCE_COLUMNS for one batch (empty spec cells without a spec). */
export function provenanceCells(meta: Omit<ExportMeta, 'batchName'>): CsvCell[] {
  return [meta.spec?.name ?? '', meta.spec?.version ?? '', meta.releaseState, isoUtc(meta.exportedAt)];
}

export type PassFailMeta = ExportMeta & {
  /** Parameter columns, in this order (default: every parameter the evaluation has stats for). */
  params?: ParamKey[];
};

/**
 * Header and rows of the pass/fail export, in papaparse's { fields, data } form — one row per
 * device and nothing else: device_id, batch_name, result, reasons ("; "-joined), power_class,
 * outlier (yes/no), outlier_params (their column names), in_guard_band (yes/no: a value within
 * its expanded uncertainty of a limit), one column per parameter named with its unit (`pmp_w`,
 * `ff_pct`; numbers in that unit rounded as lib/quality/export-columns.ts states, empty when not
 * measured), each figure with an uncertainty followed by it (`u_pmp_w`, k = 2, same unit and
 * rounding), the spec's decision_rule, then spec_name, spec_version, release_state and exported_at.
 * Cells are plain values; `passFailCsv` (or `toCsv`) writes them formula-safe.
 */
export function passFailRows(batch: BatchEvaluation, meta: PassFailMeta): { fields: string[]; data: CsvCell[][] } {
  const params = meta.params ?? PARAM_KEYS.filter((k) => k in batch.stats);
  // Each figure that carries an uncertainty is followed by its expanded uncertainty (k = 2) in the same unit and rounding.
  const cols = params.flatMap((k) => (uncertaintyKey(k) ? [{ k, u: false }, { k, u: true }] : [{ k, u: false }]));
  const fields = ['device_id', 'batch_name', 'result', 'reasons', 'power_class', 'outlier', 'outlier_params', 'in_guard_band', ...cols.map((c) => (c.u ? uncertaintyKey(c.k)! : exportColumnName(c.k))), 'decision_rule', ...PROVENANCE_COLUMNS];
  const tail = provenanceCells(meta);
  const data = batch.devices.map((d) =>
    [
      d.device_id,
      meta.batchName,
      d.result,
      d.reasons.map((r) => r.message).join('; '),
      d.power_class,
      d.outlier ? 'yes' : 'no',
      d.outlier_params.map(exportColumnName).join(' '),
      d.in_guard_band ? 'yes' : 'no',
      ...cols.map((c) => exportValue(c.k, c.u ? (d.values[c.k] == null ? null : d.uncertainty?.[c.k]) : d.values[c.k])),
      batch.decision_rule,
      ...tail,
    ].map(plainCell),
  );
  return { fields, data };
}

/**
 * The pass/fail CSV as sent (RFC 4180: CRLF between records, no line after the last one, quotes
 * doubled inside quoted cells): one header row, one row per device, every text cell formula-safe.
 * Nothing else is in the file — the high-voltage caution goes with it on the screens, in the
 * mails and in the release record instead.
 */
export function passFailCsv(batch: BatchEvaluation, meta: PassFailMeta): string {
  const rows = passFailRows(batch, meta);
  return toCsv(rows.fields, rows.data);
}
