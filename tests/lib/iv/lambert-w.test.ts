import { lambertW, lambertWExp } from '@/lib/iv/lambert-w';

/** Independent check written in this test: bisection on w + ln w = x (monotone in w > 0). */
function wOfExpByBisection(x: number): number {
  let lo = 1e-300;
  let hi = Math.max(1, x + 1);
  for (let k = 0; k < 400; k++) {
    const mid = x > 30 ? (lo + hi) / 2 : Math.sqrt(lo * hi);
    if (mid + Math.log(mid) > x) hi = mid;
    else lo = mid;
  }
  return (lo + hi) / 2;
}

describe('lambertW() — principal branch', () => {
  it.each([
    // Known values: W(1) = Ω, the omega constant 0.5671432904097838… (OEIS A030178);
    // W(e) = 1, W(−1/e) = −1, W(0) = 0 by definition (w·e^w = x);
    // W(2 ln 2) = ln 2 and W(−ln 2 / 2) = −ln 2 since ln2·e^{ln 2} = 2 ln 2 (identity).
    [1, 0.5671432904097838, 1e-15],
    [Math.E, 1, 1e-15],
    [-Math.exp(-1), -1, 1e-12],
    [0, 0, 0],
    [2 * Math.LN2, Math.LN2, 1e-15],
    [-Math.LN2 / 2, -Math.LN2, 1e-14],
  ])('W(%p) = %p', (x, expected, tol) => {
    expect(Math.abs(lambertW(x) - expected)).toBeLessThanOrEqual(tol);
  });

  it.each([-0.36, -0.2, -1e-8, 1e-12, 0.3, 2, 10, 1e3, 1e10, 1e200])('w·e^w reproduces x = %p (independent check)', (x) => {
    const w = lambertW(x);
    expect(w).toBeGreaterThanOrEqual(-1);
    const back = w * Math.exp(w);
    expect(Math.abs(back - x)).toBeLessThanOrEqual(1e-13 * Math.abs(x));
  });

  it.each([-0.4, -1, Number.NaN, Number.POSITIVE_INFINITY])('rejects %p', (x) => {
    expect(() => lambertW(x)).toThrow(RangeError);
  });
});

describe('lambertWExp() — W(e^x) in log form, no overflow', () => {
  it.each([
    // W(e^1) = 1 and W(e^0) = W(1) = Ω (known values above).
    [1, 1],
    [0, 0.5671432904097838],
  ])('W(e^%p) = %p', (x, expected) => {
    expect(Math.abs(lambertWExp(x) - expected)).toBeLessThanOrEqual(2e-16 * Math.max(1, expected));
  });

  it.each([-60, -35, -10, -1, 0.5, 3, 20, 150, 709, 800, 5000, 1e6])('agrees with bisection on w + ln w = x at x = %p', (x) => {
    const w = lambertWExp(x);
    const ref = wOfExpByBisection(x);
    expect(Number.isFinite(w)).toBe(true);
    expect(Math.abs(w - ref)).toBeLessThanOrEqual(1e-13 * ref);
  });

  it('stays finite far beyond the range of exp (x = 1e5 would overflow e^x)', () => {
    const w = lambertWExp(1e5);
    // w + ln w = x within rounding (defining equation, independent check).
    expect(Math.abs(w + Math.log(w) - 1e5)).toBeLessThan(1e-9);
  });

  it('returns 0 for x = −∞ and throws for NaN', () => {
    expect(lambertWExp(-Infinity)).toBe(0);
    expect(() => lambertWExp(Number.NaN)).toThrow(RangeError);
  });
});
