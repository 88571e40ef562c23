import { fmtParam, formatDate, formatDateTime, PARAM_LABELS, sig, unitOf } from '@/lib/format';
import { PARAM_KEYS } from '@/lib/quality/params';

// Expected strings worked out by hand from the rules in lib/format.ts: `digits` significant
// figures, trailing zeros dropped in plain form, exponent form (mantissa × 10 with a superscript
// exponent) below 1e-3 and from 1e6; FF with 1 decimal and efficiency with 2 as percentages.

describe('sig()', () => {
  it.each([
    [0.76026, 4, '0.7603'],
    [0.57278, 4, '0.5728'],
    [381.24, 4, '381.2'],
    [1234.5, 4, '1235'], // half rounds up (toPrecision picks the larger n on a tie)
    [52.89, 3, '52.9'],
    [0.35, 3, '0.35'], // plain form drops the trailing zero
    [0.001, 4, '0.001'], // 1e-3 itself is still plain
    [-0.5728, 3, '-0.573'],
    [999_999, 7, '999999'],
  ])('sig(%p, %i) = %s (plain form)', (x, digits, out) => {
    expect(sig(x, digits)).toBe(out);
  });

  it.each([
    [3.1068e-7, 4, '3.107×10⁻⁷'],
    [7.7301e-4, 4, '7.730×10⁻⁴'], // exponent form keeps the significant zero
    [1.2e6, 3, '1.20×10⁶'],
    [1e-10, 2, '1.0×10⁻¹⁰'], // two-digit exponent
    [-4.5e-5, 2, '-4.5×10⁻⁵'],
    [6.02214076e23, 4, '6.022×10²³'],
    [9.9999e-4, 3, '1.00×10⁻³'], // rounds up across a decade inside the mantissa
  ])('sig(%p, %i) = %s (superscript exponent)', (x, digits, out) => {
    expect(sig(x, digits)).toBe(out);
  });

  it('every digit maps to its superscript', () => {
    const exps = ['⁰', '¹', '²', '³', '⁴', '⁵', '⁶', '⁷', '⁸', '⁹'];
    for (let d = 0; d <= 9; d++) {
      // 1e-(10+d): exponent "1d" → "¹" + superscript d
      expect(sig(Number(`1e-${10 + d}`), 1)).toBe(`1×10⁻¹${exps[d]}`);
    }
  });

  it.each([null, undefined, Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY])('sig(%p) = — (never "NaN" on screen)', (x) => {
    expect(sig(x)).toBe('—');
  });

  it('zero is "0" and the default is 4 significant figures', () => {
    expect(sig(0)).toBe('0');
    expect(sig(Math.PI)).toBe('3.142');
  });
});

describe('fmtParam()', () => {
  it.each([
    // Figures of the 57 mm reference cell (reference-data README) and a made-up module.
    ['isc_a', 0.76026, undefined, '0.7603 A'],
    ['voc_v', 49.374, undefined, '49.37 V'],
    ['pmp_w', 381.24, undefined, '381.2 W'],
    ['rs_ohm', 0.036547, 3, '0.0365 Ω'],
    ['rsh_ohm', 52.89, undefined, '52.89 Ω'],
    ['i0_a', 3.1068e-7, undefined, '3.107×10⁻⁷ A'],
    ['j0_a_cm2', 1.9e-12, 3, '1.90×10⁻¹² A/cm²'],
    ['rmse_a', 7.7301e-4, undefined, '7.730×10⁻⁴ A'],
    ['stc_pmp_w', 0.3349, undefined, '0.3349 W'],
    ['n', 1.47727, undefined, '1.477'], // dimensionless: no unit
    ['n', 1.47727, 3, '1.48'],
    ['i02_a', 2.3e-7, 2, '2.3×10⁻⁷ A'],
    ['some_new_key', 2.5, undefined, '2.5'], // unknown key: number only
  ])('%s %p (digits %p) → %s', (key, x, digits, out) => {
    expect(fmtParam(key, x, digits)).toBe(out);
  });

  it.each([
    // FF is shown with one decimal, efficiency with two; the engine keeps fractions.
    ['ff', 0.71349, '71.3 %'],
    ['ff', 0.787, '78.7 %'],
    ['ff', 1, '100.0 %'],
    ['efficiency', 0.2153, '21.53 %'],
    ['efficiency', 0.155347, '15.53 %'],
    ['efficiency', 0.0005, '0.05 %'], // a percentage, never exponent form
  ])('%s %p → %s', (key, x, out) => {
    expect(fmtParam(key, x)).toBe(out);
  });

  it.each([null, undefined, Number.NaN, Number.POSITIVE_INFINITY])('%p → — for any key', (x) => {
    expect(fmtParam('ff', x)).toBe('—');
    expect(fmtParam('voc_v', x)).toBe('—');
  });
});

describe('labels and units', () => {
  it('every parameter key has a label and a unit entry that agrees with its name', () => {
    for (const k of PARAM_KEYS) {
      expect(PARAM_LABELS[k]).toBeTruthy();
      const u = unitOf(k);
      if (k.endsWith('_a')) expect(u).toBe('A');
      if (k.endsWith('_v')) expect(u).toBe('V');
      if (k.endsWith('_w')) expect(u).toBe('W');
      if (k.endsWith('_ohm')) expect(u).toBe('Ω');
    }
    expect(unitOf('ff')).toBe('%');
    expect(unitOf('efficiency')).toBe('%');
    expect(unitOf('n')).toBe('');
    expect(unitOf('j0_a_cm2')).toBe('A/cm²');
    expect(unitOf('not_a_key')).toBe('');
  });
});

describe('formatDate(): one date form, ISO 8601', () => {
  // Expected strings written by hand from ISO 8601 (yyyy-mm-dd, 24-hour hh:mm).
  it('a moment in UTC, with and without its time', () => {
    expect(formatDate('2026-12-02T14:03:27.512Z', { utc: true })).toBe('2026-12-02');
    expect(formatDate('2026-12-02T14:03:27.512Z', { utc: true, time: true })).toBe('2026-12-02 14:03 UTC');
    expect(formatDateTime(new Date(Date.UTC(2026, 0, 5, 9, 7)), { utc: true })).toBe('2026-01-05 09:07 UTC');
  });

  it('a moment in local time keeps the local calendar day and hour', () => {
    const d = new Date(2026, 11, 2, 14, 3);
    expect(formatDateTime(d)).toBe('2026-12-02 14:03');
    expect(formatDate(d.getTime())).toBe('2026-12-02');
  });

  it('a calendar date stays the day it names, whatever the time zone', () => {
    expect(formatDate('2025-11-14')).toBe('2025-11-14');
    expect(formatDateTime('2025-11-14')).toBe('2025-11-14');
  });

  it('never a locale form (12/2/2026) nor a raw timestamp', () => {
    for (const v of ['2026-12-02T14:03:27.512Z', 1796220207512, new Date(2026, 11, 2)]) {
      const shown = formatDateTime(v);
      expect(shown).toMatch(/^\d{4}-\d{2}-\d{2} \d{2}:\d{2}$/);
      expect(shown).not.toMatch(/\//);
    }
  });

  it('nothing is —, text that is no date is shown as it is', () => {
    expect(formatDate(null)).toBe('—');
    expect(formatDate('')).toBe('—');
    expect(formatDate('last Tuesday')).toBe('last Tuesday');
  });
});
