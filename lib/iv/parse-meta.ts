/**
 * The lines before the table of I-V text (the header block a tester writes): `# key: value`,
 * `key,value`, `key;value`, `key<TAB>value`, `key = value`, `key: value`, a title line (one text
 * cell). A value may be quoted, followed by a unit cell (`Irradiance,1000,W/m2`), or carry its unit
 * in the key (`Irradiance (W/m2),1000`). Known keys fill CurveMeta; every other key is kept as
 * written in `meta.extra`. A known key with a value that cannot be right throws an IvInputError
 * naming the line.
 */
import { toQuantity } from '@/lib/units';
import { IvInputError } from '@/lib/iv/errors';
import { clip, NUMBER_RE, splitRow } from '@/lib/iv/parse-cells';
import type { Separator } from '@/lib/iv/parse-cells';
import { irradianceFactor, irradianceNameUnit, normName, plainUnit, splitNameUnit, temperatureNameUnit } from '@/lib/iv/parse-header';
import type { CurveMeta, MetaEntry } from '@/lib/iv/types';

type MetaKey = Exclude<keyof CurveMeta, 'extra' | 'irradiance_spread_pct'>;
const META_KEYS: Record<string, MetaKey> = {};
for (const k of ['deviceid', 'device', 'id', 'serial', 'serialnumber', 'serialno', 'sn', 'sample', 'sampleid', 'module', 'moduleid', 'moduleserial', 'moduleserialnumber', 'moduleserialno', 'modulesn', 'samplename', 'dut', 'barcode', 'cell', 'cellid', 'name']) META_KEYS[k] = 'device_id';
for (const k of ['celltemperature', 'temperature', 'temp', 'tempc', 'celltemp', 'tcell', 't', 'devicetemperature', 'moduletemperature', 'moduletemp', 'tmod', 'tmodule']) META_KEYS[k] = 'temp_c';
for (const k of ['irradiance', 'g', 'irradiancewm', 'irr', 'intensity', 'poairradiance', 'gpoa', 'measuredirradiance', 'suns']) META_KEYS[k] = 'irradiance_w_m2';
for (const k of ['cells', 'cellsinseries', 'ns', 'numberofcells', 'noofcells', 'cellcount', 'seriescells', 'ncells', 'cellsseries', 'cellspermodule', 'numberofcellsinseries', 'cellsinserie']) META_KEYS[k] = 'cells';
for (const k of ['area', 'areacm', 'devicearea', 'cellarea', 'modulearea', 'totalarea', 'aperturearea']) META_KEYS[k] = 'area_cm2';
for (const k of ['measuredat', 'measured', 'timestamp', 'datetime']) META_KEYS[k] = 'measured_at';
// A date and a time on two lines make one measurement time.
const DATE_KEYS = new Set(['date', 'measurementdate', 'testdate']);
const TIME_KEYS = new Set(['time', 'measurementtime', 'testtime']);

/** Values that mean "not given". */
const NOT_GIVEN = /^(|-+|n\/?a|none|null|unknown|not given)$/i;
/** Most keys kept in `meta.extra`, and their longest key and value text. */
export const MAX_EXTRA = 50;
const MAX_KEY_CHARS = 80;
const MAX_VALUE_CHARS = 200;

/** A metadata number with an optional unit: "25 °C", "0,1 m²", "1 kW/m2". */
function metaNumber(raw: string, lineNo: number, key: string): { value: number; unit: string } {
  const m = /^([+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d+)?)\s*(.*)$/.exec(raw.trim());
  if (!m) throw new IvInputError('bad-metadata', `metadata "${clip(key)}" should be a number, got "${clip(raw)}"`, lineNo);
  return { value: Number(m[1].replace(',', '.')), unit: plainUnit(m[2]) };
}

/**
 * The measurement time: ISO 8601 when the text reads as a date with a year, else as written. An
 * ISO date and time without a zone stays as written: the server's zone is no better a guess.
 */
function measuredAt(value: string): string {
  if (/^\d{4}-\d\d-\d\d[T ]\d\d:\d\d(:\d\d(\.\d+)?)?$/.test(value)) return value.replace(' ', 'T');
  const ms = Date.parse(value);
  return Number.isFinite(ms) && /\d{4}/.test(value) ? new Date(ms).toISOString() : value;
}

