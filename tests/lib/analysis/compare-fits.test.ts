import { compareFits, freeParameters } from '@/lib/analysis/compare-fits';
import type { FitResult } from '@/lib/iv/types';

/*
 * BIC = m·ln(SSE/m) + k·ln(m)  (Schwarz 1978, Ann. Statist. 6:461), m residuals, k free parameters.
 * Evidence scale on ΔBIC ≈ 2·ln(Bayes factor) (Kass & Raftery 1995, J. Am. Stat. Assoc. 90:773):
 * < 2 not worth more than a bare mention, 2–6 positive, 6–10 strong, > 10 very strong.
 * Every residual vector below is made up for this test; every expected number is worked by hand
 * in the comment next to it (ln 10 = 2.302585093, ln 4 = 1.386294361, ln 8 = 2.079441542).
 */

const LN10 = Math.log(10);

/** A converged fit with the given residuals (A); free idealities unless `fixed`. */
function fit(model: FitResult['model'], residuals_a: number[], opts: { fixed?: boolean; converged?: boolean } = {}): FitResult {
  const m = residuals_a.length;
  const rmse = Math.sqrt(residuals_a.reduce((s, r) => s + r * r, 0) / m);
  const stderr: Record<string, number | null> =
    model === 'single-diode'
      ? { iph_a: 1e-4, i0_a: 1e-8, n: 0.01, rs_ohm: 1e-3, rsh_ohm: 1 }
      : { iph_a: 1e-4, i01_a: 1e-12, n1: opts.fixed ? null : 0.02, i02_a: 1e-7, n2: opts.fixed ? null : 0.05, rs_ohm: 1e-3, rsh_ohm: 1 };
  const converged = opts.converged ?? true;
  // The parameter values are placeholders: the comparison reads only residuals, RMSE and stderr.
  const own = (x: number) => (converged ? x : null);
  const params =
    model === 'single-diode'
      ? { model, i0_a: own(3e-7), n: own(1.48) }
      : { model, i01_a: own(1e-10), n1: own(1), i02_a: own(1e-6), n2: own(2) };
  return {
    ...params,
    objective: 'true-current',
    iph_a: converged ? 0.76 : null,
    rs_ohm: converged ? 0.036 : null,
    rsh_ohm: converged ? 53 : null,
    rmse_a: converged ? rmse : null,
    rmse_true_current_a: converged ? rmse : null,
    max_residual_a: converged ? Math.max(...residuals_a.map(Math.abs)) : null,
    residuals_a,
    evaluations: 30,
    converged,
    elapsed_ms: 5,
    stderr,
  };
}

/** m = 10 residuals of alternating sign and equal size `a` (A): SSE/m = a². */
const alternating = (a: number, m = 10) => Array.from({ length: m }, (_, i) => (i % 2 ? -a : a));

describe('freeParameters()', () => {
  it.each([
    ['single diode', fit('single-diode', alternating(1e-3)), 5],
    ['double diode, n1 and n2 held fixed (stderr null)', fit('double-diode', alternating(1e-3), { fixed: true }), 5],
    ['double diode, n1 and n2 fitted', fit('double-diode', alternating(1e-3)), 7],
  ])('%s → %i', (_name, f, k) => {
    expect(freeParameters(f)).toBe(k);
  });
});

