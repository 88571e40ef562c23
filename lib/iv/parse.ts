/**
 * Reading measured I-V text: CSV, TSV, semicolon-separated (decimal comma allowed there) or
 * whitespace-separated, with optional `# key: value` metadata lines before the header and an
 * optional Excel "sep=;" line. Quoted cells may hold the separator (RFC 4180).
 * Every problem becomes an IvInputError naming the line and what is wrong.
 */
import { IvInputError } from '@/lib/iv/errors';
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

/** Options of the readers: a file name (for deviceId and messages) and caller overrides of metadata. */
export type ParseOptions = { fileName?: string; overrides?: Partial<CurveMeta> };

type Separator = '\t' | ';' | ',' | 'space';

const VOLTAGE_NAMES = new Set(['v', 'u', 'volt', 'volts', 'voltage', 'bias', 'biasvoltage', 'vbias', 'vmeas', 'measuredvoltage', 'terminalvoltage', 'voltagemeasured']);
const CURRENT_NAMES = new Set(['i', 'current', 'curr', 'amps', 'ampere', 'amperes', 'imeas', 'measuredcurrent', 'terminalcurrent', 'currentmeasured']);
const DENSITY_NAMES = new Set(['j', 'jmeas', 'currentdensity', 'density']);
const VOLTAGE_UNITS: Record<string, number> = { '': 1, v: 1, volt: 1, volts: 1, mv: 1e-3, kv: 1e3, uv: 1e-6, 'µv': 1e-6, 'μv': 1e-6 };
const CURRENT_UNITS: Record<string, number> = { '': 1, a: 1, amp: 1, amps: 1, ma: 1e-3, ua: 1e-6, 'µa': 1e-6, 'μa': 1e-6, na: 1e-9 };

