/**
 * The checks of the device-physics forms, before anything is sent: each field's problem in the
 * form's own words (label and unit from the key table), with numbers rounded as a person writes
 * them, and the request only when every field is valid — so the screen never shows an answer to
 * input that is no longer there. The limits are the silicon model's (lib/physics/materials.ts),
 * the same the server applies.
 */
import { ZERO_C_IN_K } from '@/lib/physics/constants';
import { SILICON } from '@/lib/physics/materials';
import { sig } from '@/lib/numeric/significant';
import { readNumber } from '@/lib/schemas/numbers';
import type { BandDiagramRequest } from '@/lib/schemas/physics';
import { labelOf } from '@/lib/vocabulary';

/** A number as a person writes it in a message: at most six significant digits, a true minus. */
const shown = (x: number) => String(Number(x.toPrecision(6))).replace(/^-/, '−');

/** The model's temperatures in the unit of the field. */
function modelRange(unit: 'K' | '°C') {
  const offset = unit === 'K' ? 0 : ZERO_C_IN_K;
  return { min: SILICON.temp_range_k.min - offset, max: SILICON.temp_range_k.max - offset };
}

/** A temperature typed in `unit`: the number, or the problem in the words of the field `label`. */
export function temperatureField(text: string, unit: 'K' | '°C', label: string): { value: number; error: null } | { value: null; error: string } {
  const x = readNumber(text);
  if (x === undefined) return { value: null, error: `Enter the ${label.toLowerCase()} (${unit}).` };
  if (Number.isNaN(x)) return { value: null, error: `${label} (${unit}) must be a number.` };
  const r = modelRange(unit);
  if (x < r.min || x > r.max) return { value: null, error: `${label} (${unit}) must be from ${shown(r.min)} to ${shown(r.max)}, the ${SILICON.name} model's range (${shown(x)} is outside).` };
  return { value: x, error: null };
}

/** A density typed in cm⁻³ (0 allowed): the number, or the problem. */
function densityField(text: string, key: 'doping_cm3' | 'excess_cm3', max?: { value: number; what: string }): { value: number; error: null } | { value: null; error: string } {
  const label = `${labelOf(key)} (cm⁻³)`;
  const x = readNumber(text);
  if (x === undefined) return { value: null, error: `Enter the ${labelOf(key).toLowerCase()} in cm⁻³, e.g. 1e16.` };
  if (Number.isNaN(x)) return { value: null, error: `${label} must be a number, e.g. 1e16.` };
  if (x < 0) return { value: null, error: `${label} must not be negative.` };
  if (max && x > max.value) return { value: null, error: `${label} must be at most ${sig(max.value, 2)}, ${max.what} (${sig(x, 3)} is above).` };
  return { value: x, error: null };
}

export type ExplorerField = 'temp' | 'doping' | 'excess';

/**
 * The explorer's inputs checked: the temperature in kelvin when valid, the band-diagram request
 * when every field is, and each field's problem.
 */
export function checkExplorer(input: { tempText: string; unit: 'K' | 'C'; type: 'p' | 'n'; dopingText: string; excessText: string }): {
  temp_k: number | null;
  request: BandDiagramRequest | null;
  errors: Partial<Record<ExplorerField, string>>;
} {
  const unit = input.unit === 'K' ? 'K' : '°C';
  const temp = temperatureField(input.tempText, unit, labelOf('temp_k'));
  const doping = densityField(input.dopingText, 'doping_cm3', { value: SILICON.max_doping_cm3, what: `the solubility limit of dopants in ${SILICON.name}` });
  const excess = densityField(input.excessText, 'excess_cm3');
  const errors: Partial<Record<ExplorerField, string>> = {};
  if (temp.error) errors.temp = temp.error;
  if (doping.error) errors.doping = doping.error;
  if (excess.error) errors.excess = excess.error;
  // Rounded to µK: 26.85 °C is 300 K, not 300.00000000000006 K.
  const temp_k = temp.value === null ? null : Number((input.unit === 'K' ? temp.value : temp.value + ZERO_C_IN_K).toFixed(6));
  const request = temp_k !== null && doping.value !== null && excess.value !== null ? { type: input.type, doping_cm3: doping.value, excess_cm3: excess.value, generation_cm3_s: undefined, lifetime_s: undefined, temp_k } : null;
  return { temp_k, request, errors };
}

/**
 * A chart's "from … to …" temperature range in `unit`: both ends inside the model's range and
 * "to" above "from" (said at the "To" field). Empty ends take the defaults.
 */
export function checkRange(fromText: string, toText: string, unit: 'K' | '°C', defaults: { from: number; to: number }): {
  range: { from: number; to: number } | null;
  errors: { from?: string; to?: string };
} {
  const end = (text: string, label: string, fallback: number) => (text.trim() === '' ? { value: fallback, error: null } : temperatureField(text, unit, label));
  const from = end(fromText, 'From', defaults.from);
  const to = end(toText, 'To', defaults.to);
  const errors: { from?: string; to?: string } = {};
  if (from.error) errors.from = from.error;
  if (to.error) errors.to = to.error;
  if (from.value !== null && to.value !== null && !(to.value > from.value)) errors.to = `To (${unit}) must be above From (${shown(from.value)} ${unit}).`;
  return { range: errors.from || errors.to || from.value === null || to.value === null ? null : { from: from.value, to: to.value }, errors };
}