describe('compareFits() — BIC arithmetic by hand', () => {
  it('single ±1 mA vs free double ±0.5 mA, m = 10: double preferred, "strongly"', () => {
    const c = compareFits(fit('single-diode', alternating(1e-3)), fit('double-diode', alternating(0.5e-3)));
    expect(c).not.toBeNull();
    if (!c) return;
    // BIC1 = 10·ln(1e-6) + 5·ln 10 = −138.1551056 + 11.5129255 = −126.6421801
    expect(c.bic_single).toBeCloseTo(-126.6421801, 6);
    // BIC2 = 10·ln(2.5e-7) + 7·ln 10 = −152.0180492 + 16.1180957 = −135.8999535
    expect(c.bic_double).toBeCloseTo(-135.8999535, 6);
    // ΔBIC = 10·ln 0.25 + 2·ln 10 = −13.8629436 + 4.6051702 = −9.2577734 → 6 < |Δ| ≤ 10: strong
    expect(c.delta_bic).toBeCloseTo(-9.2577734, 6);
    expect(c.rmse_ratio).toBeCloseTo(0.5, 12);
    expect(c.preferred).toBe('double-diode');
    expect(c.sentence).toContain('strongly better');
    expect(c.sentence).toContain('50 % lower');
    expect(c.sentence).toContain('lower by 9.3');
  });

  it('identical residuals, fixed double (k = 5 each): ΔBIC = 0 → either', () => {
    const c = compareFits(fit('single-diode', alternating(1e-3)), fit('double-diode', alternating(1e-3), { fixed: true }));
    expect(c?.delta_bic).toBeCloseTo(0, 10);
    expect(c?.preferred).toBe('either');
    expect(c?.sentence).toContain('single diode is enough');
  });

  it('identical residuals, free double (k = 7): ΔBIC = 2·ln 10 = 4.6051702 → single, "somewhat"', () => {
    const c = compareFits(fit('single-diode', alternating(1e-3)), fit('double-diode', alternating(1e-3)));
    expect(c?.delta_bic).toBeCloseTo(2 * LN10, 9);
    expect(c?.delta_bic).toBeCloseTo(4.6051702, 6);
    expect(c?.preferred).toBe('single-diode');
    expect(c?.sentence).toContain('somewhat preferred');
    expect(c?.sentence).not.toContain('even fits worse');
  });

  it('fixed double ±2 mA vs single ±1 mA: ΔBIC = 10·ln 4 = 13.8629436 → single, "very strongly", and it fits worse', () => {
    const c = compareFits(fit('single-diode', alternating(1e-3)), fit('double-diode', alternating(2e-3), { fixed: true }));
    expect(c?.delta_bic).toBeCloseTo(13.8629436, 6);
    expect(c?.rmse_ratio).toBeCloseTo(2, 12);
    expect(c?.preferred).toBe('single-diode');
    expect(c?.sentence).toContain('very strongly preferred');
    expect(c?.sentence).toContain('even fits worse');
  });

  it('free double ±0.1 mA vs single ±1 mA: ΔBIC = 10·ln 0.01 + 2·ln 10 = −41.4465317 → double, "very strongly"', () => {
    const c = compareFits(fit('single-diode', alternating(1e-3)), fit('double-diode', alternating(1e-4)));
    expect(c?.delta_bic).toBeCloseTo(-41.4465317, 6);
    expect(c?.preferred).toBe('double-diode');
    expect(c?.sentence).toContain('very strongly better');
    expect(c?.sentence).toContain('90 % lower');
  });

  it('a small improvement that does not pay for two parameters: |ΔBIC| < 2 → either', () => {
    // m = 20, SSE ratio r: ΔBIC = 20·ln r + 2·ln 20. With r = 0.75: 20·(−0.2876821) + 5.9914645 = 0.2378231.
    const a1 = 1e-3;
    const a2 = a1 * Math.sqrt(0.75);
    const c = compareFits(fit('single-diode', alternating(a1, 20)), fit('double-diode', alternating(a2, 20)));
    expect(c?.delta_bic).toBeCloseTo(0.2378231, 6);
    expect(c?.preferred).toBe('either');
  });

  it('uses the sum of squares, not the signs: a vector with mixed sizes', () => {
    // Single: 8 residuals [3, −4, 0, 0, 0, 0, 0, 0] mA → SSE = 25e-6, SSE/m = 3.125e-6.
    // BIC1 = 8·ln(3.125e-6) + 5·ln 8 = 8·(−12.6760763) + 10.3972077 = −91.0114025
    const c = compareFits(fit('single-diode', [3e-3, -4e-3, 0, 0, 0, 0, 0, 0]), fit('double-diode', alternating(1e-3, 8), { fixed: true }));
    expect(c?.bic_single).toBeCloseTo(-91.0114025, 5);
    // Double (fixed): SSE/m = 1e-6 → BIC2 = 8·ln(1e-6) + 5·ln 8 = −110.5240845 + 10.3972077 = −100.1268768
    expect(c?.bic_double).toBeCloseTo(-100.1268768, 5);
    expect(c?.preferred).toBe('double-diode');
  });
});

