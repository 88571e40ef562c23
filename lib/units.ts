/**
 * Units typed by people — in file headers, metadata lines, command-line options and form fields —
 * converted by mathjs's unit system (mathjs `unit(...).toNumber(target)`), not by a table of
 * factors. This file only brings the text into mathjs's spelling: case (files write "MV" or "ma"
 * for mV and mA), "²" and "m2" as "m^2", "°C" as "degC", "Ω" as "ohm", "µ" as "u", "%" as percent,
 * "suns" as 1000 W/m² each (the STC irradiance, IEC 60904-3). Pure; safe in the web bundle (only
 * the unit part of mathjs is loaded; its parser never evaluates code).
 */
import { create, createUnitDependencies, unitDependencies } from 'mathjs';

let math: ReturnType<typeof create> | null = null;

/**
 * mathjs's unit system, made on first use: a reader that meets only the units numbers are kept in
 * (V, A, degC, W/m^2…) never needs it (see `convert`), and where mathjs's main entry is loaded
 * whole (jest has no tree shaking) it costs ~0.8 s of CPU to build.
 */
function unitMath(): ReturnType<typeof create> {
  if (!math) {
    math = create({ unitDependencies, createUnitDependencies });
    math.createUnit('sun', '1000 W/m^2');
    math.createUnit('percent', { definition: '0.01' });
  }
  return math;
}

/** The quantities the product reads, each with the unit its numbers are kept in. */
export const TARGET_UNITS = {
  voltage: 'V',
  current: 'A',
  power: 'W',
  irradiance: 'W/m^2',
  area: 'cm^2',
  temperature: 'degC',
  resistance: 'ohm',
  voltage_per_k: 'V/K',
  current_per_k: 'A/K',
  power_per_k: 'W/K',
  relative_per_k: 'percent/K',
  resistance_per_k: 'ohm/K',
} as const;
export type Quantity = keyof typeof TARGET_UNITS;

/** Units accepted for each quantity, as the README lists them (any other mathjs spelling of the same dimension works too). */
export const ACCEPTED_UNITS: Record<Quantity, string> = {
  voltage: 'V, mV, kV, µV',
  current: 'A, mA, µA, nA',
  power: 'W, kW, mW',
  irradiance: 'W/m², kW/m², mW/cm², W/cm², suns',
  area: 'cm², m², mm²',
  temperature: '°C (degC), K, °F (degF)',
  resistance: 'Ω (ohm), mΩ, kΩ',
  voltage_per_k: 'V/K, mV/K, mV/°C',
  current_per_k: 'A/K, mA/K',
  power_per_k: 'W/K, mW/K',
  relative_per_k: '%/K, %/°C, 1/K',
  resistance_per_k: 'Ω/K, mΩ/K',
};

const PREFIX = new Set(['k', 'm', 'u', 'n', 'M', 'c']);
const SYMBOL: Record<string, string> = { v: 'V', a: 'A', w: 'W', m: 'm', ohm: 'ohm', k: 'K', s: 's', sun: 'sun', suns: 'sun', percent: 'percent', degc: 'degC', degf: 'degF', c: 'degC', f: 'degF', volt: 'V', volts: 'V', amp: 'A', amps: 'A' };

/** One unit word in mathjs spelling: "mv" → "mV", "KW" → "kW", "degc" → "degC", "MA" → "mA". */
function word(w: string): string | null {
  const l = w.toLowerCase();
  if (l in SYMBOL) return SYMBOL[l];
  const p = l[0] === 'µ' || l[0] === 'μ' ? 'u' : l[0];
  const rest = l.slice(1);
  // A prefixed symbol: files write milli as "m" or "M" alike ("MV" for mV); mega is not met on an I-V bench.
  if (rest in SYMBOL && rest !== 'k' && rest !== 'c' && rest !== 'f' && PREFIX.has(p === 'M' ? 'm' : p)) return `${p}${SYMBOL[rest]}`;
  return null;
}

