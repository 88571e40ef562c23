/**
 * Fermi–Dirac statistics: the occupation function and the normalised complete Fermi–Dirac
 * integrals F_j(η) = (1/Γ(j+1))·∫₀^∞ x^j/(1 + e^(x−η)) dx (Blakemore 1982 normalisation, so
 * F_j(η) → e^η as η → −∞), for j = 1/2 (carrier densities) and j = −1/2 (its derivative).
 *
 * Method (accuracy target 1e-9 relative on η ∈ [−40, 100], reached with margin):
 * - η ≤ −1: the alternating series F_j(η) = Σ_{k≥1} (−1)^{k+1} e^{kη}/k^{j+1}, summed until the
 *   next term is below 1e-17 of the sum (at most ~40 terms; the error of an alternating series is
 *   below its first omitted term).
 * - η > −1: composite 20-point Gauss–Legendre quadrature. The first panel [0, 1] is integrated in
 *   t = √x, which removes the x^j branch point at 0; the rest is split into panels no wider than
 *   4 (and no wider than their distance from 0). The Fermi factor's poles sit at x = η ± iπ(2k+1),
 *   so a half-width of 2 keeps each panel's Bernstein ellipse ratio ≥ 3.4 and the rule's error
 *   near 1e-20. Where the Fermi factor equals 1 to within e^−48 (x < η − 48) the integral of x^j
 *   is taken in closed form, and the range is cut at η + 48 where the integrand is below e^−48.
 */
import { KB_EV_PER_K } from '@/lib/physics/constants';
import { PhysicsError, requireFinite, requirePositive } from '@/lib/physics/errors';

/** Supported range of the reduced Fermi level η for the public integral functions. */
export const ETA_RANGE = { min: -40, max: 100 } as const;

/** Fermi–Dirac occupation f(E) = 1/(1 + exp((E − E_F)/k_B·T)) of a state at energy_ev. */
export function fermiOccupation(energy_ev: number, fermi_level_ev: number, temp_k: number): number {
  requireFinite('energy_ev', energy_ev);
  requireFinite('fermi_level_ev', fermi_level_ev);
  requirePositive('temp_k', temp_k);
  return logistic((energy_ev - fermi_level_ev) / (KB_EV_PER_K * temp_k));
}

/** 1/(1 + e^x) without overflow for large |x|. */
function logistic(x: number): number {
  if (x > 0) {
    const e = Math.exp(-x);
    return e / (1 + e);
  }
  return 1 / (1 + Math.exp(x));
}

// ---- Gauss–Legendre nodes, computed once by Newton iteration on P_n -------------------------

const GL_ORDER = 20;
const GL = gaussLegendre(GL_ORDER);

