/**
 * Lambert W, principal branch, for real arguments.
 *
 * The diode models need W(θ) with θ = c·exp(x) where x reaches several hundred for modules
 * of many cells, so the workhorse here is `lambertWExp(x)` = W(e^x), evaluated in log form
 * and never forming e^x when it would overflow.
 */

const INV_E = Math.exp(-1);

/**
 * W0(x) for x ≥ −1/e (principal branch, W ≥ −1). Throws RangeError below −1/e and for
 * non-finite input, because a silent NaN would travel into a fit.
 */
export function lambertW(x: number): number {
  if (!Number.isFinite(x)) throw new RangeError(`lambertW: argument must be finite, got ${x}`);
  if (x < -INV_E) {
    // Allow the rounding of −1/e itself (−0.36787944117144233 vs the true value).
    if (x > -INV_E - 4 * Number.EPSILON) return -1;
    throw new RangeError(`lambertW: argument ${x} is below −1/e, outside the real principal branch`);
  }
  if (x === 0) return 0;
  if (x > 1) return lambertWExp(Math.log(x));

  let w: number;
  const branchDistance = Math.E * x + 1; // 0 at the branch point
  if (branchDistance < 0.3) {
    // Series about the branch point in p = sqrt(2(e·x + 1)) (Corless et al. 1996, eq. 4.22).
    const p = Math.sqrt(2 * Math.max(branchDistance, 0));
    w = -1 + p - (p * p) / 3 + (11 / 72) * p * p * p - (43 / 540) * p ** 4;
    if (p < 1e-4) return w;
  } else {
    w = Math.log1p(x) * (x < 0 ? 1.2 : 0.8);
  }
  // Halley on f(w) = w·e^w − x, cubic convergence; a handful of steps from these starts.
  for (let k = 0; k < 30; k++) {
    const ew = Math.exp(w);
    const f = w * ew - x;
    const wp1 = w + 1;
    const denom = ew * wp1 - ((w + 2) * f) / (2 * wp1);
    if (denom === 0 || !Number.isFinite(denom)) break;
    const step = f / denom;
    w -= step;
    if (Math.abs(step) <= 4 * Number.EPSILON * Math.max(1, Math.abs(w))) break;
  }
  return w;
}

/**
 * W(e^x) for any finite real x, without forming e^x when it would overflow
 * (needed for θ up to e^1000 and beyond). Accurate to a few ulps.
 */
export function lambertWExp(x: number): number {
  if (!Number.isFinite(x)) {
    if (x === -Infinity) return 0;
    throw new RangeError(`lambertWExp: argument must be finite, got ${x}`);
  }
  if (x < -40) {
    // W(y) = y − y² + 1.5y³ …; beyond e^−40 the second term is below double precision.
    const y = Math.exp(x);
    return y * (1 - y);
  }
  // Start from Winitzki's approximation W(y) ≈ L·(1 − ln(1 + L)/(2 + L)), L = ln(1 + y)
  // (a few per cent off at worst), then Fritsch–Shafer–Crowley steps on w + ln w = x
  // (Fritsch, Shafer & Crowley 1973, Commun. ACM 16:123), each of which raises the relative
  // error to the fourth power: two steps reach double precision from this start.
  const softplus = x > 0 ? x + Math.log1p(Math.exp(-x)) : Math.log1p(Math.exp(x));
  let w = softplus * (1 - Math.log1p(softplus) / (2 + softplus));
  for (let k = 0; k < 4; k++) {
    const z = x - w - Math.log(w);
    const w1 = 1 + w;
    const q = 2 * w1 * (w1 + (2 * z) / 3);
    const e = ((z / w1) * (q - z)) / (q - 2 * z);
    w *= 1 + e;
    if (Math.abs(e) < 1e-8) break;
  }
  return w;
}
