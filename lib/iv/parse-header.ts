/** The header row (voltage and current columns with their units) and the "# key: value" metadata lines of I-V text. */
import { IvInputError } from '@/lib/iv/errors';
import { clip, NUMBER_RE } from '@/lib/iv/parse-cells';
import type { CurveMeta } from '@/lib/iv/types';

const VOLTAGE_NAMES = new Set(['v', 'u', 'volt', 'volts', 'voltage', 'bias', 'biasvoltage', 'vbias', 'vmeas', 'measuredvoltage', 'terminalvoltage', 'voltagemeasured']);
const CURRENT_NAMES = new Set(['i', 'current', 'curr', 'amps', 'ampere', 'amperes', 'imeas', 'measuredcurrent', 'terminalcurrent', 'currentmeasured']);
const DENSITY_NAMES = new Set(['j', 'jmeas', 'currentdensity', 'density']);
const VOLTAGE_UNITS: Record<string, number> = { '': 1, v: 1, volt: 1, volts: 1, mv: 1e-3, kv: 1e3, uv: 1e-6, 'µv': 1e-6, 'μv': 1e-6 };
const CURRENT_UNITS: Record<string, number> = { '': 1, a: 1, amp: 1, amps: 1, ma: 1e-3, ua: 1e-6, 'µa': 1e-6, 'μa': 1e-6, na: 1e-9 };

/** Splits a header cell like "Voltage (mV)", "current_a", "I / mA" or "V [V]" into name and unit. */
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

type MetaKey = keyof CurveMeta;
const META_KEYS: Record<string, MetaKey> = {};
for (const k of ['deviceid', 'device', 'id', 'serial', 'serialnumber', 'serialno', 'sn', 'sample', 'sampleid', 'module', 'moduleid', 'cell', 'cellid', 'name']) META_KEYS[k] = 'device_id';
for (const k of ['celltemperature', 'temperature', 'temp', 'tempc', 'celltemp', 'tcell', 't', 'devicetemperature', 'moduletemperature']) META_KEYS[k] = 'temp_c';
for (const k of ['irradiance', 'g', 'irradiancewm', 'irr', 'intensity', 'poairradiance']) META_KEYS[k] = 'irradiance_w_m2';
for (const k of ['cells', 'cellsinseries', 'ns', 'numberofcells', 'cellcount', 'seriescells', 'ncells', 'cellsseries']) META_KEYS[k] = 'cells';
for (const k of ['area', 'areacm', 'devicearea', 'cellarea', 'modulearea', 'totalarea', 'aperturearea']) META_KEYS[k] = 'area_cm2';
for (const k of ['measuredat', 'date', 'measured', 'timestamp', 'time', 'datetime', 'measurementdate', 'measurementtime']) META_KEYS[k] = 'measured_at';

/** A metadata number with an optional unit: "25 °C", "0,1 m²", "1 kW/m2". */
function metaNumber(raw: string, lineNo: number, key: string): { value: number; unit: string } {
  const m = /^([+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d+)?)\s*(.*)$/.exec(raw.trim());
  if (!m) throw new IvInputError('bad-metadata', `metadata "${clip(key)}" should be a number, got "${clip(raw)}"`, lineNo);
  return { value: Number(m[1].replace(',', '.')), unit: normUnit(m[2]).replace(/²/g, '2').replace(/^°|^deg/, '') };
}

function parseMetaValue(field: MetaKey, raw: string, unitFromKey: string, lineNo: number, key: string): CurveMeta[MetaKey] {
  const value = raw.trim();
  if (field === 'device_id') {
    if (value === '') throw new IvInputError('bad-metadata', `metadata "${clip(key)}" is empty`, lineNo);
    return value;
  }
  if (field === 'measured_at') {
    const ms = Date.parse(value);
    return Number.isFinite(ms) && /\d{4}/.test(value) ? new Date(ms).toISOString() : value;
  }
  const parsed = metaNumber(value, lineNo, key);
  const unit = parsed.unit || normUnit(unitFromKey).replace(/²/g, '2').replace(/^°|^deg/, '');
  const bad = (what: string): never => {
    throw new IvInputError('bad-metadata', `metadata "${clip(key)}": ${what}, got "${clip(raw.trim())}"`, lineNo);
  };
  switch (field) {
    case 'temp_c': {
      let t = parsed.value;
      if (unit === 'k') t -= 273.15;
      else if (unit !== '' && unit !== 'c') bad('temperature must be in °C or K');
      if (!(t > -100 && t < 250)) bad('cell temperature must lie between −100 °C and 250 °C');
      return t;
    }
    case 'irradiance_w_m2': {
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
export function readMetaLine(line: string, lineNo: number, meta: CurveMeta, notes: string[]): void {
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
export function readHeader(cells: string[], lineNo: number, notes: string[]) {
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
  if (v < 0) throw new IvInputError('no-voltage-column', `no voltage column in the header (${shown}); name it V, U, Voltage, voltage_v or Voltage (mV)`, lineNo);
  if (i < 0 && density) {
    throw new IvInputError('bad-unit', `column "${clip(density)}" holds a current density; give the current in A or mA (a column named I or Current)`, lineNo);
  }
  if (i < 0) throw new IvInputError('no-current-column', `no current column in the header (${shown}); name it I, Current, current_a or Current (mA)`, lineNo);
  if (ignored.length) notes.push(`columns not used: ${ignored.join(', ')}`);
  if (vFactor !== 1) notes.push('voltage converted from mV to V');
  if (iFactor !== 1) notes.push(`current converted to A (×${iFactor})`);
  return { v, i, vFactor, iFactor };
}
