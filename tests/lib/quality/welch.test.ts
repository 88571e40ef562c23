import { QualityError } from '@/lib/quality/errors';
import { welchDifference, welchFromSummary } from '@/lib/quality/welch';

/**
 * Independent Student-t distribution for the checks below, written in this test:
 * with t = √ν·tan θ the density integrates as ∫cos^(ν−1)θ dθ over (−π/2, π/2), a smooth
 * finite integrand, so composite Simpson on θ gives the CDF without any gamma function.
 */
function simpson(f: (x: number) => number, a: number, b: number, n = 4000): number {
  const h = (b - a) / n;
  let s = f(a) + f(b);
  for (let i = 1; i < n; i++) s += (i % 2 ? 4 : 2) * f(a + i * h);
  return (s * h) / 3;
}
function tUpperTail(t: number, dof: number): number {
  const g = (th: number) => Math.cos(th) ** (dof - 1);
  const total = simpson(g, -Math.PI / 2, Math.PI / 2);
  return simpson(g, Math.atan(Math.abs(t) / Math.sqrt(dof)), Math.PI / 2) / total;
}
function tQuantileUpper(alphaHalf: number, dof: number): number {
  let lo = 0;
  let hi = 50;
  for (let i = 0; i < 80; i++) {
    const mid = (lo + hi) / 2;
    if (tUpperTail(mid, dof) > alphaHalf) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

describe('welchFromSummary() against published worked examples', () => {
  // NIST/SEMATECH e-Handbook §1.3.5.3 car-mileage data (AUTO83B): US cars n = 249,
  // mean 20.14458, sd 6.41470; Japanese cars n = 79, mean 30.48101, sd 6.10771.
  // Unequal-variance results as printed in the Boost.Math documentation's two-sample
  // Student-t example on the same data: dof = 136.87, T = −12.946 (US − Japan),
  // one-sided probability 7.855e-26 → two-sided 1.571e-25.
  const us = { n: 249, mean: 20.14458, sd: 6.4147 };
  const japan = { n: 79, mean: 30.48101, sd: 6.10771 };
  const r = welchFromSummary(us, japan, 0.95, { nameA: 'US cars', nameB: 'Japanese cars', param: 'mileage', unit: 'mpg' });

  it.each([
    ['dof', 136.87, 0.005],
    ['t', 12.946, 0.0005], // sign flips: we report B − A
    ['difference', 30.48101 - 20.14458, 1e-12],
  ] as const)('%s ≈ %p', (field, expected, tol) => {
    expect(Math.abs(r[field] - expected)).toBeLessThanOrEqual(tol);
  });

  it('two-sided p ≈ 2 × 7.855e-26 (relative 1e-3)', () => {
    expect(Math.abs(r.p / (2 * 7.855e-26) - 1)).toBeLessThan(1e-3);
  });

  // NAG Library example g07caf (two-sample t-test, published example results): X n = 4,
  // mean 25.0, sd 0.8185; Y n = 8, mean 21.0, sd 4.208. "No assumptions about population
  // variances": t = 2.5922, significance 0.0320, 95 % CI of X − Y 0.4410 … 7.5590.
  // Our A = X, B = Y, so the difference B − A and its interval change sign. Tolerances
  // allow for the 4-digit standard deviations in the printout.
  const nag = welchFromSummary({ n: 4, mean: 25, sd: 0.8185 }, { n: 8, mean: 21, sd: 4.208 });
  it.each([
    ['t', -2.5922, 5e-4],
    ['p', 0.032, 5e-4],
    ['ci_low', -7.559, 2e-3],
    ['ci_high', -0.441, 2e-3],
  ] as const)('NAG g07caf %s ≈ %p', (field, expected, tol) => {
    expect(Math.abs(nag[field] - expected)).toBeLessThanOrEqual(tol);
  });

  it('says which batch is higher, by how much, with the interval', () => {
    expect(r.sentence).toMatch(/^Japanese cars' mileage is higher than US cars' by 10\.3 mpg \(95 % CI 8\.8–11\.9 mpg; Welch t = 12\.9 on 136\.9 degrees of freedom, p < 0\.001\)\.$/);
    expect(nag.sentence).toMatch(/^Batch B's mean value is lower than Batch A's by 4\.0 \(95 % CI 0\.4–7\.6;/);
  });
});

describe('welchDifference() on raw data, checked by hand and by numeric integration', () => {
  // Series resistance (Ω) of two small batches.
  const a = [0.42, 0.45, 0.47, 0.44, 0.46];
  const b = [0.5, 0.55, 0.58, 0.52, 0.6, 0.54];
  // By hand: mean A = 2.24/5 = 0.448; Σ(x − 0.448)² = 0.028² + 0.002² + 0.022² + 0.008² + 0.012² = 0.00148
  //          → s²A = 0.00148/4 = 0.00037
  //          mean B = 3.29/6; Σx² − (Σx)²/6 = 1.8109 − 10.8241/6 = 0.0068833… → s²B = 0.0068833…/5
  const mean_a = 2.24 / 5;
  const mean_b = 3.29 / 6;
  const vA = 0.00148 / 4;
  const vB = (1.8109 - 10.8241 / 6) / 5;
  const se2 = vA / 5 + vB / 6;
  const dof = (se2 * se2) / ((vA / 5) ** 2 / 4 + (vB / 6) ** 2 / 5); // Welch–Satterthwaite ≈ 7.74
  const t = (mean_b - mean_a) / Math.sqrt(se2);
  const r = welchDifference(a, b, 0.95, { key: 'rs_ohm' });

  it.each([
    ['difference', mean_b - mean_a, 1e-12],
    ['standard_error', Math.sqrt(se2), 1e-12],
    ['dof', dof, 1e-9],
    ['t', t, 1e-9],
  ] as const)('%s matches the hand formula', (field, expected, tol) => {
    expect(Math.abs(r[field] - expected)).toBeLessThanOrEqual(tol);
  });

  it('p and the interval agree with the independent t distribution', () => {
    const pIndependent = 2 * tUpperTail(t, dof);
    expect(Math.abs(r.p - pIndependent)).toBeLessThan(1e-8);
    const tCrit = tQuantileUpper(0.025, dof);
    expect(Math.abs(r.t_critical - tCrit)).toBeLessThan(1e-6);
    expect(Math.abs(r.ci_low - (mean_b - mean_a - tCrit * Math.sqrt(se2)))).toBeLessThan(1e-7);
    expect(Math.abs(r.ci_high - (mean_b - mean_a + tCrit * Math.sqrt(se2)))).toBeLessThan(1e-7);
    expect(r.significant).toBe(true);
  });

  it.each([0.9, 0.99])('the %p interval uses its own quantile', (conf) => {
    const s = welchDifference(a, b, conf);
    expect(Math.abs(s.t_critical - tQuantileUpper((1 - conf) / 2, dof))).toBeLessThan(1e-6);
  });

  it('writes the sentence with numbers rounded to the interval', () => {
    // half width ≈ 0.041 → two significant digits → 3 decimals
    // Label and unit from the key table (lib/vocabulary.ts), not the key "rs_ohm".
    expect(r.sentence).toContain(`Batch B's Rs is higher than Batch A's by 0.100 Ω (95 % CI ${r.ci_low.toFixed(3)}–${r.ci_high.toFixed(3)} Ω`);
  });

  it('a fraction shown in % is worded in % (FF): label, unit and scale from the key table', () => {
    // Invented FF fractions; difference of the means by hand: 0.7900 − 0.7700 = 0.0200 → 2.0 %.
    const ff = welchDifference([0.769, 0.771, 0.770, 0.768, 0.772], [0.789, 0.791, 0.790, 0.788, 0.792], 0.95, { nameA: 'Lot 1', nameB: 'Lot 2', key: 'ff' });
    expect(ff.difference).toBeCloseTo(0.02, 12);
    expect(ff.sentence).toMatch(/^Lot 2's FF is higher than Lot 1's by 2\.00 % \(95 % CI 1\.[0-9]{2}–2\.[0-9]{2} %;/);
    expect(ff.sentence).not.toMatch(/\bff\b|0\.02/);
  });

  it('names the batches and the quantity when a test is not possible', () => {
    expect(() => welchDifference([400], [401, 402], 0.95, { nameA: 'Lot 1', nameB: 'Lot 2', key: 'pmp_w' })).toThrow('Lot 1 has 1 value of Pmax; a standard deviation needs at least 2');
    expect(() => welchDifference([1, 1], [2, 2], 0.95, { nameA: 'Lot 1', nameB: 'Lot 2', key: 'ff' })).toThrow(/^Lot 1 and Lot 2 have no spread in FF/);
  });

  it('says "no clear difference" when the interval includes zero', () => {
    const s = welchDifference([1, 2, 3, 4], [1.5, 2.5, 3.5, 2]);
    expect(s.significant).toBe(false);
    expect(s.sentence).toMatch(/includes zero: no clear difference/);
  });

  it.each([
    [[1], [1, 2], /sample A needs at least 2 values/],
    [[1, 2], [3], /sample B needs at least 2 values/],
    [[1, Number.NaN], [1, 2], /sample A\[1\] is NaN/],
    [[1, 1], [2, 2], /both samples have no spread/],
  ])('rejects %p vs %p', (x, y, message) => {
    expect(() => welchDifference(x, y)).toThrow(QualityError);
    expect(() => welchDifference(x, y)).toThrow(message);
  });

  it.each([0, 1, 95, Number.NaN])('rejects confidence %p', (c) => {
    expect(() => welchDifference(a, b, c)).toThrow(/confidence/);
  });
});
