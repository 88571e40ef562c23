/**
 * The pass/fail CSV that ships with a batch, written by papaparse with its formula escaping.
 */
import Papa from 'papaparse';
import type { BatchEvaluation } from '@/lib/quality/evaluate';
import { QualityError } from '@/lib/quality/errors';
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

/** CSV text (CRLF lines) of a header and rows, formula-safe (CSV_UNPARSE_OPTIONS). */
export function toCsv(fields: readonly string[], data: readonly (readonly CsvCell[])[]): string {
  return Papa.unparse({ fields: [...fields], data: data.map((r) => [...r]) }, CSV_UNPARSE_OPTIONS);
}

export type PassFailMeta = {
  /** Version of the spec the batch was judged against. */
  specVersion: string | number;
  /** Release state of the batch when exported, e.g. "released", "held". */
  releaseState: string;
  /** Parameter columns, in this order (default: every parameter the evaluation has stats for). */
  params?: ParamKey[];
};

/**
 * Header and rows of the pass/fail export, in papaparse's { fields, data } form:
 * device_id, result, reasons ("; "-joined), power_class, outlier (yes/no), outlier_params,
 * one column per parameter (numbers, empty when not measured), spec_version, release_state.
 * Cells are plain values; `passFailCsv` (or `toCsv`) writes them formula-safe.
 */
export function passFailRows(batch: BatchEvaluation, meta: PassFailMeta): { fields: string[]; data: CsvCell[][] } {
  const params = meta.params ?? PARAM_KEYS.filter((k) => k in batch.stats);
  const fields = ['device_id', 'result', 'reasons', 'power_class', 'outlier', 'outlier_params', ...params, 'spec_version', 'release_state'];
  const data = batch.devices.map((d) =>
    [
      d.device_id,
      d.result,
      d.reasons.map((r) => r.message).join('; '),
      d.power_class,
      d.outlier ? 'yes' : 'no',
      d.outlier_params.join(' '),
      ...params.map((k) => d.values[k] ?? null),
      typeof meta.specVersion === 'number' ? meta.specVersion : String(meta.specVersion),
      meta.releaseState,
    ].map(plainCell),
  );
  return { fields, data };
}

/**
 * The pass/fail CSV as sent: the rows of `passFailRows`, then each note on a line of its own
 * (e.g. the high-voltage caution), every cell formula-safe.
 */
export function passFailCsv(batch: BatchEvaluation, meta: PassFailMeta, notes: readonly string[] = []): string {
  const rows = passFailRows(batch, meta);
  const tail = notes.map((n) => Papa.unparse([[n]], CSV_UNPARSE_OPTIONS));
  return [toCsv(rows.fields, rows.data), ...tail].join('\r\n') + '\r\n';
}
