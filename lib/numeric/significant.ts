/** Numbers as people read them: significant digits, superscript exponents. */

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
