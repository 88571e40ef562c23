/**
 * Independent numerical method for the tests (not used by the library): the normalised
 * Fermi–Dirac integral by double-exponential quadrature. The range is split at x = max(η, 0):
 * tanh-sinh on [0, c] (copes with the x^j end-point singularity and puts its nodes where the
 * Fermi step is, at the right end), exp-sinh x = c + exp(π/2·sinh t) on [c, ∞). The step is
 * halved until two levels agree to 1e-14 relative. The library instead uses a series for
 * η ≤ −1 and composite Gauss–Legendre above; the two share no code.
 */
function tanhSinh(f: (x: number) => number, a: number, b: number, h: number): number {
  const half = (b - a) / 2;
  let sum = 0;
  for (let k = -Math.ceil(4 / h); k <= Math.ceil(4 / h); k++) {
    const t = k * h;
    const u = (Math.PI / 2) * Math.sinh(t);
    const cu = Math.cosh(u);
    // Distance from the nearer end, computed without cancellation.
    const dist = half / (Math.exp(Math.abs(u)) * cu);
    const w = (half * (Math.PI / 2) * Math.cosh(t)) / (cu * cu);
    if (dist === 0 || w === 0) continue;
    const x = u < 0 ? a + dist : b - dist;
    sum += w * f(x);
  }
  return sum * h;
}

function expSinh(f: (x: number) => number, c: number, h: number): number {
  let sum = 0;
  for (let k = -Math.ceil(4.5 / h); k <= Math.ceil(3.5 / h); k++) {
    const t = k * h;
    const e = Math.exp((Math.PI / 2) * Math.sinh(t));
    const w = (Math.PI / 2) * Math.cosh(t) * e;
    const x = c + e;
    const fx = f(x);
    if (fx === 0 || !Number.isFinite(w)) continue;
    sum += w * fx;
  }
  return sum * h;
}

function gammaOfOrderPlusOne(order: number): number {
  if (order === 0.5) return Math.sqrt(Math.PI) / 2;
  if (order === -0.5) return Math.sqrt(Math.PI);
  throw new Error('order 0.5 or -0.5 only');
}

/** F_j(η) for j = ±1/2 by the double-exponential quadrature described above. */
export function referenceFermiIntegral(order: 0.5 | -0.5, eta: number): number {
  const fermi = (x: number) => {
    const z = x - eta;
    return z > 0 ? Math.exp(-z) / (1 + Math.exp(-z)) : 1 / (1 + Math.exp(z));
  };
  const f = (x: number) => Math.pow(x, order) * fermi(x);
  const c = Math.max(eta, 0);
  let previous = NaN;
  for (let h = 1 / 8; h >= 1 / 512; h /= 2) {
    const value = (c > 0 ? tanhSinh(f, 0, c, h) : 0) + expSinh(f, c, h);
    if (Math.abs(value - previous) <= 1e-14 * Math.abs(value)) return value / gammaOfOrderPlusOne(order);
    previous = value;
  }
  return previous / gammaOfOrderPlusOne(order);
}
