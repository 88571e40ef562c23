/**
 * Display formatting for figures: significant digits, units, percentages for ratios. Labels,
 * units and digits come from the key table (lib/vocabulary.ts); the API and exports keep the
 * engine's raw values (FF and efficiency as fractions).
 */
import type { ParamKey } from '@/lib/quality/params';
import { PARAM_KEYS } from '@/lib/quality/params';
import { formatValue, labelOf, unitOf } from '@/lib/vocabulary';

export { sig } from '@/lib/numeric/significant';
export { unitOf };

/** Labels of the parameter keys (limits, statistics, the comparison grid), from the key table. */
export const PARAM_LABELS = Object.fromEntries(PARAM_KEYS.map((k) => [k, labelOf(k)])) as Record<ParamKey, string>;

/** The value of an engine key for display, with its unit ("0.7605 A", "78.1 %"); see formatValue in lib/vocabulary.ts. */
export function fmtParam(key: string, x: number | null | undefined, digits?: number): string {
  return formatValue(key, x, digits);
}

export { formatNumber, formatNumberAgainst, labelWithUnit } from '@/lib/vocabulary';

const DATE_ONLY = /^\d{4}-\d{2}-\d{2}$/;
const pad = (n: number) => String(n).padStart(2, '0');

/**
 * The one way a date or a moment is shown: ISO 8601 ("2026-12-02"; with `time`, "2026-12-02
 * 14:03"), never a locale's 12/2/2026 nor a raw timestamp. Moments are shown in the reader's
 * local time (the browser's, the server's for a mail), or in UTC with a "UTC" suffix when `utc`
 * is set. A calendar date written yyyy-mm-dd is shown as written (no time zone can move it to
 * the day before). '—' for nothing; text that is no date is returned as it is.
 */
export function formatDate(value: string | number | Date | null | undefined, options: { time?: boolean; utc?: boolean } = {}): string {
  if (value == null || value === '') return '—';
  if (typeof value === 'string' && DATE_ONLY.test(value.trim())) return value.trim();
  const d = value instanceof Date ? value : new Date(value);
  if (Number.isNaN(d.getTime())) return String(value);
  const utc = !!options.utc;
  const [y, mo, da, h, mi] = utc
    ? [d.getUTCFullYear(), d.getUTCMonth() + 1, d.getUTCDate(), d.getUTCHours(), d.getUTCMinutes()]
    : [d.getFullYear(), d.getMonth() + 1, d.getDate(), d.getHours(), d.getMinutes()];
  const date = `${y}-${pad(mo)}-${pad(da)}`;
  if (!options.time) return date;
  return `${date} ${pad(h)}:${pad(mi)}${utc ? ' UTC' : ''}`;
}

/** A moment with its time: formatDate(value, { time: true }). */
export const formatDateTime = (value: string | number | Date | null | undefined, options: { utc?: boolean } = {}) => formatDate(value, { ...options, time: true });