/** Unit text in mathjs spelling, or null when a word is not a unit. */
export function mathjsUnit(text: string): string | null {
  let t = text.trim()
    .replace(/²/g, '^2')
    .replace(/³/g, '^3')
    .replace(/Ω/g, 'ohm')
    .replace(/°\s*/g, 'deg')
    .replace(/%/g, 'percent')
    .replace(/[·*]/g, ' ')
    .replace(/([A-Za-z])\.([A-Za-z])/g, '$1 $2');
  if (t === '') return '';
  // "W/m2", "m2", "W m-2", "Wm-2": exponents written without ^.
  t = t.replace(/([A-Za-zµμ])(-?\d)/g, '$1^$2');
  // Glued irradiance: "wm^2", "kwm^2", "wm^-2".
  t = t.replace(/^([kKmM]?)[wW]m\^(-?)2$/, (_, p: string, neg: string) => `${p}W ${neg ? 'm^-2' : '/ m^2'}`.replace('W / m', 'W/m'));
  const parts = t.split(/(\s*\/\s*|\s+|\^-?\d+)/).filter((x) => x !== '' && x !== undefined);
  const out: string[] = [];
  for (const part of parts) {
    if (/^\s*\/\s*$/.test(part)) out.push('/');
    else if (/^\s+$/.test(part)) out.push(' ');
    else if (/^\^-?\d+$/.test(part)) out.push(part);
    else if (/^1$/.test(part)) out.push('1');
    else {
      const w = word(part);
      if (w === null) return null;
      out.push(w);
    }
  }
  // "1/K" as "K^-1" (mathjs reads a unit, not a fraction).
  return out.join('').replace(/^1\s*\/\s*([A-Za-z]+)$/, '$1^-1');
}

/**
 * The factor that turns a number in `unitText` into the quantity's own unit (mV → V: 0.001), or null
 * when the text is not a unit of that quantity. Not for temperature (it has an offset): use toQuantity.
 */
export function unitFactor(unitText: string, quantity: Exclude<Quantity, 'temperature'>): number | null {
  return toQuantity(1, unitText, quantity);
}

/** Conversions remembered by toQuantity (a typed form's values included, hence the bound). */
const remembered = new Map<string, number | null>();
const REMEMBERED_MAX = 1000;

/** `value` in `unitText` as the quantity's own unit; an empty unit means the own unit already. Null when the unit does not fit. */
export function toQuantity(value: number, unitText: string, quantity: Quantity): number | null {
  // Remembered: a file's reader asks for the same few factors (1 mV in volts…) for every file, and
  // mathjs parses the unit text each time (~0.2 ms, a twentieth of a file's analysis, measured).
  const key = `${value}\u0000${unitText}\u0000${quantity}`;
  const known = remembered.get(key);
  if (known !== undefined) return known;
  const v = convert(value, unitText, quantity);
  if (remembered.size >= REMEMBERED_MAX) remembered.clear();
  remembered.set(key, v);
  return v;
}

function convert(value: number, unitText: string, quantity: Quantity): number | null {
  const target = TARGET_UNITS[quantity];
  const u = mathjsUnit(unitText);
  if (u === null) return null;
  // Already in the quantity's own unit (offsets included: degC to degC).
  if (u === '' || u === target) return value;
  try {
    const math = unitMath();
    const q = math.unit(value, u);
    if (!q.equalBase(math.unit(target))) return null;
    return q.toNumber(target);
  } catch {
    return null;
  }
}

/** A number with its unit, as a person types it ("−0.35 %/K", "-120 mV/°C", "0.8 kW/m²"), in the quantity's own unit; an error in words otherwise. */
export function parseQuantity(text: string, quantity: Quantity): { value: number } | { error: string } {
  const m = /^\s*([+\-−]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+\-−]?\d+)?)\s*(.*)$/.exec(text ?? '');
  if (!m) return { error: `"${text}" is not a number with a unit (for example ${ACCEPTED_UNITS[quantity].split(', ')[0].replace(/^/, '1 ')})` };
  const value = Number(m[1].replace('−', '-').replace(',', '.'));
  const v = toQuantity(value, m[2], quantity);
  if (v === null) return { error: `"${m[2].trim()}" is not a unit of ${quantity.replace(/_/g, ' ').replace('per k', 'per kelvin')} (use ${ACCEPTED_UNITS[quantity]})` };
  return { value: v };
}
