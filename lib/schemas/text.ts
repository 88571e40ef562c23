/**
 * The one rule for text that is stored and shown again (names, ids, comments, descriptions):
 * a length limit, and no control characters — NUL above all, which PostgreSQL cannot store and
 * which would fail a whole transaction of curves. Tab, line feed and carriage return are allowed
 * only in multi-line text (descriptions, comments).
 */
import { z } from 'zod';
import '@/lib/schemas/zod-setup';

// C0 controls, DEL and C1 controls; the multi-line form leaves out tab, LF and CR.
// eslint-disable-next-line no-control-regex
const CONTROL = /[\u0000-\u001f\u007f-\u009f]/;
// eslint-disable-next-line no-control-regex
const CONTROL_MULTILINE = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f]/;

export type TextRule = { max: number; multiline?: boolean };

/** What is wrong with a text, as the end of a sentence ("… contains a zero character (NUL)"), or undefined. */
export function textProblem(value: string, rule: TextRule): string | undefined {
  if (value.includes('\u0000')) return 'contains a zero character (NUL)';
  if ((rule.multiline ? CONTROL_MULTILINE : CONTROL).test(value)) return 'contains a control character';
  // Characters as people count them (a surrogate pair is one), so an emoji does not count twice.
  const length = [...value].length;
  if (length > rule.max) return `is longer than ${rule.max} characters (${length})`;
  return undefined;
}

/**
 * A stored text field: trimmed, at most `max` characters, no control characters; `min` 1 makes
 * it required with `missing` as the message. Messages name the field by `label`.
 */
export function safeText(label: string, rule: TextRule & { min?: number; missing?: string }) {
  return z
    .string({ message: `${label} must be text.` })
    .trim()
    .superRefine((v, ctx) => {
      if (rule.min && v.length < rule.min) {
        ctx.addIssue({ code: 'custom', message: rule.missing ?? `${label} is required.` });
        return;
      }
      const problem = textProblem(v, rule);
      if (problem) ctx.addIssue({ code: 'custom', message: `${label} ${problem}.` });
    });
}

/** An optional stored text field: null when empty or not given (so an update can clear it). */
export function optSafeText(label: string, rule: TextRule) {
  return safeText(label, rule)
    .optional()
    .nullable()
    .transform((v) => (v ? v : null));
}

/**
 * A calendar date written yyyy-mm-dd that exists (2026-02-30 and 2026-13-01 do not), years
 * 1900–2999. Returns the message or undefined.
 */
export function dateProblem(value: string, label: string): string | undefined {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(value);
  if (!m) return `${label} must be written yyyy-mm-dd.`;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const date = new Date(Date.UTC(y, mo - 1, d));
  if (y < 1900 || y > 2999 || date.getUTCFullYear() !== y || date.getUTCMonth() !== mo - 1 || date.getUTCDate() !== d) {
    return `${label} ${value} is not a date in the calendar.`;
  }
  return undefined;
}

/** An optional date field (yyyy-mm-dd, a real calendar date): null when not given. */
export function optDate(label: string) {
  return z
    .string({ message: `${label} must be text written yyyy-mm-dd.` })
    .trim()
    .optional()
    .nullable()
    .superRefine((v, ctx) => {
      const problem = v ? dateProblem(v, label) : undefined;
      if (problem) ctx.addIssue({ code: 'custom', message: problem });
    })
    .transform((v) => (v ? v : null));
}
