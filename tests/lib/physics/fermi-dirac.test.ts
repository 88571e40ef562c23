import {
  boltzmannHalf,
  fermiHalf,
  fermiHalfExtended,
  fermiMinusHalf,
  fermiOccupation,
  inverseFermiHalf,
  inverseFermiHalfExtended,
} from '@/lib/physics/fermi-dirac';
import { KB_EV_PER_K } from '@/lib/physics/constants';
import { PhysicsError } from '@/lib/physics/errors';
import { referenceFermiIntegral } from './fd-reference';

const rel = (a: number, b: number) => Math.abs(a / b - 1);

describe('Fermi–Dirac occupation f(E)', () => {
  const temp_k = 300;
  const kT = KB_EV_PER_K * temp_k;

  // Analytic values of 1/(1 + e^x): x = 0 → 1/2; x = ln 3 → 1/4; x = −ln 3 → 3/4.
  it.each([
    [0, 0.5],
    [Math.log(3), 0.25],
    [-Math.log(3), 0.75],
  ])('f(E_F + %f·kT) = %f (analytic)', (x, expected) => {
    expect(fermiOccupation(0.1 + x * kT, 0.1, temp_k)).toBeCloseTo(expected, 14);
  });

  it('is symmetric, f(E_F + x) + f(E_F − x) = 1, and finite far from E_F (analytic property)', () => {
    for (const x of [0.01, 0.3, 5, 40, 1e4]) {
      const up = fermiOccupation(x, 0, temp_k);
      const down = fermiOccupation(-x, 0, temp_k);
      expect(up + down).toBeCloseTo(1, 14);
      expect(Number.isFinite(up) && up >= 0 && up <= 1).toBe(true);
    }
  });

  it('rejects a temperature ≤ 0 K naming temp_k', () => {
    expect(() => fermiOccupation(0, 0, 0)).toThrow(PhysicsError);
    expect(() => fermiOccupation(0, 0, -3)).toThrow(/temp_k/);
  });
});

describe('F½(η): method = series for η ≤ −1, composite Gauss–Legendre above (see lib/physics/fermi-dirac.ts)', () => {
  // Reference table in tests/fixtures/reference-data/README.md: arbitrary-precision polylogarithm
  // F½(η) = −Li_{3/2}(−e^η), 12 significant digits (some entries 11); tolerance covers the rounding.
  it.each([
    [-5, 0.00672195431451],
    [-2, 0.12929851332],
    [0, 0.765147024625],
    [2, 2.8237212774],
    [5, 8.84420889524],
    [10, 24.0846569646],
  ])('F½(%f) = %f (reference README table, polylogarithm)', (eta, expected) => {
    expect(rel(fermiHalf(eta), expected)).toBeLessThan(1e-10);
  });

  it('F½(0) = (1 − 2^−½)·ζ(3/2) exactly, ζ(3/2) = 2.6123753486854883 (mathematical constant)', () => {
    expect(rel(fermiHalf(0), (1 - Math.SQRT1_2) * 2.6123753486854883)).toBeLessThan(1e-13);
  });

  // 141 points over the whole supported range, including both sides of the method switch at η = −1.
  const grid = Array.from({ length: 141 }, (_, k) => -40 + k + 0.37 * (k % 3)).filter((e) => e <= 100);
  grid.push(-1, -1 - 1e-12, -1 + 1e-12, 100);

  it('agrees with the independent double-exponential quadrature within 1e-9 relative at 144 points', () => {
    let worst = 0;
    for (const eta of grid) worst = Math.max(worst, rel(fermiHalf(eta), referenceFermiIntegral(0.5, eta)));
    // Target 1e-9; measured worst ≈ 1e-15.
    expect(worst).toBeLessThan(1e-9);
  });

  it('F₋½ (= dF½/dη) agrees with the independent quadrature within 1e-9 relative', () => {
    let worst = 0;
    for (const eta of grid) worst = Math.max(worst, rel(fermiMinusHalf(eta), referenceFermiIntegral(-0.5, eta)));
    expect(worst).toBeLessThan(1e-9);
  });

  // Sommerfeld expansion for the degenerate limit (standard asymptotic series; for j = 1/2 the
  // exponentially small cos(πj)·F_j(−η) term vanishes):
  // F½ ≈ (4/(3√π))·η^1.5·[1 + π²/(8η²) + 7π⁴/(640η⁴) + 9.7015/η⁶], next term ~1e-11 at η = 40.
  it.each([40, 55, 70, 100])('F½(%f) matches the Sommerfeld expansion within 1e-9', (eta) => {
    const c6 = ((2 * 31 * Math.PI ** 6) / 30240) * 4.921875;
    const sommerfeld =
      ((4 / (3 * Math.sqrt(Math.PI))) * eta ** 1.5) *
      (1 + Math.PI ** 2 / (8 * eta ** 2) + (7 * Math.PI ** 4) / (640 * eta ** 4) + c6 / eta ** 6);
    expect(rel(fermiHalf(eta), sommerfeld)).toBeLessThan(1e-9);
  });

  // Boltzmann limit: F½ → e^η for η ≪ 0; DOMAIN.md says it holds for η ≲ −2 and fails for η > 0.
  it.each([
    [-40, 1e-15],
    [-10, 2e-5],
    [-2, 0.05],
  ])('Boltzmann e^η at η = %f is within %f relative of F½', (eta, tol) => {
    expect(rel(boltzmannHalf(eta), fermiHalf(eta))).toBeLessThan(tol);
  });

  it('the Boltzmann limit is visibly wrong in degenerate material (η = 5: e^η is > 15× F½)', () => {
    expect(boltzmannHalf(5) / fermiHalf(5)).toBeGreaterThan(15);
  });

  it.each([[-40.0001], [100.0001], [Number.NaN], [Number.POSITIVE_INFINITY]])('rejects η = %f naming eta', (eta) => {
    expect(() => fermiHalf(eta)).toThrow(PhysicsError);
    try {
      fermiHalf(eta);
    } catch (err) {
      expect((err as PhysicsError).input).toBe('eta');
    }
  });

  it('the extended form continues below η = −40 with the two-term series (e^η·(1 − e^η/2^1.5))', () => {
    const eta = -60;
    // Second term e^η/2^1.5 ≈ 3e-27 relative: indistinguishable from e^η in double precision.
    expect(rel(fermiHalfExtended(eta), Math.exp(eta))).toBeLessThan(1e-16);
    expect(fermiHalfExtended(-40)).toBe(fermiHalf(-40));
  });
});

