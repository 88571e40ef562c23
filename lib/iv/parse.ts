/**
 * Reading measured I-V text: CSV, TSV, semicolon-separated (decimal comma allowed there) or
 * whitespace-separated, with an optional header block before the table (`# key: value`,
 * `key,value`, `key;value`, `key<TAB>value`, `key = value`, a title, blank lines) and an
 * optional Excel "sep=;" line. Quoted cells may hold the separator (RFC 4180).
 * Every problem becomes an IvInputError naming the line and what is wrong. Cells and numbers
 * are read in parse-cells.ts, the header row in parse-header.ts, the header block in
 * parse-meta.ts, irradiance and temperature columns in parse-conditions.ts.
 */
import { IvInputError } from '@/lib/iv/errors';
import { clip, detectSeparator, EXCEL_SEP_RE, NUMBER_RE, parseNumber, splitRow } from '@/lib/iv/parse-cells';
import type { Separator } from '@/lib/iv/parse-cells';
import { addSideValue, applySideColumns, sideValues } from '@/lib/iv/parse-conditions';
import type { SideValues } from '@/lib/iv/parse-conditions';
import { columnRoles, readHeader } from '@/lib/iv/parse-header';
import { finishMetaBlock, newMetaBlock, readMetaLine } from '@/lib/iv/parse-meta';
import type { CurveMeta, IvCurve } from '@/lib/iv/types';

/** Largest accepted file, bytes (10 MiB). */
export const MAX_FILE_BYTES = 10 * 1024 * 1024;
/** Largest accepted number of data rows. */
export const MAX_DATA_ROWS = 100_000;
/** Fewest distinct voltages a curve must have. */
export const MIN_POINTS = 10;
/** Isc is extrapolated only when the sweep starts within this fraction of Voc above 0 V. */
export const ISC_EXTRAPOLATION_LIMIT = 0.1;
/** Voc is extrapolated only when the sweep ends with less than this fraction of Isc still flowing. */
export const VOC_EXTRAPOLATION_LIMIT = 0.05;

/** Options of the readers: a file name (for device_id and messages) and caller overrides of metadata. */
export type ParseOptions = { fileName?: string; overrides?: Partial<CurveMeta> };

/**
 * Checks that a sorted, generator-convention curve reaches far enough for Isc and Voc:
 * some current ≤ 0 (or within VOC_EXTRAPOLATION_LIMIT of it) and some voltage ≤ 0 (or the
 * first voltage within ISC_EXTRAPOLATION_LIMIT·Voc). `lines` maps points to file lines.
 */
export function checkCurveReach(voltage_v: readonly number[], current_a: readonly number[], lines?: readonly number[]): void {
  const n = voltage_v.length;
  const lineOf = (k: number) => (lines ? lines[k] : undefined);
  const iMax = Math.max(...current_a);
  if (!(iMax > 0)) {
    throw new IvInputError('no-power', 'the current is never positive, so no point delivers power: this looks like a dark curve or a broken measurement', lineOf(0));
  }
  const crossing = current_a.findIndex((c) => c <= 0);
  const last = n - 1;
  if (crossing < 0) {
    const share = current_a[last] / iMax;
    if (share > VOC_EXTRAPOLATION_LIMIT) {
      throw new IvInputError(
        'no-voc',
        `the current never falls to zero, so the curve has no Voc: the sweep ends at ${fmt(voltage_v[last])} V with ${fmt(current_a[last])} A still flowing (${(share * 100).toFixed(0)} % of the largest current; Voc is extrapolated only below ${VOC_EXTRAPOLATION_LIMIT * 100} %). Extend the sweep past open circuit`,
        lineOf(last),
      );
    }
  }
  if (voltage_v[0] > 0) {
    const vocEstimate = crossing > 0 ? voltage_v[crossing] : voltage_v[last];
    if (voltage_v[0] > ISC_EXTRAPOLATION_LIMIT * vocEstimate) {
      throw new IvInputError(
        'no-isc',
        `the sweep never reaches 0 V: it starts at ${fmt(voltage_v[0])} V, ${((voltage_v[0] / vocEstimate) * 100).toFixed(0)} % of Voc, and Isc is extrapolated only from within ${ISC_EXTRAPOLATION_LIMIT * 100} % of Voc. Start the sweep at or below 0 V`,
        lineOf(0),
      );
    }
  }
}

