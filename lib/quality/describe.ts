/**
 * Descriptive statistics of one parameter over a batch, with the process capability index
 * against acceptance limits.
 */
import { QualityError } from '@/lib/quality/errors';
import { formatNumber, formatValue, labelOf } from '@/lib/vocabulary';

/** Acceptance limits of one parameter; either side may be absent. */
export type Limits = { min?: number; max?: number };

export type Description = {
  n: number;
  mean: number;
  /** Sample standard deviation (n − 1 denominator); null for a single value. */
  sd: number | null;
  min: number;
  p5: number;
  median: number;
  p95: number;
  max: number;
  /**
   * Cpk = min(USL − μ, μ − LSL)/(3·sd); with one limit only its own side is used. Null when
   * there is no limit, or sd is null or 0 (capability is undefined, not infinite).
   */
  cpk: number | null;
  /** Which limits entered Cpk. */
  cpk_side: 'both' | 'upper' | 'lower' | null;
};

/** Throws unless every entry is a finite number; `what` names the input in the message. */
export function assertFiniteArray(values: readonly number[], what: string): void {
  if (!Array.isArray(values)) throw new QualityError(`${what} must be an array of numbers`);
  values.forEach((v, i) => {
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new QualityError(`${what}[${i}] is ${String(v)}, not a finite number`);
    }
  });
}

/**
 * Percentile of values already sorted ascending, by linear interpolation between order
 * statistics (Hyndman & Fan 1996, definition 7; the default of R's quantile() and of most
 * spreadsheets' PERCENTILE): h = (n − 1)·p, x[⌊h⌋] + (h − ⌊h⌋)·(x[⌊h⌋+1] − x[⌊h⌋]), 0-based.
 * `p` is a fraction in [0, 1].
 */
export function percentileSorted(sorted: ArrayLike<number>, p: number): number {
  if (sorted.length === 0) throw new QualityError('percentile of an empty list is undefined');
  if (!(p >= 0 && p <= 1)) throw new QualityError(`percentile fraction ${p} is outside 0…1`);
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/**
 * Arithmetic mean of a non-empty list, summed as offsets from the first value: exact when all
 * values are equal (so their spread is exactly 0) and fewer lost digits on large offsets.
 */
export function mean(values: ArrayLike<number>): number {
  const x0 = values[0];
  let sum = 0;
  for (let k = 0; k < values.length; k++) sum += values[k] - x0;
  return x0 + sum / values.length;
}

/** Sample variance (n − 1); two-pass so that large offsets (Voc ≈ 40 V ± mV) keep their digits. */
export function sampleVariance(values: ArrayLike<number>): number | null {
  if (values.length < 2) return null;
  const m = mean(values);
  let ss = 0;
  for (let k = 0; k < values.length; k++) ss += (values[k] - m) * (values[k] - m);
  return ss / (values.length - 1);
}

/** Throws on min > max or non-finite limits. */
export function assertLimits(limits: Limits | undefined, what = 'limits'): void {
  if (!limits) return;
  for (const side of ['min', 'max'] as const) {
    const b = limits[side];
    if (b !== undefined && (typeof b !== 'number' || !Number.isFinite(b))) {
      throw new QualityError(`${what}.${side} is ${String(b)}, not a finite number`);
    }
  }
  if (limits.min !== undefined && limits.max !== undefined && limits.min > limits.max) {
    throw new QualityError(`${what}: min (${limits.min}) is greater than max (${limits.max})`);
  }
}

/**
 * Cpk of a process with mean `mu` and standard deviation `sd` against `limits`
 * (one-sided when only one limit is given).
 */
export function cpkOf(mu: number, sd: number | null, limits?: Limits): Pick<Description, 'cpk' | 'cpk_side'> {
  const hasMin = limits?.min !== undefined;
  const hasMax = limits?.max !== undefined;
  if (!limits || (!hasMin && !hasMax) || sd === null || sd === 0) return { cpk: null, cpk_side: null };
  const upper = hasMax ? (limits.max! - mu) / (3 * sd) : Infinity;
  const lower = hasMin ? (mu - limits.min!) / (3 * sd) : Infinity;
  return { cpk: Math.min(upper, lower), cpk_side: hasMin && hasMax ? 'both' : hasMax ? 'upper' : 'lower' };
}

/**
 * n, mean, sample sd, min, 5th percentile, median, 95th percentile, max and Cpk of `values`
 * (any one unit; the result is in the same unit). Percentiles: Hyndman & Fan definition 7.
 */
export function describe(values: readonly number[], limits?: Limits): Description {
  assertFiniteArray(values, 'values');
  if (values.length === 0) throw new QualityError('values is empty: there is nothing to describe');
  assertLimits(limits);
  // A typed array sorts numerically without a comparator callback: ~5× faster on 1,000 values (measured).
  const sorted = Float64Array.from(values).sort();
  const mu = mean(sorted);
  const variance = sampleVariance(sorted);
  const sd = variance === null ? null : Math.sqrt(variance);
  return {
    n: sorted.length,
    mean: mu,
    sd,
    min: sorted[0],
    p5: percentileSorted(sorted, 0.05),
    median: percentileSorted(sorted, 0.5),
    p95: percentileSorted(sorted, 0.95),
    max: sorted[sorted.length - 1],
    ...cpkOf(mu, sd, limits),
  };
}

/**
 * One parameter's statistics in a sentence, in the screens' labels, units and digits (lib/vocabulary.ts):
 * "Pmax at STC over 24 devices: mean 401.2 W, standard deviation 1.31 W, 5th to 95th percentile
 * 399.0–403.1 W, Cpk 1.45 (both limits)."
 */
export function describeSentence(key: string, d: Description): string {
  const v = (x: number, digits?: number) => formatValue(key, x, digits);
  const parts = [`mean ${v(d.mean)}`];
  if (d.sd !== null) parts.push(`standard deviation ${v(d.sd, 3)}`);
  parts.push(d.n >= 2 ? `5th to 95th percentile ${formatNumber(key, d.p5)}–${v(d.p95)}` : `the one value ${v(d.min)}`);
  if (d.cpk !== null) parts.push(`Cpk ${d.cpk.toFixed(2)} (${d.cpk_side === 'both' ? 'both limits' : d.cpk_side === 'upper' ? 'against the maximum' : 'against the minimum'})`);
  return `${labelOf(key)} over ${d.n} device${d.n === 1 ? '' : 's'}: ${parts.join(', ')}.`;
}