describe('inverse of F½', () => {
  it('round-trips η → F½ → η to 1e-11 over [−40, 100]', () => {
    let worst = 0;
    for (let eta = -40; eta <= 100; eta += 0.7) {
      worst = Math.max(worst, Math.abs(inverseFermiHalf(fermiHalf(eta)) - eta) / Math.max(1, Math.abs(eta)));
    }
    expect(worst).toBeLessThan(1e-11);
  });

  // Reference README table inverted: η from F½ values rounded to ~12 digits, so η to ~1e-10.
  it.each([
    [0.00672195431451, -5],
    [0.765147024625, 0],
    [24.0846569646, 10],
  ])('inverse of %f is η = %f (reference README table)', (value, eta) => {
    expect(inverseFermiHalf(value)).toBeCloseTo(eta, 9);
  });

  // Joyce & Dixon (1977), Appl. Phys. Lett. 31:354: η ≈ ln r + Σ A_m·r^m with A1 = 1/√8,
  // A2 = −4.95009e-3, A3 = 1.48386e-4, A4 = −4.42563e-6 (memory; their stated accuracy is best
  // for r ≲ 1). Measured agreement: 5e-7 at r = 1, 2.5e-5 at r = 3 — consistent with the recollection.
  it.each([
    [0.01, 1e-7],
    [0.5, 1e-6],
    [1, 1e-6],
    [3, 5e-5],
  ])('agrees with the Joyce–Dixon approximation at r = %f within %f', (r, tol) => {
    const jd = Math.log(r) + 0.353553 * r - 4.95009e-3 * r ** 2 + 1.48386e-4 * r ** 3 - 4.42563e-6 * r ** 4;
    expect(Math.abs(inverseFermiHalf(r) - jd)).toBeLessThan(tol);
  });

  it.each([[0], [-1], [1e-30], [1e6], [Number.NaN]])('rejects %f naming value', (value) => {
    expect(() => inverseFermiHalf(value)).toThrow(/value/);
  });

  it('the extended inverse handles values below F½(−40) as ln of the two-term series', () => {
    expect(inverseFermiHalfExtended(Math.exp(-70))).toBeCloseTo(-70, 10);
  });
});