const fmt = (x: number) => Number(x.toPrecision(4)).toString();

/** A row before the table that names a voltage, current or density column but not both voltage and current. */
type HeaderLike = { cells: string[]; line: number };

/**
 * The error when the header block runs into numbers or the file ends before a table: the first
 * line that looked like a header says what it lacks; else the tabular line just before the numbers
 * (when it is not a known metadata key) is taken as the intended header; else the line is named.
 */
function noTable(notes: string[], at: { cells: string[]; line: number } | null, headerLike: HeaderLike | null, previous: HeaderLike | null, lastLine: { text: string; line: number } | null, read: number): never {
  if (headerLike) readHeader(headerLike.cells, headerLike.line, notes);
  if (at) {
    if (previous && previous.line === at.line - 1) readHeader(previous.cells, previous.line, notes);
    readHeader(at.cells, at.line, notes);
  }
  if (!lastLine) throw new IvInputError('no-header', 'the file has no header row and no data; expected a header such as "V,I" followed by numbers', 1);
  throw new IvInputError(
    'no-header',
    `no header row naming a voltage and a current column (for example "V,I" or "Voltage (V);Current (A)") in the ${read.toLocaleString('en-US')} line${read === 1 ? '' : 's'} read; the last one is "${clip(lastLine.text.trim())}". The lines before the table are read as metadata (key,value or key: value)`,
    lastLine.line,
  );
}

/**
 * Parses I-V text into a curve sorted by voltage, in volts and amperes, generator convention.
 * Lines before the table are the header block (parse-meta.ts); the table starts at the first
 * row naming a voltage and a current column. device_id falls back to the file name without
 * extension; `overrides` win over file metadata.
 */
