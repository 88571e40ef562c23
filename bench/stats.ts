/** Small statistics helpers shared by the benchmark sections and the load run. */

/** Nearest-rank quantile (q in 0…1) of values sorted ascending; NaN when empty. */
export function quantileSorted(sorted: number[], q: number): number {
  if (!sorted.length) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1))];
}

/** Nearest-rank quantile of unsorted values. */
export function quantile(values: number[], q: number): number {
  return quantileSorted([...values].sort((a, b) => a - b), q);
}

/** Rounds to `digits` significant digits (for printing and the JSON record). */
export function round(x: number, digits = 3): number {
  return Number.isFinite(x) ? Number(x.toPrecision(digits)) : x;
}