const NUMBER_RE = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;
const NON_FINITE_RE = /^[+-]?(nan|inf|infinity|#num!|#div\/0!)$/i;

/** Splits a header cell like "Voltage (mV)", "current_A", "I / mA" or "V [V]" into name and unit. */
function splitNameUnit(cell: string): { name: string; unit: string } {
  const text = cell.trim().replace(/^["']|["']$/g, '').trim();
  const bracket = /^(.*?)[\s_]*[([]\s*([^)\]]*?)\s*[)\]]\s*$/.exec(text);
  if (bracket) return { name: bracket[1], unit: bracket[2] };
  const slash = /^(.*?)\s*\/\s*(\S+)$/.exec(text);
  if (slash) return { name: slash[1], unit: slash[2] };
  const inUnit = /^(.*?)\s+in\s+(\S+)$/i.exec(text);
  if (inUnit) {
    const u = inUnit[2].toLowerCase();
    if (u in VOLTAGE_UNITS || u in CURRENT_UNITS) return { name: inUnit[1], unit: inUnit[2] };
  }
  const underscore = /^(.*?)_([A-Za-zµμ]+)$/.exec(text);
  if (underscore) {
    const u = underscore[2].toLowerCase();
    if (u in VOLTAGE_UNITS || u in CURRENT_UNITS) return { name: underscore[1], unit: underscore[2] };
  }
  return { name: text, unit: '' };
}

const normName = (s: string) => s.toLowerCase().replace(/[^a-z]/g, '');
const normUnit = (s: string) => s.trim().toLowerCase().replace(/\s+/g, '');

function detectSeparator(line: string): Separator {
  if (line.includes('\t')) return '\t';
  if (line.includes(';')) return ';';
  if (line.includes(',')) return ',';
  return 'space';
}

function splitRow(line: string, sep: Separator): string[] {
  const cells = sep === 'space' ? splitWhitespace(line) : splitOutsideQuotes(line, sep);
  return cells.map((c) => c.trim().replace(/^"(.*)"$/, '$1').trim());
}

/** Splits on runs of whitespace, keeping a unit in brackets with its name: "Voltage (mV)   Current [A]". */
function splitWhitespace(line: string): string[] {
  const cells: string[] = [];
  for (const token of line.trim().split(/\s+/)) {
    if (/^[([]/.test(token) && cells.length) cells[cells.length - 1] += ` ${token}`;
    else cells.push(token);
  }
  return cells;
}

/** Splits on `sep` outside double quotes (RFC 4180), so a quoted "0,512" or "1,234.5" stays one cell. */
function splitOutsideQuotes(line: string, sep: string): string[] {
  if (!line.includes('"')) return line.split(sep);
  const cells: string[] = [];
  let start = 0;
  let quoted = false;
  for (let k = 0; k < line.length; k++) {
    if (line[k] === '"') quoted = !quoted;
    else if (line[k] === sep && !quoted) {
      cells.push(line.slice(start, k));
      start = k + 1;
    }
  }
  cells.push(line.slice(start));
  return cells;
}

/** Longest piece of file text quoted in a message: a 1 MB cell must not make a 1 MB message. */
const QUOTED_CHARS = 60;

/** `text` cut for a message, saying how long it really is. */
function clip(text: string, max = QUOTED_CHARS): string {
  return text.length > max ? `${text.slice(0, max)}… (${text.length.toLocaleString('en-US')} characters)` : text;
}

/** Excel's "sep=;" first line names the separator. */
const EXCEL_SEP_RE = /^"?sep=([,;\t ])"?$/i;

/** Parses one numeric cell; `decimalComma` turns "0,512" into 0.512. */
function parseNumber(raw: string, decimalComma: boolean, what: string, lineNo: number): number {
  const s = decimalComma ? raw.replace(',', '.') : raw;
  if (s === '') throw new IvInputError('missing-value', `the ${what} value is empty`, lineNo);
  if (NON_FINITE_RE.test(s)) throw new IvInputError('non-finite', `the ${what} value "${clip(raw)}" is not a finite number`, lineNo);
  if (!NUMBER_RE.test(s)) {
    const hint = !decimalComma && /^[+-]?\d+,\d+$/.test(raw) ? ' (decimal commas are accepted only in semicolon-separated files)' : '';
    throw new IvInputError('not-a-number', `the ${what} value "${clip(raw)}" is not a number${hint}`, lineNo);
  }
  const value = Number(s);
  if (!Number.isFinite(value)) throw new IvInputError('non-finite', `the ${what} value "${clip(raw)}" is too large to be a finite number`, lineNo);
  return value;
}

type MetaKey = keyof CurveMeta;
const META_KEYS: Record<string, MetaKey> = {};
for (const k of ['deviceid', 'device', 'id', 'serial', 'serialnumber', 'serialno', 'sn', 'sample', 'sampleid', 'module', 'moduleid', 'cell', 'cellid', 'name']) META_KEYS[k] = 'deviceId';
for (const k of ['celltemperature', 'temperature', 'temp', 'tempc', 'celltemp', 'tcell', 't', 'devicetemperature', 'moduletemperature']) META_KEYS[k] = 'tempC';
for (const k of ['irradiance', 'g', 'irradiancewm', 'irr', 'intensity', 'poairradiance']) META_KEYS[k] = 'irradiance_Wm2';
for (const k of ['cells', 'cellsinseries', 'ns', 'numberofcells', 'cellcount', 'seriescells', 'ncells', 'cellsseries']) META_KEYS[k] = 'cells';
for (const k of ['area', 'areacm', 'devicearea', 'cellarea', 'modulearea', 'totalarea', 'aperturearea']) META_KEYS[k] = 'area_cm2';
for (const k of ['measuredat', 'date', 'measured', 'timestamp', 'time', 'datetime', 'measurementdate', 'measurementtime']) META_KEYS[k] = 'measuredAt';

/** A metadata number with an optional unit: "25 °C", "0,1 m²", "1 kW/m2". */
function metaNumber(raw: string, lineNo: number, key: string): { value: number; unit: string } {
  const m = /^([+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d+)?)\s*(.*)$/.exec(raw.trim());
  if (!m) throw new IvInputError('bad-metadata', `metadata "${clip(key)}" should be a number, got "${clip(raw)}"`, lineNo);
  return { value: Number(m[1].replace(',', '.')), unit: normUnit(m[2]).replace(/²/g, '2').replace(/^°|^deg/, '') };
}

function parseMetaValue(field: MetaKey, raw: string, unitFromKey: string, lineNo: number, key: string): CurveMeta[MetaKey] {
  const value = raw.trim();
  if (field === 'deviceId') {
    if (value === '') throw new IvInputError('bad-metadata', `metadata "${clip(key)}" is empty`, lineNo);
    return value;
  }
  if (field === 'measuredAt') {
    const ms = Date.parse(value);
    return Number.isFinite(ms) && /\d{4}/.test(value) ? new Date(ms).toISOString() : value;
  }
  const parsed = metaNumber(value, lineNo, key);
  const unit = parsed.unit || normUnit(unitFromKey).replace(/²/g, '2').replace(/^°|^deg/, '');
  const bad = (what: string): never => {
    throw new IvInputError('bad-metadata', `metadata "${clip(key)}": ${what}, got "${clip(raw.trim())}"`, lineNo);
  };
  switch (field) {
    case 'tempC': {
      let t = parsed.value;
      if (unit === 'k') t -= 273.15;
      else if (unit !== '' && unit !== 'c') bad('temperature must be in °C or K');
      if (!(t > -100 && t < 250)) bad('cell temperature must lie between −100 °C and 250 °C');
      return t;
    }
    case 'irradiance_Wm2': {
      const factor: Record<string, number> = { '': 1, 'w/m2': 1, wm2: 1, 'w/m^2': 1, 'kw/m2': 1000, 'w/cm2': 1e4, 'mw/cm2': 10, suns: 1000, sun: 1000 };
      if (!(unit in factor)) bad('irradiance must be in W/m²');
      const g = parsed.value * factor[unit];
      if (!(g > 0 && g <= 5000)) bad('irradiance must be above 0 and at most 5000 W/m²');
      return g;
    }
    case 'cells': {
      if (!(Number.isInteger(parsed.value) && parsed.value >= 1 && parsed.value <= 10000) || unit !== '') bad('cells in series must be a whole number from 1 to 10000');
      return parsed.value;
    }
    case 'area_cm2': {
      const factor: Record<string, number> = { '': 1, cm2: 1, 'cm^2': 1, m2: 1e4, 'm^2': 1e4, mm2: 0.01, 'mm^2': 0.01 };
      if (!(unit in factor)) bad('area must be in cm², m² or mm²');
      const area = parsed.value * factor[unit];
      if (!(area > 0 && area < 1e6)) bad('area must be positive (and below 100 m²)');
      return area;
    }
  }
  return undefined;
}

/** Reads a metadata line ("# key: value") into meta; a line without a key is a plain comment. */
function readMetaLine(line: string, lineNo: number, meta: CurveMeta, notes: string[]): void {
  const body = line.replace(/^\s*(#|\/\/)\s*/, '');
  const m = /^([^:=]+?)\s*[:=]\s*(.*)$/.exec(body);
  if (!m) return;
  const { name, unit } = splitNameUnit(m[1]);
  const field = META_KEYS[normName(name)];
  if (!field) {
    notes.push(`metadata "${m[1].trim()}" on line ${lineNo} is not used`);
    return;
  }
  const value = parseMetaValue(field, m[2], unit, lineNo, m[1].trim());
  (meta as Record<MetaKey, CurveMeta[MetaKey]>)[field] = value;
}

/** Voltage and current column positions and unit factors, from the header row. */
function readHeader(cells: string[], lineNo: number, notes: string[]) {
  if (cells.every((c) => c === '' || NUMBER_RE.test(c.replace(',', '.')))) {
    throw new IvInputError('no-header', 'expected a header row naming the voltage and current columns (for example "V,I" or "Voltage (mV);Current (mA)"), found numbers', lineNo);
  }
  let v = -1;
  let i = -1;
  let vFactor = 1;
  let iFactor = 1;
  const ignored: string[] = [];
  let density = '';
  cells.forEach((cell, idx) => {
    const { name, unit } = splitNameUnit(cell);
    const key = normName(name);
    const u = normUnit(unit);
    if (VOLTAGE_NAMES.has(key) && v < 0) {
      if (!(u in VOLTAGE_UNITS)) throw new IvInputError('bad-unit', `column "${clip(cell)}": unknown voltage unit "${clip(unit)}" (use V or mV)`, lineNo);
      v = idx;
      vFactor = VOLTAGE_UNITS[u];
    } else if (CURRENT_NAMES.has(key) && i < 0) {
      if (!(u in CURRENT_UNITS)) {
        const density = u.includes('/');
        throw new IvInputError('bad-unit', `column "${clip(cell)}": unknown current unit "${clip(unit)}"${density ? ' (a current density; give the current in A or mA)' : ' (use A or mA)'}`, lineNo);
      }
      i = idx;
      iFactor = CURRENT_UNITS[u];
    } else if (cell !== '') {
      if (DENSITY_NAMES.has(key)) density = cell;
      ignored.push(cell);
    }
  });
  const SHOWN_CELLS = 8;
  const shown = cells.slice(0, SHOWN_CELLS).map((c) => `"${clip(c, 40)}"`).join(', ') + (cells.length > SHOWN_CELLS ? ` and ${cells.length - SHOWN_CELLS} more` : '');
  if (v < 0) throw new IvInputError('no-voltage-column', `no voltage column in the header (${shown}); name it V, U, Voltage, voltage_V or Voltage (mV)`, lineNo);
  if (i < 0 && density) {
    throw new IvInputError('bad-unit', `column "${clip(density)}" holds a current density; give the current in A or mA (a column named I or Current)`, lineNo);
  }
  if (i < 0) throw new IvInputError('no-current-column', `no current column in the header (${shown}); name it I, Current, current_A or Current (mA)`, lineNo);
  if (ignored.length) notes.push(`columns not used: ${ignored.join(', ')}`);
  if (vFactor !== 1) notes.push('voltage converted from mV to V');
  if (iFactor !== 1) notes.push(`current converted to A (×${iFactor})`);
  return { v, i, vFactor, iFactor };
}

/**
 * Checks that a sorted, generator-convention curve reaches far enough for Isc and Voc:
 * some current ≤ 0 (or within VOC_EXTRAPOLATION_LIMIT of it) and some voltage ≤ 0 (or the
 * first voltage within ISC_EXTRAPOLATION_LIMIT·Voc). `lines` maps points to file lines.
 */
export function checkCurveReach(voltage_V: readonly number[], current_A: readonly number[], lines?: readonly number[]): void {
  const n = voltage_V.length;
  const lineOf = (k: number) => (lines ? lines[k] : undefined);
  const iMax = Math.max(...current_A);
  if (!(iMax > 0)) {
    throw new IvInputError('no-power', 'the current is never positive, so no point delivers power: this looks like a dark curve or a broken measurement', lineOf(0));
  }
  const crossing = current_A.findIndex((c) => c <= 0);
  const last = n - 1;
  if (crossing < 0) {
    const share = current_A[last] / iMax;
    if (share > VOC_EXTRAPOLATION_LIMIT) {
      throw new IvInputError(
        'no-voc',
        `the current never falls to zero, so the curve has no Voc: the sweep ends at ${fmt(voltage_V[last])} V with ${fmt(current_A[last])} A still flowing (${(share * 100).toFixed(0)} % of the largest current; Voc is extrapolated only below ${VOC_EXTRAPOLATION_LIMIT * 100} %). Extend the sweep past open circuit`,
        lineOf(last),
      );
    }
  }
  if (voltage_V[0] > 0) {
    const vocEstimate = crossing > 0 ? voltage_V[crossing] : voltage_V[last];
    if (voltage_V[0] > ISC_EXTRAPOLATION_LIMIT * vocEstimate) {
      throw new IvInputError(
        'no-isc',
        `the sweep never reaches 0 V: it starts at ${fmt(voltage_V[0])} V, ${((voltage_V[0] / vocEstimate) * 100).toFixed(0)} % of Voc, and Isc is extrapolated only from within ${ISC_EXTRAPOLATION_LIMIT * 100} % of Voc. Start the sweep at or below 0 V`,
        lineOf(0),
      );
    }
  }
}

const fmt = (x: number) => Number(x.toPrecision(4)).toString();

/**
 * Parses I-V text into a curve sorted by voltage, in volts and amperes, generator convention.
 * deviceId falls back to the file name without extension; `overrides` win over file metadata.
 */
export function parseIvText(text: string, opts: ParseOptions = {}): IvCurve {
  if (typeof text !== 'string') throw new IvInputError('not-text', 'the I-V input must be text');
  if (text.length > MAX_FILE_BYTES) throw new IvInputError('too-large', `the file is larger than ${MAX_FILE_BYTES / 1024 / 1024} MB`);
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  const meta: CurveMeta = {};
  const notes: string[] = [];

  let header: ReturnType<typeof readHeader> | null = null;
  let sep: Separator = ',';
  let named: Separator | null = null;
  let headerLine = 0;
  let headerCells = 0;
  const rows: { v: number; i: number; line: number }[] = [];
  for (let idx = 0; idx < lines.length; idx++) {
    const lineNo = idx + 1;
    const line = lines[idx];
    if (line.trim() === '') continue;
    if (/^\s*(#|\/\/)/.test(line)) {
      if (!header) readMetaLine(line, lineNo, meta, notes);
      continue;
    }
    if (!header) {
      const excel = EXCEL_SEP_RE.exec(line);
      if (excel && !named) {
        named = excel[1] === ' ' ? 'space' : (excel[1] as Separator);
        continue;
      }
      sep = named ?? detectSeparator(line);
      const headerRow = splitRow(line, sep);
      header = readHeader(headerRow, lineNo, notes);
      headerLine = lineNo;
      headerCells = headerRow.length;
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
    rows.push({ v, i, line: lineNo });
  }
  if (!header) throw new IvInputError('no-header', 'the file has no header row and no data; expected a header such as "V,I" followed by numbers', lines.length > 0 ? 1 : undefined);
  if (rows.length < MIN_POINTS) {
    throw new IvInputError('too-few-points', `only ${rows.length} data row${rows.length === 1 ? '' : 's'} after the header on line ${headerLine}; at least ${MIN_POINTS} points are needed`, rows.length ? rows[rows.length - 1].line : headerLine);
  }
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

  const voltage_V: number[] = [];
  const current_A: number[] = [];
  const lineOf: number[] = [];
  let duplicates = 0;
  for (let k = 0; k < sorted.length; ) {
    let j = k;
    let sum = 0;
    while (j < sorted.length && sorted[j].v === sorted[k].v) sum += sorted[j++].i;
    duplicates += j - k - 1;
    voltage_V.push(sorted[k].v);
    current_A.push(sum / (j - k));
    lineOf.push(sorted[k].line);
    k = j;
  }
  if (duplicates) notes.push(`${duplicates} repeated voltage${duplicates > 1 ? 's' : ''} averaged`);
  if (voltage_V.length < MIN_POINTS) {
    throw new IvInputError('too-few-points', `only ${voltage_V.length} distinct voltages; at least ${MIN_POINTS} points are needed`);
  }

  // Load convention: current rises with voltage (negative while delivering power). Compare the
  // low-voltage and high-voltage ends rather than single samples, so noise cannot flip it.
  const tenth = Math.max(1, Math.floor(voltage_V.length / 10));
  const mean = (from: number, to: number) => current_A.slice(from, to).reduce((s, x) => s + x, 0) / (to - from);
  if (mean(0, tenth) < mean(voltage_V.length - tenth, voltage_V.length)) {
    for (let k = 0; k < current_A.length; k++) current_A[k] = -current_A[k];
    notes.push('current was negative while delivering power (load convention); sign turned around');
  }
  checkCurveReach(voltage_V, current_A, lineOf);

  const meta: CurveMeta = { ...fileMeta };
  for (const [key, value] of Object.entries(opts.overrides ?? {})) {
    if (value !== undefined && value !== null) (meta as Record<string, unknown>)[key] = value;
  }
  if (meta.deviceId === undefined && opts.fileName) {
    const base = opts.fileName.split(/[\\/]/).pop() ?? opts.fileName;
    const stem = base.replace(/\.[^.]+$/, '');
    if (stem) meta.deviceId = stem;
  }
  return { voltage_V, current_A, meta, notes };
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