export function parseIvText(text: string, opts: ParseOptions = {}): IvCurve {
  if (typeof text !== 'string') throw new IvInputError('not-text', 'the I-V input must be text');
  if (text.length > MAX_FILE_BYTES) throw new IvInputError('too-large', `the file is larger than ${MAX_FILE_BYTES / 1024 / 1024} MB`);
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  const meta: CurveMeta = {};
  const notes: string[] = [];
  const block = newMetaBlock(meta, notes);

  let header: ReturnType<typeof readHeader> | null = null;
  let sep: Separator = ',';
  let named: Separator | null = null;
  let headerLine = 0;
  let headerCells = 0;
  let headerLike: HeaderLike | null = null;
  let previous: HeaderLike | null = null;
  let lastLine: { text: string; line: number } | null = null;
  let read = 0;
  let g: SideValues | null = null;
  let t: SideValues | null = null;
  const rows: { v: number; i: number; line: number }[] = [];
  for (let idx = 0; idx < lines.length; idx++) {
    const lineNo = idx + 1;
    const line = lines[idx];
    if (line.trim() === '') continue;
    if (/^\s*(#|\/\/)/.test(line)) {
      if (!header) {
        const body = line.replace(/^\s*(#|\/\/)\s*/, '');
        readMetaLine(block, body, named ?? detectSeparator(body), lineNo, false);
        lastLine = { text: line, line: lineNo };
        read++;
      }
      continue;
    }
    if (!header) {
      lastLine = { text: line, line: lineNo };
      read++;
      const excel = EXCEL_SEP_RE.exec(line);
      if (excel && !named) {
        named = excel[1] === ' ' ? 'space' : (excel[1] as Separator);
        continue;
      }
      const lineSep = named ?? detectSeparator(line);
      const cells = splitRow(line, lineSep);
      const roles = columnRoles(cells);
      if (roles.voltage && roles.current) {
        sep = lineSep;
        header = readHeader(cells, lineNo, notes);
        headerLine = lineNo;
        headerCells = cells.length;
        g = sideValues(header.g);
        t = sideValues(header.t);
        if (headerLike) notes.push(`line ${headerLike.line} names ${columnRoles(headerLike.cells).voltage ? 'a voltage' : columnRoles(headerLike.cells).current ? 'a current' : 'a current density'} column but not both; the table starts on line ${lineNo}`);
        finishMetaBlock(block);
        continue;
      }
      const filled = cells.filter((c) => c !== '');
      if (filled.length >= 2 && filled.every((c) => NUMBER_RE.test(c.replace(',', '.')))) noTable(notes, { cells, line: lineNo }, headerLike, previous, lastLine, read);
      if (filled.length >= 2 && (roles.voltage || roles.current || roles.density)) {
        headerLike ??= { cells, line: lineNo };
        previous = null;
        continue;
      }
      const known = readMetaLine(block, line, lineSep, lineNo, true);
      previous = filled.length >= 2 && !known ? { cells, line: lineNo } : null;
      continue;
    }
    const cells = splitRow(line, sep);
    if (cells.every((c) => c === '')) continue;
    // "0,512" in a comma-separated file splits into two numbers that would be read as other values.
    const filled = sep === ',' ? cells.reduce((n, c) => n + (c === '' ? 0 : 1), 0) : 0;
    if (filled > headerCells) {
      throw new IvInputError(
        'extra-values',
        `${filled.toLocaleString('en-US')} values under the ${headerCells} columns of the header on line ${headerLine}: a decimal comma in a comma-separated file splits a number in two. Write decimal points or separate the columns with semicolons (or name every column in the header)`,
        lineNo,
      );
    }
    if (rows.length >= MAX_DATA_ROWS) throw new IvInputError('too-many-rows', `more than ${MAX_DATA_ROWS.toLocaleString('en-US')} data rows; split the file`, lineNo);
    const need = Math.max(header.v, header.i);
    if (cells.length <= need) {
      throw new IvInputError('missing-value', `expected at least ${need + 1} columns as in the header on line ${headerLine}, found ${cells.length}`, lineNo);
    }
    const decimalComma = sep === ';';
    const v = parseNumber(cells[header.v], decimalComma, 'voltage', lineNo) * header.vFactor;
    const i = parseNumber(cells[header.i], decimalComma, 'current', lineNo) * header.iFactor;
    addSideValue(g, 'g', cells, decimalComma, lineNo);
    addSideValue(t, 't', cells, decimalComma, lineNo);
    rows.push({ v, i, line: lineNo });
  }
  if (!header) {
    finishMetaBlock(block);
    noTable(notes, null, headerLike, null, lastLine, read);
  }
  if (rows.length < MIN_POINTS) {
    throw new IvInputError('too-few-points', `only ${rows.length} data row${rows.length === 1 ? '' : 's'} after the header on line ${headerLine}; at least ${MIN_POINTS} points are needed`, rows.length ? rows[rows.length - 1].line : headerLine);
  }
  applySideColumns(meta, g, t, { irradiance: block.lines.irradiance_w_m2, temperature: block.lines.temp_c }, notes);
  if (sep === ';' && text.includes(',')) notes.push('decimal commas read as decimal points');
  return buildCurve(rows, meta, notes, opts);
}

/** Sorts, averages duplicate voltages, turns the load convention around and checks the reach. */
function buildCurve(rows: { v: number; i: number; line: number }[], fileMeta: CurveMeta, notes: string[], opts: ParseOptions): IvCurve {
  const descending = rows.length > 1 && rows[0].v > rows[rows.length - 1].v;
  if (descending) notes.push('sweep ran from high to low voltage; points sorted by voltage');
  // Most sweeps arrive in rising voltage: those skip the sort (stable by position, so repeated voltages keep their order).
  let rising = true;
  for (let k = 1; k < rows.length && rising; k++) rising = rows[k].v >= rows[k - 1].v;
  const sorted = rising ? rows : rows.map((r, k) => ({ ...r, k })).sort((a, b) => a.v - b.v || a.k - b.k);

  const voltage_v: number[] = [];
  const current_a: number[] = [];
  const lineOf: number[] = [];
  let duplicates = 0;
  for (let k = 0; k < sorted.length; ) {
    let j = k;
    let sum = 0;
    while (j < sorted.length && sorted[j].v === sorted[k].v) sum += sorted[j++].i;
    duplicates += j - k - 1;
    voltage_v.push(sorted[k].v);
    current_a.push(sum / (j - k));
    lineOf.push(sorted[k].line);
    k = j;
  }
  if (duplicates) notes.push(`${duplicates} repeated voltage${duplicates > 1 ? 's' : ''} averaged`);
  if (voltage_v.length < MIN_POINTS) {
    throw new IvInputError('too-few-points', `only ${voltage_v.length} distinct voltages; at least ${MIN_POINTS} points are needed`);
  }

  // Load convention: current rises with voltage (negative while delivering power). Compare the
  // low-voltage and high-voltage ends rather than single samples, so noise cannot flip it.
  const tenth = Math.max(1, Math.floor(voltage_v.length / 10));
  const mean = (from: number, to: number) => current_a.slice(from, to).reduce((s, x) => s + x, 0) / (to - from);
  if (mean(0, tenth) < mean(voltage_v.length - tenth, voltage_v.length)) {
    for (let k = 0; k < current_a.length; k++) current_a[k] = -current_a[k];
    notes.push('current was negative while delivering power (load convention); sign turned around');
  }
  checkCurveReach(voltage_v, current_a, lineOf);

  const meta: CurveMeta = { ...fileMeta };
  for (const [key, value] of Object.entries(opts.overrides ?? {})) {
    if (value !== undefined && value !== null) (meta as Record<string, unknown>)[key] = value;
  }
  if (meta.device_id === undefined && opts.fileName) {
    const base = opts.fileName.split(/[\\/]/).pop() ?? opts.fileName;
    const stem = base.replace(/\.[^.]+$/, '');
    if (stem) meta.device_id = stem;
  }
  return { voltage_v, current_a, meta, notes };
}

/**
 * Parses I-V file bytes: checks the size (≤ 10 MB) and that the content is text (UTF-8, or
 * UTF-16 with a byte-order mark as some spreadsheet exports write), then `parseIvText`.
 */
export function parseIvBytes(bytes: Uint8Array, opts: ParseOptions = {}): IvCurve {
  if (!(bytes instanceof Uint8Array)) throw new IvInputError('not-text', 'the I-V input must be file bytes');
  if (bytes.byteLength > MAX_FILE_BYTES) {
    throw new IvInputError('too-large', `the file is ${(bytes.byteLength / 1024 / 1024).toFixed(1)} MB; the limit is ${MAX_FILE_BYTES / 1024 / 1024} MB`);
  }
  if (bytes.byteLength === 0) throw new IvInputError('empty', 'the file is empty');
  let text: string;
  if (bytes[0] === 0xff && bytes[1] === 0xfe) text = new TextDecoder('utf-16le').decode(bytes.subarray(2));
  else if (bytes[0] === 0xfe && bytes[1] === 0xff) text = new TextDecoder('utf-16be').decode(bytes.subarray(2));
  else {
    if (bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 0x03 && bytes[3] === 0x04) {
      throw new IvInputError('binary', 'this is a zip archive or a spreadsheet workbook (.xlsx), not a text file: save the sheet as CSV');
    }
    const nul = bytes.indexOf(0);
    if (nul >= 0) throw new IvInputError('binary', `the file is binary (a zero byte at offset ${nul}), not I-V text: export it as CSV or TSV`);
    try {
      text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
    } catch {
      throw new IvInputError('not-utf8', 'the file is not valid UTF-8 text: save it as UTF-8 CSV');
    }
  }
  if (text.includes('\u0000')) throw new IvInputError('binary', 'the file contains zero characters, so it is not I-V text');
  return parseIvText(text, opts);
}
