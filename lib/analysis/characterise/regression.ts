/**
 * Ordinary least squares of a straight line y = intercept + slope·x, with the textbook standard
 * errors (residual variance s² = SSE/(n − 2); se(slope) = s/√Sxx; se(intercept) = s·√(1/n + x̄²/Sxx))
 * and R² = 1 − SSE/SST. Source: any regression text, e.g. Montgomery & Runger, "Applied Statistics
 * and Probability for Engineers", ch. 11 (simple linear regression). Pure.
 */
export type LineFit = {
  n: number;
  slope: number;
  intercept: number;
  /** Standard error of the slope; null with fewer than 3 points (no degrees of freedom left). */
  slope_se: number | null;
  intercept_se: number | null;
  /** Coefficient of determination; null when every y is equal (SST = 0). */
  r2: number | null;
  x_min: number;
  x_max: number;
};

/** The least-squares line through (x, y); throws when fewer than 2 points or every x is equal. */
export function fitLine(x: readonly number[], y: readonly number[]): LineFit {
  const n = x.length;
  if (n !== y.length) throw new Error(`x has ${n} values but y has ${y.length}`);
  if (n < 2) throw new Error('a line needs at least 2 points');
  const mx = x.reduce((s, v) => s + v, 0) / n;
  const my = y.reduce((s, v) => s + v, 0) / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let k = 0; k < n; k++) {
    sxx += (x[k] - mx) ** 2;
    sxy += (x[k] - mx) * (y[k] - my);
    syy += (y[k] - my) ** 2;
  }
  if (!(sxx > 0)) throw new Error('every x is the same: no slope can be determined');
  const slope = sxy / sxx;
  const intercept = my - slope * mx;
  let sse = 0;
  for (let k = 0; k < n; k++) sse += (y[k] - intercept - slope * x[k]) ** 2;
  const s2 = n > 2 ? sse / (n - 2) : null;
  return {
    n,
    slope,
    intercept,
    slope_se: s2 === null ? null : Math.sqrt(s2 / sxx),
    intercept_se: s2 === null ? null : Math.sqrt(s2 * (1 / n + (mx * mx) / sxx)),
    r2: syy > 0 ? Math.max(0, 1 - sse / syy) : null,
    x_min: Math.min(...x),
    x_max: Math.max(...x),
  };
}

/** The line's value at x. */
export const lineAt = (f: Pick<LineFit, 'slope' | 'intercept'>, x: number) => f.intercept + f.slope * x;
