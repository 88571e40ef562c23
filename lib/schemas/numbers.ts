/**
 * The one way forms and API requests read a number. Every schema in lib/schemas uses these, so
 * a value typed into any form means the same everywhere:
 *
 * - a JSON number is taken as it is (it must be finite);
 * - text is trimmed; empty text (or only spaces), null and a missing value mean "not given";
 * - a decimal comma is read as a point ("1,5" → 1.5); a comma together with a point, or two
 *   commas, is refused as ambiguous ("1,000.5");
 * - the minus may be typed as "−" (U+2212) or "–" (en dash), also in the exponent;
 * - exponent notation is read ("1e16", "2.5E-3");
 * - spaces (also no-break and thin spaces) are read only as thousands separators between groups
 *   of three digits ("16 610", "1 000 000"); anywhere else they make the text unreadable;
 * - anything else — words, "0x10", "Infinity", "1_000", "12 V" — is not a number.
 *
 * Bounds and whole numbers are checked after reading, with one message form:
 * "Cells in series must be a whole number from 1 to 1000."
 */
import { z } from 'zod';
import '@/lib/schemas/zod-setup';

/** What `readNumber` makes of an input: a number, NaN when the text is not one, undefined when not given. */
export type ReadNumber = number | undefined;

// Written without the g flag where only tested: a global regex keeps its lastIndex between calls.
const SPACE = /[\s\u00a0\u2009\u202f]/;
const SPACES = /[\s\u00a0\u2009\u202f]/g;
const PLAIN = /^[+-]?(\d+(\.\d*)?|\.\d+)(e[+-]?\d+)?$/i;
const GROUPED = /^[+-]?\d{1,3}( \d{3})+(\.\d*)?(e[+-]?\d+)?$/i;

/**
 * Reads a number written as a number or as text by the rules above: undefined when not given,
 * NaN when the text is not a number.
 */
export function readNumber(v: unknown): ReadNumber {
  if (v === undefined || v === null) return undefined;
  if (typeof v === 'number') return Number.isFinite(v) ? v : Number.NaN;
  if (typeof v !== 'string') return Number.NaN;
  let t = v.trim().replace(/[\u2212\u2013]/g, '-');
  if (t === '') return undefined;
  const commas = t.split(',').length - 1;
  if (commas > 1 || (commas === 1 && t.includes('.'))) return Number.NaN;
  t = t.replace(',', '.');
  if (SPACE.test(t)) {
    // One kind of space between groups of three digits, whatever space the keyboard typed.
    const grouped = t.replace(SPACES, ' ');
    if (!GROUPED.test(grouped)) return Number.NaN;
    t = grouped.replace(/ /g, '');
  }
  return PLAIN.test(t) ? Number(t) : Number.NaN;
}

/** Limits of a number field; both bounds inclusive. */
export type NumberRule = { min?: number; max?: number; integer?: boolean; unit?: string };

/** The message for a value that is not a number or breaks the rule, e.g. "Area (cm²) must be a number from 0.01 to 100000." */
export function numberMessage(label: string, rule: NumberRule = {}): string {
  const kind = rule.integer ? 'a whole number' : 'a number';
  const unit = rule.unit ? ` (${rule.unit})` : '';
  const { min, max } = rule;
  const range = min !== undefined && max !== undefined ? ` from ${min} to ${max}` : min !== undefined ? ` of at least ${min}` : max !== undefined ? ` of at most ${max}` : '';
  return `${label} must be ${kind}${unit}${range}.`;
}

/** True when a read number keeps the rule. */
function keeps(n: number, rule: NumberRule): boolean {
  return Number.isFinite(n) && (rule.min === undefined || n >= rule.min) && (rule.max === undefined || n <= rule.max) && (!rule.integer || Number.isInteger(n));
}

const input = z.union([z.number(), z.string()]).optional().nullable();

/** An optional number field: undefined when not given. */
export function optNumber(label: string, rule: NumberRule = {}) {
  return input.transform((v, ctx): number | undefined => {
    const n = readNumber(v);
    if (n === undefined) return undefined;
    if (!keeps(n, rule)) {
      ctx.addIssue({ code: 'custom', message: numberMessage(label, rule) });
      return z.NEVER;
    }
    return n;
  });
}

/** An optional number field for a stored column: null when not given (so an update can clear it). */
export function optNumberOrNull(label: string, rule: NumberRule = {}) {
  return optNumber(label, rule).transform((v): number | null => v ?? null);
}

/** A required number field; `missing` is the message when it is not given (default "<label> is required (<unit>)."). */
export function reqNumber(label: string, rule: NumberRule = {}, missing?: string) {
  return optNumber(label, rule).transform((v, ctx): number => {
    if (v === undefined) {
      ctx.addIssue({ code: 'custom', message: missing ?? `${label} is required${rule.unit ? ` (${rule.unit})` : ''}.` });
      return z.NEVER;
    }
    return v;
  });
}
