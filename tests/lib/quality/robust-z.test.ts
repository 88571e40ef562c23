import { robustZ } from '@/lib/quality/robust-z';
import { QualityError } from '@/lib/quality/errors';

// Modified z-score M = 0.6745·(x − median)/MAD, outlier when |M| > 3.5
// (Iglewicz & Hoaglin 1993). Hand-worked: x = 1, 2, 3, 4, 5, 100
//   median = (3 + 4)/2 = 3.5
//   |x − 3.5| = 2.5, 1.5, 0.5, 0.5, 1.5, 96.5 → sorted 0.5, 0.5, 1.5, 1.5, 2.5, 96.5 → MAD = 1.5
describe('robustZ()', () => {
  const r = robustZ([1, 2, 3, 4, 5, 100]);

  it.each([
    [0, (0.6745 * -2.5) / 1.5],
    [1, (0.6745 * -1.5) / 1.5],
    [2, (0.6745 * -0.5) / 1.5],
    [5, (0.6745 * 96.5) / 1.5], // 43.39…
  ])('z[%i] matches the hand value %p', (i, expected) => {
    expect(r.z[i]).toBeCloseTo(expected, 12);
  });

  it('marks only the far value, with median and MAD by hand', () => {
    expect(r.median).toBe(3.5);
    expect(r.mad).toBe(1.5);
    expect(r.scale).toBe('mad');
    expect(r.isOutlier).toEqual([false, false, false, false, false, true]);
    expect(r.outlierCount).toBe(1);
  });

  it('uses the 3.5 threshold on |M|', () => {
    // x = 0, 1, 1, 1, 2, 1 + d: median 1; |dev| = 1, 0, 0, 0, 1, d → sorted 0, 0, 0, 1, 1, d → MAD = 0.5
    // M(1 + d) = 0.6745·d/0.5: d = 2.59 → 3.494 (kept), d = 2.6 → 3.507 (outlier)
    const below = robustZ([0, 1, 1, 1, 2, 1 + 2.59]);
    const above = robustZ([0, 1, 1, 1, 2, 1 + 2.6]);
    expect(below.mad).toBeCloseTo(0.5, 12);
    expect(below.z[5]).toBeCloseTo((0.6745 * 2.59) / 0.5, 10);
    expect(below.isOutlier[5]).toBe(false);
    expect(above.z[5]).toBeCloseTo((0.6745 * 2.6) / 0.5, 10);
    expect(above.isOutlier[5]).toBe(true);
  });

  it('falls back to the mean absolute deviation when MAD is 0, without NaN', () => {
    // 5, 5, 5, 5, 6: median 5, MAD 0; mean |dev| = 1/5 = 0.2;
    // z(6) = 1/(√(π/2)·0.2) = 3.989… (common practice fallback) → outlier
    const s = robustZ([5, 5, 5, 5, 6]);
    expect(s.scale).toBe('meanad');
    expect(s.z[4]).toBeCloseTo(1 / (Math.sqrt(Math.PI / 2) * 0.2), 12);
    expect(s.isOutlier).toEqual([false, false, false, false, true]);
  });

  it('gives all zeros when every value is equal, and handles empty input', () => {
    const s = robustZ([2, 2, 2]);
    expect(s.z).toEqual([0, 0, 0]);
    expect(s.scale).toBe('none');
    expect(s.isOutlier.some(Boolean)).toBe(false);
    expect(robustZ([]).z).toEqual([]);
  });

  it('rejects non-finite values', () => {
    expect(() => robustZ([1, Number.NaN])).toThrow(QualityError);
  });
});
