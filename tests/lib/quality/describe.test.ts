import { cpkOf, describe as describeValues, percentileSorted } from '@/lib/quality/describe';
import { QualityError } from '@/lib/quality/errors';

// Hand-worked data set: x = 2, 4, 4, 4, 5, 5, 7, 9 (n = 8).
//   mean = 40/8 = 5
//   Σ(x − 5)² = 9 + 1 + 1 + 1 + 0 + 0 + 4 + 16 = 32  →  sample sd = √(32/7) = 2.13809…
// Percentiles, Hyndman & Fan definition 7, h = (n − 1)·p on 0-based order statistics:
//   p5:  h = 7·0.05 = 0.35 → x0 + 0.35·(x1 − x0) = 2 + 0.35·2 = 2.7
//   p50: h = 3.5           → 4 + 0.5·(5 − 4)    = 4.5
//   p95: h = 6.65          → 7 + 0.65·(9 − 7)   = 8.3
const EIGHT = [9, 4, 2, 5, 4, 7, 4, 5]; // unsorted on purpose
const SD8 = Math.sqrt(32 / 7);

describe('describe()', () => {
  const d = describeValues(EIGHT, { min: 0, max: 12 });

  it.each([
    // [field, expected (hand arithmetic above), tolerance]
    ['n', 8, 0],
    ['mean', 5, 1e-12],
    ['sd', SD8, 1e-12],
    ['min', 2, 0],
    ['p5', 2.7, 1e-12],
    ['median', 4.5, 1e-12],
    ['p95', 8.3, 1e-12],
    ['max', 9, 0],
    // Cpk = min(12 − 5, 5 − 0)/(3·sd) = 5/(3·√(32/7)) = 0.77951…
    ['cpk', 5 / (3 * SD8), 1e-12],
  ] as const)('%s = %p (hand-computed)', (field, expected, tol) => {
    expect(Math.abs((d[field] as number) - expected)).toBeLessThanOrEqual(tol);
  });

  it.each([
    // [values, p, expected] — definition 7 by hand
    [[1, 2, 3, 4, 10], 0.05, 1.2], // h = 4·0.05 = 0.2 → 1 + 0.2·1
    [[1, 2, 3, 4, 10], 0.5, 3], // h = 2 → x2
    [[1, 2, 3, 4, 10], 0.95, 8.8], // h = 3.8 → 4 + 0.8·6
    [[1, 2, 3, 4, 10], 0, 1],
    [[1, 2, 3, 4, 10], 1, 10],
    [[7], 0.95, 7],
  ])('percentile of %p at %p = %p', (values, p, expected) => {
    expect(percentileSorted(values, p)).toBeCloseTo(expected, 12);
  });

  it.each([
    // one-sided: only the given limit counts; hand: (12 − 5)/(3·sd), (5 − 3)/(3·sd)
    [{ max: 12 }, 7 / (3 * SD8), 'upper'],
    [{ min: 3 }, 2 / (3 * SD8), 'lower'],
    [{ min: 0, max: 12 }, 5 / (3 * SD8), 'both'],
  ] as const)('Cpk with limits %p', (limits, expected, side) => {
    const r = describeValues(EIGHT, limits);
    expect(r.cpk).toBeCloseTo(expected, 12);
    expect(r.cpk_side).toBe(side);
  });

  it('mean outside the limits gives a negative Cpk, not a clipped one', () => {
    // (4 − 5)/(3·sd) < 0 by hand
    expect(describeValues(EIGHT, { max: 4 }).cpk).toBeCloseTo(-1 / (3 * SD8), 12);
  });

  it('keeps digits for a large offset (Voc ≈ 40 V, spread of mV)', () => {
    // 40 + (0, 0.001, 0.002): sd = 0.001 exactly by hand
    expect(describeValues([40, 40.001, 40.002]).sd).toBeCloseTo(0.001, 12);
  });

  it('has no Cpk without limits, with one value, or with zero spread', () => {
    expect(describeValues(EIGHT).cpk).toBeNull();
    const one = describeValues([3.2], { min: 1 });
    expect(one.sd).toBeNull();
    expect(one.cpk).toBeNull();
    expect(one.median).toBe(3.2);
    expect(describeValues([1, 1, 1], { min: 0 }).cpk).toBeNull();
    expect(cpkOf(5, 0, { max: 6 })).toEqual({ cpk: null, cpk_side: null });
  });

  it.each([
    [[], /empty/],
    [[1, Number.NaN], /values\[1\] is NaN/],
    [[1, Infinity], /values\[1\] is Infinity/],
  ])('rejects %p', (values, message) => {
    expect(() => describeValues(values)).toThrow(QualityError);
    expect(() => describeValues(values)).toThrow(message);
  });

  it('rejects min > max', () => {
    expect(() => describeValues([1, 2], { min: 3, max: 2 })).toThrow(/min \(3\) is greater than max \(2\)/);
  });
});
