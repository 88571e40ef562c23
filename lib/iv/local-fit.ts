/** Small dense linear algebra and local polynomial fits used by the key figures and the fits. */

/**
 * Solves the symmetric positive-definite system A·x = b (n×n, row-major) by Cholesky in place
 * of copies. Returns null when A is not positive definite (numerically singular).
 */
export function solveSpd(a: Float64Array, b: Float64Array, n: number): Float64Array | null {
  const l = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let sum = a[i * n + j];
      for (let k = 0; k < j; k++) sum -= l[i * n + k] * l[j * n + k];
      if (i === j) {
        if (!(sum > 0)) return null;
        l[i * n + i] = Math.sqrt(sum);
      } else {
        l[i * n + j] = sum / l[j * n + j];
      }
    }
  }
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let sum = b[i];
    for (let k = 0; k < i; k++) sum -= l[i * n + k] * y[k];
    y[i] = sum / l[i * n + i];
  }
  const x = new Float64Array(n);
  for (let i = n - 1; i >= 0; i--) {
    let sum = y[i];
    for (let k = i + 1; k < n; k++) sum -= l[k * n + i] * x[k];
    x[i] = sum / l[i * n + i];
  }
  return x;
}

/**
 * Inverse of a symmetric positive-definite matrix (n×n, row-major), or null when singular.
 * Columns are equilibrated first so that parameters of very different scale do not hide a
 * well-posed problem behind a badly conditioned matrix.
 */
export function invertSpd(a: Float64Array, n: number): Float64Array | null {
  const d = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    if (!(a[i * n + i] > 0)) return null;
    d[i] = 1 / Math.sqrt(a[i * n + i]);
  }
  const s = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) s[i * n + j] = a[i * n + j] * d[i] * d[j];
  const inv = new Float64Array(n * n);
  for (let col = 0; col < n; col++) {
    const e = new Float64Array(n);
    e[col] = 1;
    const x = solveSpd(s, e, n);
    if (!x) return null;
    for (let row = 0; row < n; row++) inv[row * n + col] = x[row] * d[row] * d[col];
  }
  return inv;
}

/** Polynomial coefficients c0 + c1·(x − x0) + c2·(x − x0)² … from a least-squares fit about x0. */
export type LocalPoly = { x0: number; scale: number; coef: number[] };

/**
 * Least-squares polynomial of the given degree through (x, y) about x0, with x scaled for
 * conditioning. Returns null when the points cannot determine it.
 */
export function fitLocalPoly(x: readonly number[], y: readonly number[], degree: number, x0: number): LocalPoly | null {
  const m = x.length;
  const p = degree + 1;
  if (m < p) return null;
  let scale = 0;
  for (const xi of x) scale = Math.max(scale, Math.abs(xi - x0));
  if (!(scale > 0)) return null;
  const ata = new Float64Array(p * p);
  const aty = new Float64Array(p);
  const row = new Float64Array(p);
  for (let i = 0; i < m; i++) {
    const t = (x[i] - x0) / scale;
    row[0] = 1;
    for (let k = 1; k < p; k++) row[k] = row[k - 1] * t;
    for (let r = 0; r < p; r++) {
      aty[r] += row[r] * y[i];
      for (let c = 0; c < p; c++) ata[r * p + c] += row[r] * row[c];
    }
  }
  const sol = solveSpd(ata, aty, p);
  if (!sol) return null;
  const coef: number[] = [];
  for (let k = 0; k < p; k++) coef.push(sol[k] / scale ** k);
  return { x0, scale, coef };
}

/** Value of a local polynomial at x. */
export function polyValue(poly: LocalPoly, x: number): number {
  const t = x - poly.x0;
  let v = 0;
  for (let k = poly.coef.length - 1; k >= 0; k--) v = v * t + poly.coef[k];
  return v;
}

/** First derivative of a local polynomial at x. */
export function polySlope(poly: LocalPoly, x: number): number {
  const t = x - poly.x0;
  let v = 0;
  for (let k = poly.coef.length - 1; k >= 1; k--) v = v * t + k * poly.coef[k];
  return v;
}
