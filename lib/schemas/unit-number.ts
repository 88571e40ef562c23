/**
 * Number fields that may be typed with a unit ("244 cm²", "0.4 kW", "−0.35 %/K", "25 degC"): text
 * with a unit is converted by mathjs (lib/units.ts) to the field's own unit before the number
 * schema reads it; a plain number is the field's unit as before. A unit of another quantity is an
 * error that names the field. Used by the batch, upload and refit forms (lib/schemas/curves.ts) and
 * the translation form (lib/schemas/physics.ts).
 */
import { z } from 'zod';
import { parseQuantity } from '@/lib/units';
import type { Quantity } from '@/lib/units';

/** True when `v` is text that starts like a number and has unit letters after it (an exponent is not a unit). */
export function hasUnit(v: unknown): v is string {
  return typeof v === 'string' && /^\s*[+\-−–]?[\d.,]/.test(v) && /[A-Za-z%°Ωµμ²]/.test(v.replace(/^\s*[+\-−–]?[\d.,]+[eE][+\-−–]?\d+\s*$/, ''));
}

/**
 * `field` (a number schema) that also takes a number with a unit of `quantity`; `scale` takes
 * lib/units' unit to the field's (%/K → 1/K is 0.01); `hint` follows the message of a wrong unit.
 */
export const withUnit = <T extends z.ZodType>(field: T, name: string, quantity: Quantity, scale = 1, hint = '') =>
  z.preprocess((v, ctx) => {
    // Only a number followed by a unit is read by mathjs; anything else is left to the number schema's own message.
    if (!hasUnit(v)) return v;
    const r = parseQuantity(v, quantity);
    if ('error' in r) {
      ctx.addIssue({ code: 'custom', message: `${name}: ${r.error}${hint ? `. ${hint}` : ''}` });
      return z.NEVER;
    }
    return r.value * scale;
  }, field);