function parseMetaValue(field: MetaKey, raw: string, unitFromKey: string, lineNo: number, key: string): CurveMeta[MetaKey] {
  const value = raw.trim();
  if (field === 'device_id') {
    if (value === '') throw new IvInputError('bad-metadata', `metadata "${clip(key)}" is empty`, lineNo);
    return value;
  }
  if (field === 'measured_at') return measuredAt(value);
  const parsed = metaNumber(value, lineNo, key);
  const unit = parsed.unit || plainUnit(unitFromKey);
  const bad = (what: string): never => {
    throw new IvInputError('bad-metadata', `metadata "${clip(key)}": ${what}, got "${clip(value)}"`, lineNo);
  };
  switch (field) {
    case 'temp_c': {
      if (unit !== '' && unit !== 'c' && unit !== 'k') bad('temperature must be in °C or K');
      const t = toQuantity(parsed.value, unit, 'temperature') as number;
      if (!(t > -100 && t < 250)) bad('cell temperature must lie between −100 °C and 250 °C');
      return t;
    }
    case 'irradiance_w_m2': {
      const factor = unit === '' && normName(key) === 'suns' ? 1000 : irradianceFactor(unit);
      if (factor === undefined) bad('irradiance must be in W/m²');
      const g = parsed.value * (factor as number);
      if (!(g > 0 && g <= 5000)) bad('irradiance must be above 0 and at most 5000 W/m²');
      return g;
    }
    case 'cells': {
      // A count has no unit: "Cells (series)" or "60 cells" say what is counted.
      if (!(Number.isInteger(parsed.value) && parsed.value >= 1 && parsed.value <= 10000) || !['', 'cells', 'cell', 'pcs'].includes(parsed.unit)) bad('cells in series must be a whole number from 1 to 10000');
      return parsed.value;
    }
    case 'area_cm2': {
      const inCm2 = toQuantity(parsed.value, unit, 'area');
      if (inCm2 === null) bad('area must be in cm², m² or mm²');
      const area = inCm2 as number;
      if (!(area > 0 && area < 1e6)) bad('area must be positive (and below 100 m²)');
      return area;
    }
  }
  return undefined;
}

/** Text as it may be stored and shown: no control characters, bounded length. */
function tidy(text: string, max: number): string {
  // eslint-disable-next-line no-control-regex
  const plain = text.replace(/[\u0000-\u001f\u007f-\u009f]+/g, ' ').trim();
  return plain.length > max ? `${plain.slice(0, max - 1)}…` : plain;
}

const unquote = (s: string) => s.trim().replace(/^"(.*)"$/, '$1').trim();
const isNumber = (s: string) => NUMBER_RE.test(s.replace(',', '.'));
/** A short unit cell after a number: "h", "W/m2", "°C", "%". */
const UNIT_CELL = /^[%°µμA-Za-z][A-Za-z°µμ%/²³^·.-]{0,9}[0-9²³]?$/;

/** Key and value cells of a header-block line, or the line's text when it is one cell without a key (a title). */
export function splitMetaLine(text: string, sep: Separator): { key: string; values: string[] } | { title: string } | null {
  const body = text.trim();
  if (body === '') return null;
  const cells = sep === 'space' ? [unquote(body)] : splitRow(body, sep);
  const written = cells.length;
  while (cells.length && cells[cells.length - 1] === '') cells.pop();
  if (cells.length === 0) return null;
  // "Irradiance," is a key without a value, not a title.
  if (cells.length === 1 && written > 1) return { key: cells[0].replace(/\s*[:=]$/, ''), values: [] };
  // "Key:,1000,W/m2": the key cell ends in a colon.
  if (cells.length >= 2 && /[:=]$/.test(cells[0])) return { key: cells[0].replace(/\s*[:=]$/, ''), values: cells.slice(1).filter((c) => c !== '') };
  // "Key: value" when the key holds no separator: "Measured at: 2024-05-01, 10:00", "G: 0,8 kW/m2" are one value.
  const colon = /^([^:=]+?)\s*[:=]\s*([\s\S]*)$/.exec(cells.length === 1 ? cells[0] : body);
  if (colon && (sep === 'space' || cells.length === 1 || !colon[1].includes(sep))) {
    const value = unquote(colon[2]);
    return { key: unquote(colon[1]), values: value ? [value] : [] };
  }
  if (cells.length === 1) return { title: cells[0] };
  return { key: cells[0], values: cells.slice(1).filter((c) => c !== '') };
}