describe('compareFits() — no verdict without two usable fits', () => {
  const good = fit('single-diode', alternating(1e-3));
  const goodDouble = fit('double-diode', alternating(1e-3));
  it.each([
    ['the double diode did not converge', good, fit('double-diode', alternating(1e-3), { converged: false })],
    ['the single diode did not converge', fit('single-diode', alternating(1e-3), { converged: false }), goodDouble],
    ['the double fit is missing', good, undefined],
    ['the single fit is missing', undefined, goodDouble],
    ['fewer than 8 residuals', fit('single-diode', alternating(1e-3, 7)), fit('double-diode', alternating(1e-3, 7))],
    ['a perfect fit (SSE = 0, ln undefined)', good, fit('double-diode', Array(10).fill(0))],
  ])('%s → null', (_why, single, double) => {
    expect(compareFits(single, double)).toBeNull();
  });
});

describe('compareFits() with the quality test: a model that fails it is never "enough"', () => {
  // Isc 0.76 A (the placeholder fits' Iph): 1 % of Isc is 7.6 mA. Residuals invented.
  it('both fits miss by about 6 % of Isc (±45 mA), ΔBIC = 0 → "neither model describes this curve", not "enough"', () => {
    const c = compareFits(fit('single-diode', alternating(45e-3)), fit('double-diode', alternating(45e-3), { fixed: true }), { isc_a: 0.76, flags: ['poor-fit'] });
    expect(c?.preferred).toBe('either');
    expect(c?.preferred_fails_quality).toBe(true);
    expect(c?.sentence).toMatch(/^Neither model describes this curve: the single diode misses it by 5\.9 % of Isc and the double diode by 5\.9 %/);
    expect(c?.sentence).not.toContain('enough.');
  });

  it('a step flag fails both models even with small residuals', () => {
    const c = compareFits(fit('single-diode', alternating(1e-3)), fit('double-diode', alternating(1e-3), { fixed: true }), { isc_a: 0.76, flags: ['step'] });
    expect(c?.sentence).toMatch(/Neither model describes this curve.*a step that no diode model makes/);
  });

  it('about equal by BIC, but only the double stays within 1 %: the single diode is "not enough", the double is named', () => {
    // m = 10, both k = 5: single ±8 mA (1.05 % of 0.76 A), fixed double ±7.5 mA (0.99 %).
    // ΔBIC = 10·ln((7.5/8)²) = 20·ln 0.9375 = −1.29 → "either" by BIC alone.
    const c = compareFits(fit('single-diode', alternating(8e-3)), fit('double-diode', alternating(7.5e-3), { fixed: true }), { isc_a: 0.76 });
    expect(c?.preferred).toBe('either');
    expect(c?.delta_bic).toBeCloseTo(20 * Math.log(0.9375), 9);
    expect(c?.sentence).toBe('The single diode misses this curve by 1.1 % of Isc, more than the 1 % asked, so it is not enough whatever the BIC says; only the double diode stays within 1 %.');
  });

  it('good fits keep their sentence', () => {
    const c = compareFits(fit('single-diode', alternating(1e-3)), fit('double-diode', alternating(1e-3), { fixed: true }), { isc_a: 0.76, flags: [] });
    expect(c?.preferred_fails_quality).toBe(false);
    expect(c?.sentence).toContain('single diode is enough');
  });
});
