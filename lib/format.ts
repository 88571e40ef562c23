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