/** What the header block has given so far; `finish` writes it into the curve's meta. */
export type MetaBlock = {
  meta: CurveMeta;
  extra: MetaEntry[];
  notes: string[];
  /** Line of each known field, to say which line replaced which. */
  lines: Partial<Record<MetaKey, number>>;
  date?: { text: string; line: number };
  time?: { text: string; line: number };
  dropped: number;
};

export const newMetaBlock = (meta: CurveMeta, notes: string[]): MetaBlock => ({ meta, extra: [], notes, lines: {}, dropped: 0 });

function keep(block: MetaBlock, key: string, value: string): void {
  if (block.extra.length >= MAX_EXTRA) {
    block.dropped++;
    return;
  }
  block.extra.push({ key: tidy(key, MAX_KEY_CHARS), value: tidy(value, MAX_VALUE_CHARS) });
}

/**
 * Reads one line of the header block (a comment line without its `#` or `//`). A title line is
 * kept only when `titles` is true (a plain `#` comment is not metadata). True when the line
 * gave a known field.
 */
export function readMetaLine(block: MetaBlock, text: string, sep: Separator, lineNo: number, titles: boolean): boolean {
  const parts = splitMetaLine(text, sep);
  if (!parts) return false;
  if ('title' in parts) {
    if (titles) keep(block, 'Title', parts.title);
    return false;
  }
  const keyText = parts.key;
  if (keyText === '') return false;
  let { name, unit } = splitNameUnit(keyText);
  if (!META_KEYS[normName(name)]) {
    // "irradiance_kWm2", "G_W_m2": a unit glued to the name.
    const g = irradianceNameUnit(keyText);
    const t = temperatureNameUnit(keyText);
    if (META_KEYS[normName(g.name)] === 'irradiance_w_m2') ({ name, unit } = g);
    else if (META_KEYS[normName(t.name)] === 'temp_c') ({ name, unit } = t);
  }
  const norm = normName(name);
  const field = META_KEYS[norm];
  const values = parts.values;
  if (!field && !DATE_KEYS.has(norm) && !TIME_KEYS.has(norm)) {
    if (!values.length) return false;
    // "1203" and "h" read as "1203 h"; other cells as a list.
    const joined = values.length === 2 && isNumber(values[0]) && UNIT_CELL.test(values[1]) ? values.join(' ') : values.join(', ');
    keep(block, keyText, joined);
    return false;
  }
  const valueText = field === 'device_id' ? values.join(', ') : values.join(' ');
  if (DATE_KEYS.has(norm) || TIME_KEYS.has(norm)) {
    if (!NOT_GIVEN.test(valueText)) block[DATE_KEYS.has(norm) ? 'date' : 'time'] = { text: valueText, line: lineNo };
    return true;
  }
  if (field !== 'device_id' && NOT_GIVEN.test(valueText.trim())) {
    block.notes.push(`metadata "${clip(keyText)}" on line ${lineNo} gives no value; not used`);
    return true;
  }
  // A number and its unit cell: "1000" and "W/m2" → "1000 W/m2".
  const numeric = field === 'measured_at' ? valueText : values.slice(0, 2).join(' ');
  const value = parseMetaValue(field, numeric, unit, lineNo, keyText);
  const earlier = block.lines[field];
  if (earlier !== undefined) block.notes.push(`metadata "${clip(keyText)}" on line ${lineNo} replaces line ${earlier}`);
  block.lines[field] = lineNo;
  (block.meta as Record<MetaKey, CurveMeta[MetaKey]>)[field] = value;
  return true;
}

/** Ends the header block: the date and time lines become `measured_at`, the kept keys `meta.extra`. */
export function finishMetaBlock(block: MetaBlock): void {
  const { date, time, meta } = block;
  if ((date || time) && block.lines.measured_at === undefined) {
    meta.measured_at = measuredAt(date && time ? `${date.text} ${time.text}` : (date ?? time)!.text);
  }
  if (block.extra.length) meta.extra = block.extra;
  if (block.dropped) block.notes.push(`${block.dropped} more metadata line${block.dropped > 1 ? 's' : ''} not kept (at most ${MAX_EXTRA})`);
}
