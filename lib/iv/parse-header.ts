/**
 * The header row of I-V text: which cells name the voltage and current columns (with their units),
 * and the optional irradiance and temperature columns. The lines before it are read in parse-meta.ts.
 */
import { IvInputError } from '@/lib/iv/errors';
import { clip, NUMBER_RE } from '@/lib/iv/parse-cells';
import { toQuantity } from '@/lib/units';

const VOLTAGE_NAMES = new Set(['v', 'u', 'volt', 'volts', 'voltage', 'bias', 'biasvoltage', 'vbias', 'vmeas', 'measuredvoltage', 'terminalvoltage', 'voltagemeasured']);
const CURRENT_NAMES = new Set(['i', 'current', 'curr', 'amps', 'ampere', 'amperes', 'imeas', 'measuredcurrent', 'terminalcurrent', 'currentmeasured']);
const DENSITY_NAMES = new Set(['j', 'jmeas', 'currentdensity', 'density']);
/** Unit text → factor to V or A through mathjs units (lib/units.ts); null when it is no voltage or current unit. */
const voltageFactor = (u: string) => toQuantity(1, u, 'voltage');
const currentFactor = (u: string) => toQuantity(1, u, 'current');

/** Splits a header cell like "Voltage (mV)", "current_a", "I / mA" or "V [V]" into name and unit. */
export function splitNameUnit(cell: string): { name: string; unit: string } {
  const text = cell.trim().replace(/^["']|["']$/g, '').trim();
  const bracket = /^(.*?)[\s_]*[([]\s*([^)\]]*?)\s*[)\]]\s*$/.exec(text);
  if (bracket) return { name: bracket[1], unit: bracket[2] };
  const slash = /^(.*?)\s*\/\s*(\S+)$/.exec(text);
  if (slash) return { name: slash[1], unit: slash[2] };
  const inUnit = /^(.*?)\s+in\s+(\S+)$/i.exec(text);
  if (inUnit) {
    const u = inUnit[2].toLowerCase();
    if (voltageFactor(u) !== null || currentFactor(u) !== null) return { name: inUnit[1], unit: inUnit[2] };
  }
  const underscore = /^(.*?)_([A-Za-zµμ]+)$/.exec(text);
  if (underscore) {
    const u = underscore[2].toLowerCase();
    if (voltageFactor(u) !== null || currentFactor(u) !== null) return { name: underscore[1], unit: underscore[2] };
  }
  return { name: text, unit: '' };
}

export const normName = (s: string) => s.toLowerCase().replace(/[^a-z]/g, '');
export const normUnit = (s: string) => s.trim().toLowerCase().replace(/\s+/g, '');

/** Irradiance unit → factor to W/m² through mathjs units (lib/units.ts; "suns" as 1000 W/m² each, the STC irradiance of IEC 60904-3); undefined when unknown. */
export const irradianceFactor = (u: string): number | undefined => toQuantity(1, u, 'irradiance') ?? undefined;
const IRRADIANCE_COLUMNS = new Set(['irradiance', 'g', 'irr', 'irradiancewm', 'irradiancekwm', 'intensity', 'poairradiance', 'gpoa', 'gmeas', 'measuredirradiance', 'irradiancemeasured', 'suns', 'sun']);
const TEMPERATURE_COLUMNS = new Set(['temperature', 'temp', 'tempc', 'tcell', 'celltemperature', 'celltemp', 'moduletemperature', 'moduletemp', 'tmod', 'tmodule', 'devicetemperature']);

/** A unit as the metadata and column rules compare it: lower case, no spaces, "²" as "2", no degree sign. */
export const plainUnit = (u: string) => normUnit(u).replace(/²/g, '2').replace(/^°|^deg/, '');

/** Name and unit of an irradiance cell; also "irradiance_W_m2", "G_kWm2", "Irradiance in W/m²". */
export function irradianceNameUnit(cell: string): { name: string; unit: string } {
  const glued = /^(.*?)[\s_]+(k?w)[\s_/]*(c?m)\^?[\s_]*[2²]$/i.exec(cell.trim());
  if (glued) return { name: glued[1], unit: `${glued[2]}/${glued[3]}2` };
  const inUnit = /^(.*?)\s+in\s+(\S+)$/i.exec(cell.trim());
  if (inUnit) return { name: inUnit[1], unit: inUnit[2] };
  return splitNameUnit(cell);
}

/** Name and unit of a temperature cell with the unit glued on: "T_cell_C", "temperature_K", "Temp degC". */
export function temperatureNameUnit(cell: string): { name: string; unit: string } {
  const glued = /^(.*?)[\s_]+(°?c|k|degc)$/i.exec(cell.trim());
  return glued ? { name: glued[1], unit: glued[2] } : splitNameUnit(cell);
}

