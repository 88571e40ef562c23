/**
 * Failure reasons in a person's words: the label and unit of the key table, the screens' scale
 * (FF in %), and enough digits to see why a value near its limit failed. Expected strings are
 * worked by hand from the table's rules (lib/vocabulary.ts: FF 1 decimal in %, Voc 4 significant
 * digits) and the rule "more digits until value and limit differ in display".
 */
import { evaluateDevice, powerClassOf } from '@/lib/quality/evaluate';
import { describe as describeValues, describeSentence } from '@/lib/quality/describe';
import { failureSummary, flagReason, limitReason } from '@/lib/quality/reason-text';
import { parseSpec } from '@/lib/quality/spec';
import { formatAgainst, precisionApart } from '@/lib/vocabulary';

describe('limit reasons', () => {
  it.each([
    // FF is stored as a fraction and shown in % with one decimal.
    ['ff', 0.592321, 0.7, 'min', 'FF 59.2 % is below the minimum 70.0 %'],
    // 42.0011 V and 42 V both show as "42" at 4 significant digits; at 5 they differ.
    ['voc_v', 42.0011, 42, 'max', 'Voc 42.001 V is above the maximum 42 V'],
    // 69.996 % rounds to 70.0 % at one decimal; three decimals tell it from 70.000 %.
    ['ff', 0.69996, 0.7, 'min', 'FF 69.996 % is below the minimum 70.000 %'],
    ['rs_ohm', 0.5123, 0.5, 'max', 'Rs 0.5123 Ω is above the maximum 0.5 Ω'],
    ['stc_pmp_w', 394.99, 395, 'min', 'Pmax at STC 394.99 W is below the minimum 395 W'],
    ['n', 2.61, 2.5, 'max', 'n 2.61 is above the maximum 2.5'],
    ['i0_a', 3.1068e-7, 3.1e-7, 'max', 'I0 3.107×10⁻⁷ A is above the maximum 3.100×10⁻⁷ A'],
    ['efficiency', 0.19871, 0.2, 'min', 'Efficiency 19.87 % is below the minimum 20.00 %'],
  ] as const)('%s %p against %p (%s): %s', (key, value, bound, side, text) => {
    expect(limitReason(key, value, bound, side)).toBe(text);
  });

  it('never shows a failing value equal to its limit, however close (down to 15 digits)', () => {
    for (const [key, limit] of [['voc_v', 42], ['ff', 0.7], ['pmp_w', 400], ['rs_ohm', 0.25], ['i0_a', 1e-9]] as const) {
      for (const rel of [1e-3, 1e-5, 1e-7, 1e-9, 1e-11]) {
        const value = limit * (1 + rel);
        const shown = formatAgainst(key, value, [limit]);
        expect({ key, rel, same: shown.value === shown.limits[0] }).toEqual({ key, rel, same: false });
      }
    }
  });

  it('keeps the table\'s digits when the value is far from the limit, and equal values at the base precision', () => {
    expect(precisionApart('voc_v', 45.123, [42])).toBe(4);
    expect(precisionApart('ff', 0.5, [0.7])).toBe(1);
    expect(precisionApart('voc_v', 42, [42])).toBe(4);
  });

  it('flags by their words, unknown codes as given', () => {
    expect(flagReason('step')).toBe('Flag raised: Step or second knee (bypass diode, mismatch, cracked cells); this spec fails it');
    expect(flagReason('new-code')).toBe('Flag raised: new-code; this spec fails it');
  });
});

describe('reasons of an evaluated device carry no internal key', () => {
  const spec = parseSpec({
    name: 'release',
    limits: { ff: { min: 0.7 }, voc_v: { max: 42 }, stc_pmp_w: { min: 395 }, rs_ohm: { max: 0.5 }, j0_a_cm2: { max: 1e-12 } },
    power_classes: { step_w: 5, basis: 'stc_pmp_w', lowest_w: 395 },
    fail_flags: ['step'],
  });

  it('a device failing on every count', () => {
    const r = evaluateDevice({ device_id: 'M1', values: { ff: 0.592, voc_v: 42.0011, stc_pmp_w: 394.99, rs_ohm: null, j0_a_cm2: 2e-12 }, flags: ['step'] }, spec);
    const messages = r.reasons.map((x) => x.message);
    expect(messages).toEqual([
      'Voc 42.001 V is above the maximum 42 V (simple rule)',
      'FF 59.2 % is below the minimum 70.0 % (simple rule)',
      'Rs was not measured',
      'J0 2.000×10⁻¹² A/cm² is above the maximum 1.000×10⁻¹² A/cm² (simple rule)',
      'Pmax at STC 394.99 W is below the minimum 395 W (simple rule)',
      'Pmax at STC 394.99 W is below the lowest power class P395',
      'Flag raised: Step or second knee (bypass diode, mismatch, cracked cells); this spec fails it',
    ]);
    for (const m of messages) expect(m).not.toMatch(/\b(ff|voc_v|stc_pmp_w|rs_ohm|j0_a_cm2|pmp_w)\b/);
  });

  it('a power outside explicit bins names the classed power and the bins\' span', () => {
    const bins = parseSpec({ name: 'b', power_classes: { basis: 'pmp_w', bins: [{ label: 'A', nominal_w: 400, min_w: 400, max_w: 410 }] } }).power_classes!;
    expect(powerClassOf(410.2, bins).problem).toBe('Pmax 410.2 W falls in no power class (the classes cover 400–410 W)');
    // 409.99999 is inside; 410.00004 is outside but shows as 410 at 4 digits: more digits.
    expect(powerClassOf(410.00004, bins).problem).toBe('Pmax 410.00004 W falls in no power class (the classes cover 400–410 W)');
  });
});

describe('summaries for mails', () => {
  it('counts the failing devices per reason, most frequent first, in the key table\'s words', () => {
    const spec = parseSpec({ name: 's', limits: { ff: { min: 0.7 }, rs_ohm: { max: 0.5 } }, fail_flags: ['low-shunt'] });
    const devices = [
      evaluateDevice({ device_id: 'A', values: { ff: 0.6, rs_ohm: 0.3 }, flags: [] }, spec),
      evaluateDevice({ device_id: 'B', values: { ff: 0.65, rs_ohm: null }, flags: ['low-shunt'] }, spec),
      evaluateDevice({ device_id: 'C', values: { ff: 0.75, rs_ohm: 0.2 }, flags: [] }, spec),
    ];
    expect(failureSummary(devices)).toEqual(['FF below the minimum 70.0 %: 2 devices', 'Rs not measured: 1 device', 'flag: Low shunt resistance: 1 device']);
  });

  it('describes a parameter\'s statistics in a sentence with label, unit and Cpk', () => {
    // Invented values 0.78, 0.80, 0.82: mean 0.80, sd 0.02 (by hand); Cpk = (0.80 − 0.70)/(3·0.02) = 1.67.
    const d = describeValues([0.78, 0.8, 0.82], { min: 0.7 });
    expect(describeSentence('ff', d)).toBe('FF over 3 devices: mean 80.0 %, standard deviation 2.0 %, 5th to 95th percentile 78.2–81.8 %, Cpk 1.67 (against the minimum).');
  });
});
