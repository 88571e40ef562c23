/**
 * Display formatting for figures: significant digits, units, percentages for ratios.
 * The API and exports keep the engine's raw values (FF and efficiency as fractions).
 */
import type { ParamKey } from '@/lib/quality/params';

export const PARAM_LABELS: Record<ParamKey, string> = {
  isc_a: 'Isc',
  voc_v: 'Voc',
  pmp_w: 'Pmax',
  imp_a: 'Imp',
  vmp_v: 'Vmp',
  ff: 'FF',
  efficiency: 'Efficiency',
  rsh0_ohm: 'Rsh0 (slope)',
  rs0_ohm: 'Rs0 (slope)',
  iph_a: 'Iph',
  i0_a: 'I0',
  n: 'n',
  rs_ohm: 'Rs',
  rsh_ohm: 'Rsh',
  rmse_a: 'RMSE',
  j0_a_cm2: 'J0',
  stc_pmp_w: 'Pmax at STC',
};

/** Keys shown as percentages on screen. */
const PERCENT: ReadonlySet<string> = new Set(['ff', 'efficiency']);

const UNITS: Record<string, string> = {
  isc_a: 'A', voc_v: 'V', pmp_w: 'W', imp_a: 'A', vmp_v: 'V', rsh0_ohm: 'Ω', rs0_ohm: 'Ω', iph_a: 'A', i0_a: 'A',
  rs_ohm: 'Ω', rsh_ohm: 'Ω', rmse_a: 'A', j0_a_cm2: 'A/cm²', stc_pmp_w: 'W', ff: '%', efficiency: '%', n: '',
  i01_a: 'A', i02_a: 'A', n1: '', n2: '',
};

/** `digits` significant figures; exponent form below 1e-3 or from 1e6. '—' for null. */
export function sig(x: number | null | undefined, digits = 4): string {
  if (x == null || !Number.isFinite(x)) return '—';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a < 1e-3 || a >= 1e6) {
    const [mantissa, exponent] = x.toExponential(digits - 1).split('e');
    return `${mantissa}×10${toSup(exponent.replace('+', ''))}`;
  }
  const rounded = Number(x.toPrecision(digits));
  // 999999 rounds to 1e6 at 4 digits: show it the way 1e6 itself is shown.
  if (Math.abs(rounded) >= 1e6) return sig(rounded, digits);
  return String(rounded);
}

function toSup(d: string): string {
  const map = '⁰¹²³⁴⁵⁶⁷⁸⁹';
  return d.replace('-', '⁻').replace(/\d/g, (c) => map[Number(c)]);
}

/** The value of an engine key for display, with its unit ("0.7605 A", "78.1 %"). */
export function fmtParam(key: string, x: number | null | undefined, digits = 4): string {
  if (x == null || !Number.isFinite(x)) return '—';
  if (PERCENT.has(key)) return `${(x * 100).toFixed(key === 'ff' ? 1 : 2)} %`;
  const u = UNITS[key] ?? '';
  return u ? `${sig(x, digits)} ${u}` : sig(x, digits);
}

/** Unit of a key as shown on screen. */
export function unitOf(key: string): string {
  return UNITS[key] ?? '';
}
