/**
 * Field names in a person's words. The API and the command line name inputs by their keys
 * (`temp_k`, `doping_cm3`, `limits.stc_pmp_w.min`), which is what a script needs; a form names
 * them as it labels them ("Temperature (K)", "Pmax at STC (W) minimum"). The labels come from
 * the key table (lib/vocabulary.ts) and, for the spec's fields, from lib/quality/spec.ts.
 */
import { specFieldLabel } from '@/lib/quality/spec';
import { isKnownKey, labelOf, labelWithUnit, QUANTITIES } from '@/lib/vocabulary';

/** Text fields and choices of the forms that are not quantities. */
const TEXT_FIELD_LABELS: Record<string, string> = {
  name: 'Name',
  product_type: 'Product / cell type',
  supplier: 'Cell supplier',
  line: 'Line',
  lot: 'Lot',
  batch_date: 'Date',
  description: 'Notes',
  comment: 'Comment',
  reason: 'Reason',
  type: 'Doping type',
  method: 'Method',
  model: 'Model',
  batch_id: 'Batch',
  curve_id: 'Curve',
  spec_id: 'Spec',
  email: 'E-mail address',
  password: 'Password',
  role: 'Role',
};

/** Where the target and source conditions of a translation are written (to.temp_c, from.irradiance_w_m2). */
const CONDITION_PREFIX: Record<string, string> = { to: 'Target', from: 'Measured' };

/**
 * The label of the field at `path` as a form shows it: a quantity key → its label with unit
 * ("Doping (cm⁻³)"), a spec path → the spec editor's label, a text field → its label; the last
 * key itself when nothing knows it.
 */
export function fieldLabel(path: readonly PropertyKey[]): string {
  const p = path.map(String);
  if (p.length === 0) return '';
  if (p[0] === 'limits' || p[0] === 'power_classes' || p[0] === 'fail_flags') return specFieldLabel(p);
  const last = p[p.length - 1];
  if (isKnownKey(last)) {
    const prefix = p.length > 1 ? CONDITION_PREFIX[p[p.length - 2]] : undefined;
    const label = labelWithUnit(last);
    return prefix ? `${prefix} ${label.charAt(0).toLowerCase()}${label.slice(1)}` : label;
  }
  return TEXT_FIELD_LABELS[last] ?? last;
}

/**
 * One validation issue as a sentence naming its field: a message that is a sentence of its own
 * ("Cells in series must be a whole number from 1 to 1000.") stays as it is; "must …" joins the
 * label ("Rs (Ω) maximum must be a number"); anything else follows it after a colon.
 */
export function issueText(issue: { path: readonly PropertyKey[]; message: string }): string {
  const label = fieldLabel(issue.path);
  if (!label || /^[A-Z]/.test(issue.message)) return issue.message;
  return /^must /.test(issue.message) ? `${label} ${issue.message}` : `${label}: ${issue.message}`;
}

/** Keys of the table that a message may carry: those with a unit suffix or a dotted prefix, never a bare "n" or "p". */
const MESSAGE_KEYS = QUANTITIES.map((q) => q.key)
  .filter((k) => k.includes('_'))
  .sort((a, b) => b.length - a.length);
const MESSAGE_KEY_PATTERN = new RegExp(`\\b(?:(to|from)\\.)?(${MESSAGE_KEYS.join('|')})\\b`, 'g');

/**
 * A message from the API or an engine with its keys in words: "temp_k = −26.85 K is outside …"
 * → "Temperature = −26.85 K is outside …", "to.temp_c" → "target cell temperature". Only keys
 * with a unit suffix are replaced (a bare "n" or "p" may be a word). `labels` overrides a key's
 * words (a form that labels a field its own way).
 */
export function keysToWords(message: string, labels: Record<string, string> = {}): string {
  const out = message.replace(MESSAGE_KEY_PATTERN, (_m, prefix: string | undefined, key: string) => {
    const label = labels[key] ?? labelOf(key);
    return prefix ? `${CONDITION_PREFIX[prefix].toLowerCase()} ${label.charAt(0).toLowerCase()}${label.slice(1)}` : label;
  });
  return out.charAt(0).toUpperCase() + out.slice(1);
}
