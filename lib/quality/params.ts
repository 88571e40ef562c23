/**
 * The parameter keys that batch statistics and acceptance limits refer to. They are exactly the
 * I-V engine's result keys, so a limit, a statistic and a measured value always share one name.
 * Labels and units are the key table's (lib/vocabulary.ts).
 */
import { formatValue as formatShown, storedUnitOf } from '@/lib/vocabulary';

/** Measured key figures of one curve (no model). */
export const METRIC_KEYS = [
  'isc_a',
  'voc_v',
  'pmp_w',
  'imp_a',
  'vmp_v',
  'ff',
  'efficiency',
  'rsh0_ohm',
  'rs0_ohm',
] as const;

/** Single-diode fit parameters and the fit's residual. */
export const FIT_KEYS = ['iph_a', 'i0_a', 'n', 'rs_ohm', 'rsh_ohm', 'rmse_a'] as const;

/** Figures derived from the fit or translated to STC. */
export const DERIVED_KEYS = ['j0_a_cm2', 'stc_pmp_w'] as const;

/** Every key a limit, a statistic or an export column may use, in display order. */
export const PARAM_KEYS = [...METRIC_KEYS, ...FIT_KEYS, ...DERIVED_KEYS] as const;

export type ParamKey = (typeof PARAM_KEYS)[number];

/**
 * Unit of each key as stored and sent (from the key table, lib/vocabulary.ts). FF and efficiency
 * are ratios in the engine's own scale (not %); the diode ideality factor n is dimensionless.
 */
export const PARAM_UNITS = Object.fromEntries(PARAM_KEYS.map((k) => [k, storedUnitOf(k)])) as Record<ParamKey, string>;

const PARAM_KEY_SET: ReadonlySet<string> = new Set(PARAM_KEYS);

/** True when `key` is one of the engine's result keys. */
export function isParamKey(key: string): key is ParamKey {
  return PARAM_KEY_SET.has(key);
}

/**
 * A number for messages: six significant digits, exponent form for very small or large
 * magnitudes (I0 is ~1e-7 A), so that a value just past a bound never prints equal to it.
 */
export function formatValue(x: number): string {
  if (x === 0) return '0';
  const abs = Math.abs(x);
  if (abs < 1e-3 || abs >= 1e7) return x.toExponential(5).replace(/\.?0+e/, 'e');
  return String(Number(x.toPrecision(6)));
}

/** "0.512 Ω", "81.0 %" for messages: the value as the screens show it (lib/vocabulary.ts). */
export function formatWithUnit(x: number, key: ParamKey): string {
  return formatShown(key, x);
}