function gaussLegendre(n: number): { x: number[]; w: number[] } {
  const x: number[] = new Array(n);
  const w: number[] = new Array(n);
  for (let i = 0; i < Math.ceil(n / 2); i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 0;
    for (let iter = 0; iter < 100; iter++) {
      let p0 = 1;
      let p1 = z;
      for (let k = 2; k <= n; k++) {
        const p2 = ((2 * k - 1) * z * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      dp = (n * (z * p1 - p0)) / (z * z - 1);
      const dz = p1 / dp;
      z -= dz;
      if (Math.abs(dz) < 1e-16) break;
    }
    x[i] = -z;
    x[n - 1 - i] = z;
    w[i] = 2 / ((1 - z * z) * dp * dp);
    w[n - 1 - i] = w[i];
  }
  return { x, w };
}

function glPanel(f: (x: number) => number, a: number, b: number): number {
  const mid = 0.5 * (a + b);
  const half = 0.5 * (b - a);
  let sum = 0;
  for (let i = 0; i < GL_ORDER; i++) sum += GL.w[i] * f(mid + half * GL.x[i]);
  return sum * half;
}

// ---- the integrals -------------------------------------------------------------------------

type Order = 0.5 | -0.5;
const GAMMA_OF_ORDER_PLUS_1: Record<string, number> = {
  '0.5': Math.sqrt(Math.PI) / 2, // Γ(3/2)
  '-0.5': Math.sqrt(Math.PI), // Γ(1/2)
};
const SERIES_BELOW_ETA = -1;
const CUTOFF = 48;

function series(order: Order, eta: number): number {
  const q = Math.exp(eta);
  let sum = 0;
  let qk = 1;
  for (let k = 1; k <= 200; k++) {
    qk *= q;
    const term = qk / Math.pow(k, order + 1);
    if (term < 1e-17 * sum) break;
    sum += k % 2 === 1 ? term : -term;
  }
  return sum;
}

/** ∫₀^∞ x^order/(1 + e^(x−η)) dx by the composite rule described at the top of the file. */
function quadrature(order: Order, eta: number): number {
  const fermi = (x: number): number => logistic(x - eta);
  const upper = Math.max(eta, 0) + CUTOFF;
  let lower = Math.max(0, eta - CUTOFF);
  let total = 0;
  if (lower > 0) {
    // Fermi factor is 1 to within e^-48 below η − 48.
    total += Math.pow(lower, order + 1) / (order + 1);
  } else {
    // x = t²: x^j dx = 2·t^(2j+1) dt, smooth at t = 0 for both orders.
    total += glPanel((t) => 2 * Math.pow(t, 2 * order + 1) * fermi(t * t), 0, 1);
    lower = 1;
  }
  let a = lower;
  while (a < upper) {
    const b = Math.min(upper, a + Math.min(4, a));
    total += glPanel((x) => Math.pow(x, order) * fermi(x), a, b);
    a = b;
  }
  return total;
}

function fermiIntegralUnchecked(order: Order, eta: number): number {
  if (eta <= SERIES_BELOW_ETA) return series(order, eta);
  return quadrature(order, eta) / GAMMA_OF_ORDER_PLUS_1[String(order)];
}

function checkEta(eta: number): void {
  requireFinite('eta', eta);
  if (eta < ETA_RANGE.min || eta > ETA_RANGE.max) {
    throw new PhysicsError(
      'eta',
      `eta = ${eta} is outside the supported range ${ETA_RANGE.min} ≤ η ≤ ${ETA_RANGE.max}`,
    );
  }
}

/** Normalised Fermi–Dirac integral F½(η) (Blakemore 1982); η ∈ [−40, 100], else PhysicsError. */
export function fermiHalf(eta: number): number {
  checkEta(eta);
  return fermiIntegralUnchecked(0.5, eta);
}

/** Normalised F₋½(η) = dF½/dη; η ∈ [−40, 100], else PhysicsError. */
export function fermiMinusHalf(eta: number): number {
  checkEta(eta);
  return fermiIntegralUnchecked(-0.5, eta);
}

/** The Boltzmann (non-degenerate) limit of F½: e^η. Shown beside F½ so its error is visible. */
export function boltzmannHalf(eta: number): number {
  requireFinite('eta', eta);
  return Math.exp(eta);
}

/**
 * F½(η) for any η ≤ 100, including η < −40 where minority carriers of heavily doped material
 * sit: there F½ = e^η·(1 − e^η/2^1.5 + …) and the first two terms are exact to double precision.
 * For the density functions; user-facing input goes through `fermiHalf`.
 */
export function fermiHalfExtended(eta: number): number {
  requireFinite('eta', eta);
  if (eta > ETA_RANGE.max) checkEta(eta);
  if (eta < ETA_RANGE.min) return Math.exp(eta) * (1 - Math.exp(eta) / Math.pow(2, 1.5));
  return fermiIntegralUnchecked(0.5, eta);
}

/** F₋½(η) for any η ≤ 100 (see fermiHalfExtended); the derivative the Newton solvers need. */
export function fermiMinusHalfExtended(eta: number): number {
  requireFinite('eta', eta);
  if (eta > ETA_RANGE.max) checkEta(eta);
  if (eta < ETA_RANGE.min) return Math.exp(eta) * (1 - Math.exp(eta) / Math.SQRT2);
  return fermiIntegralUnchecked(-0.5, eta);
}

const F_HALF_MIN = fermiIntegralUnchecked(0.5, ETA_RANGE.min);
const F_HALF_MAX = fermiIntegralUnchecked(0.5, ETA_RANGE.max);

/**
 * Inverse of F½: the η with F½(η) = value. Newton's method on ln F½ (nearly linear in η for
 * η ≪ 0, ~(3/2)·ln η for η ≫ 0) inside a shrinking bracket, to |Δη| < 1e-13·max(1, |η|).
 * value must lie in [F½(−40), F½(100)].
 */
export function inverseFermiHalf(value: number): number {
  requirePositive('value', value);
  if (value < F_HALF_MIN * (1 - 1e-12) || value > F_HALF_MAX * (1 + 1e-12)) {
    throw new PhysicsError(
      'value',
      `F½ value ${value} is outside the supported range [${F_HALF_MIN.toExponential(4)}, ${F_HALF_MAX.toExponential(4)}] (η from ${ETA_RANGE.min} to ${ETA_RANGE.max})`,
    );
  }
  return invertUnchecked(value, ETA_RANGE.min - 1e-9, ETA_RANGE.max + 1e-9);
}

/** inverseFermiHalf for any value ≤ F½(100); below F½(−40) the two-term series is inverted. */
export function inverseFermiHalfExtended(value: number): number {
  requirePositive('value', value);
  if (value > F_HALF_MAX * (1 + 1e-12)) return inverseFermiHalf(value);
  if (value < F_HALF_MIN) {
    // y = q − q²/2^1.5 with q = e^η ≪ 1: one fixed-point step is exact to double precision.
    const q = value / (1 - value / Math.pow(2, 1.5));
    return Math.log(q);
  }
  return invertUnchecked(value, ETA_RANGE.min - 1e-9, ETA_RANGE.max + 1e-9);
}

function invertUnchecked(value: number, lo0: number, hi0: number): number {
  let lo = lo0;
  let hi = hi0;
  const target = Math.log(value);
  // Start from the non-degenerate limit or the fully degenerate one, F½ ≈ (4/3√π)·η^1.5.
  let eta = value < 1 ? Math.log(value) : Math.pow((3 * Math.sqrt(Math.PI) * value) / 4, 2 / 3);
  eta = Math.min(hi, Math.max(lo, eta));
  for (let iter = 0; iter < 100; iter++) {
    const f = fermiIntegralUnchecked(0.5, eta);
    const g = Math.log(f) - target;
    if (g > 0) hi = Math.min(hi, eta);
    else lo = Math.max(lo, eta);
    const slope = fermiIntegralUnchecked(-0.5, eta) / f;
    let next = eta - g / slope;
    const tol = 1e-13 * Math.max(1, Math.abs(eta));
    if (g === 0 || Math.abs(next - eta) < tol) return Math.min(hi0, Math.max(lo0, next));
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    eta = next;
  }
  return eta;
}