/** Which roles the cells of a row name, by the column name rules alone (units are checked by readHeader). */
export function columnRoles(cells: readonly string[]): { voltage: boolean; current: boolean; density: boolean } {
  const roles = { voltage: false, current: false, density: false };
  for (const cell of cells) {
    if (cell === '') continue;
    const key = normName(splitNameUnit(cell).name);
    if (VOLTAGE_NAMES.has(key)) roles.voltage = true;
    else if (CURRENT_NAMES.has(key)) roles.current = true;
    else if (DENSITY_NAMES.has(key)) roles.density = true;
  }
  return roles;
}

/** A column read beside voltage and current: its position, the header text and how a cell becomes W/m² or °C. */
export type SideColumn = { idx: number; cell: string; factor: number; offset: number };

/** The irradiance or temperature column a header cell names, or a note why it is not used; null for other cells. */
function sideColumn(cell: string, idx: number, notes: string[]): { kind: 'g' | 't'; col: SideColumn } | null {
  const g = irradianceNameUnit(cell);
  const gKey = normName(g.name);
  if (IRRADIANCE_COLUMNS.has(gKey)) {
    const u = plainUnit(g.unit);
    const factor = u === '' && (gKey === 'suns' || gKey === 'sun') ? 1000 : irradianceFactor(u);
    if (factor === undefined) {
      notes.push(`column "${clip(cell)}" not read as irradiance: unknown unit "${clip(g.unit)}" (use W/m², kW/m² or suns)`);
      return null;
    }
    return { kind: 'g', col: { idx, cell, factor, offset: 0 } };
  }
  const t = TEMPERATURE_COLUMNS.has(normName(splitNameUnit(cell).name)) ? splitNameUnit(cell) : temperatureNameUnit(cell);
  const tKey = normName(t.name);
  const u = plainUnit(t.unit);
  // A bare "T" is a temperature only with a temperature unit: "t" alone is as often a time.
  if (TEMPERATURE_COLUMNS.has(tKey) || (tKey === 't' && (u === 'c' || u === 'k'))) {
    if (u !== '' && u !== 'c' && u !== 'k') {
      notes.push(`column "${clip(cell)}" not read as temperature: unknown unit "${clip(t.unit)}" (use °C or K)`);
      return null;
    }
    const offset = toQuantity(0, u, 'temperature') ?? 0;
    return { kind: 't', col: { idx, cell, factor: (toQuantity(1, u, 'temperature') ?? 1) - offset, offset } };
  }
  return null;
}

/**
 * Voltage and current column positions and unit factors from the header row, and the irradiance
 * (`g`, to W/m²) and temperature (`t`, to °C) columns when the header names them.
 */
export function readHeader(cells: string[], lineNo: number, notes: string[]) {
  if (cells.every((c) => c === '' || NUMBER_RE.test(c.replace(',', '.')))) {
    throw new IvInputError('no-header', 'expected a header row naming the voltage and current columns (for example "V,I" or "Voltage (mV);Current (mA)"), found numbers', lineNo);
  }
  let v = -1;
  let i = -1;
  let vFactor = 1;
  let iFactor = 1;
  let g: SideColumn | null = null;
  let t: SideColumn | null = null;
  const ignored: string[] = [];
  let density = '';
  cells.forEach((cell, idx) => {
    const { name, unit } = splitNameUnit(cell);
    const key = normName(name);
    const u = normUnit(unit);
    if (VOLTAGE_NAMES.has(key) && v < 0) {
      const vf = voltageFactor(u);
      if (vf === null) throw new IvInputError('bad-unit', `column "${clip(cell)}": unknown voltage unit "${clip(unit)}" (use V or mV)`, lineNo);
      v = idx;
      vFactor = vf;
    } else if (CURRENT_NAMES.has(key) && i < 0) {
      const cf = currentFactor(u);
      if (cf === null) {
        const density = u.includes('/');
        throw new IvInputError('bad-unit', `column "${clip(cell)}": unknown current unit "${clip(unit)}"${density ? ' (a current density; give the current in A or mA)' : ' (use A or mA)'}`, lineNo);
      }
      i = idx;
      iFactor = cf;
    } else if (cell !== '') {
      const side = g && t ? null : sideColumn(cell, idx, notes);
      if (side?.kind === 'g' && !g) g = side.col;
      else if (side?.kind === 't' && !t) t = side.col;
      else {
        if (DENSITY_NAMES.has(key)) density = cell;
        ignored.push(cell);
      }
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
  return { v, i, vFactor, iFactor, g: g as SideColumn | null, t: t as SideColumn | null };
}
