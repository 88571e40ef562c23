/**
 * Rows for the pass/fail CSV that ships with a batch, made safe for spreadsheets.
 */
import type { BatchEvaluation } from '@/lib/quality/evaluate';
import { QualityError } from '@/lib/quality/errors';
import { PARAM_KEYS, type ParamKey } from '@/lib/quality/params';

export type CsvCell = string | number | boolean | null;

/** Characters that make a spreadsheet read a cell as a formula (OWASP "CSV Injection"). */
const FORMULA_START = new Set(['=', '+', '-', '@', '\t', '\r']);

/**
 * Makes one cell safe against CSV/formula injection (OWASP guidance): a *string* that begins
 * with =, +, -, @, tab or carriage return gets a leading single quote, so a spreadsheet shows
 * it as text instead of evaluating it. Numbers are not strings and stay numbers — a negative
 * measured current written as the number −0.01 is left alone, while the text "-0.01" (for
 * example a device id) is escaped. Booleans pass; null and undefined become ''. Quoting of
 * commas, quotes and newlines is left to the CSV writer (papaparse).
 */
export function csvSafeCell(value: string | number | boolean | null | undefined): CsvCell {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw new QualityError(`csv cell is ${value}, not a finite number`);
    return value;
  }
  if (typeof value === 'boolean') return value;
  if (typeof value !== 'string') throw new QualityError(`csv cell of type ${typeof value} is not supported`);
  return value.length > 0 && FORMULA_START.has(value[0]) ? `'${value}` : value;
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
 * Every string cell goes through csvSafeCell.
 */
export function passFailRows(batch: BatchEvaluation, meta: PassFailMeta): { fields: string[]; data: CsvCell[][] } {
  const params = meta.params ?? PARAM_KEYS.filter((k) => k in batch.stats);
  const fields = ['device_id', 'result', 'reasons', 'power_class', 'outlier', 'outlier_params', ...params, 'spec_version', 'release_state'];
  const data = batch.devices.map((d) => [
    csvSafeCell(d.deviceId),
    csvSafeCell(d.result),
    csvSafeCell(d.reasons.map((r) => r.message).join('; ')),
    csvSafeCell(d.powerClass),
    csvSafeCell(d.outlier ? 'yes' : 'no'),
    csvSafeCell(d.outlierParams.join(' ')),
    ...params.map((k) => csvSafeCell(d.values[k] ?? null)),
    csvSafeCell(typeof meta.specVersion === 'number' ? meta.specVersion : String(meta.specVersion)),
    csvSafeCell(meta.releaseState),
  ]);
  return { fields, data };
}
