import { cautionText, ELV_LIMIT_V, HV_CAUTION, isAboveElv } from '@/lib/strings/cautions';

describe('high-voltage caution', () => {
  it.each([
    [/light/i, /switch/i], // live in light, cannot be switched off
    [/arc/i, /go out on its own|self-extinguish/i],
    [/insulation|flash/i, /high voltage/i],
    [/guidance/i, /codes/i],
    [/manufacturers’ ratings/i, /licensed practice/i],
  ])('says %p … %p', (a, b) => {
    expect(HV_CAUTION.bullets.some((s) => a.test(s) && b.test(s))).toBe(true);
  });

  it('has a short form and a text form with every bullet', () => {
    expect(HV_CAUTION.short).toMatch(/cannot be switched off/);
    const text = cautionText();
    expect(text.split('\n')).toHaveLength(1 + HV_CAUTION.bullets.length);
  });

  // 60 V DC: the usual extra-low-voltage limit (common practice; codes differ)
  it.each([
    [60, false],
    [60.01, true],
    [-75, true],
    [12, false],
    [Number.NaN, false],
  ])('isAboveElv(%p) = %p', (v, expected) => {
    expect(ELV_LIMIT_V).toBe(60);
    expect(isAboveElv(v)).toBe(expected);
  });
});
