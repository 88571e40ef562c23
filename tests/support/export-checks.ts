/**
 * What every CSV export of Quasilevel must be for a program to read it (issue 14, item 5), checked
 * two ways: papaparse as a program would call it (header: true, no skipping of empty lines), and
 * the strict RFC 4180 reader of tests/support/strict-csv.ts. Both must see one header row and
 * exactly the expected number of device rows; every quantity column is named with its unit from
 * the key table (lib/vocabulary.ts) and holds numbers only; the provenance columns are on every row.
 */
import Papa from 'papaparse';
import { quantity } from '@/lib/vocabulary';
import { readStrictCsv } from '@/tests/support/strict-csv';

/** Columns of text (or identifiers), not quantities. */
export const TEXT_COLUMNS = new Set(['device_id', 'batch_name', 'result', 'reasons', 'power_class', 'outlier', 'outlier_params', 'in_guard_band', 'decision_rule', 'flags', 'spec_name', 'release_state', 'exported_at']);
/** A number that is not a quantity (the spec's version). */
export const COUNT_COLUMNS = new Set(['spec_version']);
/** Quantities without a unit: their columns are the only ones without a unit suffix. */
export const DIMENSIONLESS = new Set(['n']);

/** Unit suffix of a column name → the unit the key table gives it (most specific first). */
const SUFFIX_UNITS: [RegExp, string][] = [
  [/_a_cm2$/, 'A/cm²'],
  [/_pct$/, '%'],
  [/_ohm$/, 'Ω'],
  [/_a$/, 'A'],
  [/_v$/, 'V'],
  [/_w$/, 'W'],
];

/** The unit a column's name states, or null when it ends in no unit suffix. */
export function unitOfSuffix(column: string): string | null {
  return SUFFIX_UNITS.find(([re]) => re.test(column))?.[1] ?? null;
}

/** A cell as a number ('' → null); throws for text that is not a plain decimal or exponent number. */
export function numberCell(cell: string, where: string): number | null {
  if (cell === '') return null;
  if (!/^-?(\d+(\.\d*)?|\.\d+)([eE][-+]?\d+)?$/.test(cell)) throw new Error(`${where}: "${cell}" is not a number`);
  return Number(cell);
}

export type ExportCheck = {
  header: string[];
  /** Records keyed by column (strict reader's strings). */
  records: Record<string, string>[];
  /** papaparse's view of the same file (dynamicTyping off: strings). */
  papa: Record<string, string>[];
};

/**
 * Reads an export both ways and asserts the rules; returns the records. `devices` is the number
 * of device rows the file must have.
 */
export function checkExport(text: string, devices: number): ExportCheck {
  const strict = readStrictCsv(text);
  const papa = Papa.parse<Record<string, string>>(text, { header: true });
  expect(papa.errors).toEqual([]);
  expect(papa.meta.fields).toEqual(strict.header);
  expect(strict.rows).toHaveLength(devices);
  expect(papa.data).toHaveLength(devices);
  expect(papa.data).toEqual(strict.records);

  for (const column of strict.header) {
    if (TEXT_COLUMNS.has(column) || COUNT_COLUMNS.has(column)) continue;
    const q = quantity(column);
    // Every quantity column is a key of the key table and its name ends with the unit it is written in.
    expect({ column, known: q !== undefined }).toEqual({ column, known: true });
    const stated = unitOfSuffix(column);
    if (DIMENSIONLESS.has(column)) expect({ column, unit: q!.unit }).toEqual({ column, unit: '' });
    else expect({ column, suffix: stated, unit: q!.unit }).toEqual({ column, suffix: q!.unit, unit: q!.unit });
    strict.records.forEach((r, k) => numberCell(r[column], `row ${k + 1}, ${column}`));
  }
  for (const column of ['batch_name', 'spec_name', 'spec_version', 'release_state', 'exported_at']) expect(strict.header).toContain(column);
  for (const r of strict.records) {
    expect(r.exported_at).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}Z$/);
    if (r.spec_version !== '') numberCell(r.spec_version, 'spec_version');
  }
  return { header: strict.header, records: strict.records, papa: papa.data };
}
