/**
 * Difference between two batches' means without assuming equal variances: Welch's t-test
 * with the Welch–Satterthwaite degrees of freedom, and a sentence a QA lead can paste.
 */
import { jStat } from 'jstat';
import { assertFiniteArray, mean, sampleVariance } from '@/lib/quality/describe';
import { QualityError } from '@/lib/quality/errors';
import { labelOf, quantity, unitOf } from '@/lib/vocabulary';

/** Mean, sample standard deviation and size of one sample. */
export type SampleSummary = { n: number; mean: number; sd: number };

/** Words for the sentence; every field has a neutral default. */
export type WelchWording = {
  /** Name of the first sample, e.g. "Batch A" (default). */
  nameA?: string;
  /** Name of the second sample, e.g. "Batch B" (default). */
  nameB?: string;
  /**
   * The compared quantity's key (lib/vocabulary.ts), e.g. "ff": the sentence takes its label,
   * its unit and its scale from the key table ("FF … by 1.2 %", with FF stored as a fraction).
   */
  key?: string;
  /** The parameter's words, e.g. "mileage" (default: the key's label, else "mean value"). */
  param?: string;
  /** Unit appended to numbers, e.g. "mpg" (default: the key's unit as shown, else none). */
  unit?: string;
};

export type WelchResult = {
  n_a: number;
  n_b: number;
  mean_a: number;
  mean_b: number;
  sd_a: number;
  sd_b: number;
  /** mean_b − mean_a, in the samples' unit. */
  difference: number;
  /** sqrt(sA²/n_a + sB²/n_b). */
  standard_error: number;
  /** Welch–Satterthwaite degrees of freedom (not rounded). */
  dof: number;
  /** difference / standard_error. */
  t: number;
  /** Two-sided p-value. */
  p: number;
  confidence: number;
  /** Two-sided Student t quantile at (1 + confidence)/2 with `dof`. */
  t_critical: number;
  ci_low: number;
  ci_high: number;
  /** True when the confidence interval excludes zero. */
  significant: boolean;
  direction: 'higher' | 'lower' | 'equal';
  sentence: string;
};

function assertSummary(s: SampleSummary, what: string): void {
  if (!Number.isInteger(s.n) || s.n < 2) {
    throw new QualityError(`${what} needs at least 2 values for a standard deviation (got n = ${s.n})`);
  }
  if (!Number.isFinite(s.mean)) throw new QualityError(`${what}.mean is ${s.mean}, not a finite number`);
  if (!Number.isFinite(s.sd) || s.sd < 0) {
    throw new QualityError(`${what}.sd is ${s.sd}; a standard deviation is a finite number ≥ 0`);
  }
}

/**
 * Welch's two-sample comparison from summaries: B − A, its standard error, the
 * Welch–Satterthwaite dof, the `confidence` interval, t and the two-sided p.
 */
export function welchFromSummary(
  a: SampleSummary,
  b: SampleSummary,
  confidence = 0.95,
  wording: WelchWording = {},
): WelchResult {
  assertSummary(a, 'sample A');
  assertSummary(b, 'sample B');
  if (!(confidence > 0 && confidence < 1)) {
    throw new QualityError(`confidence is ${confidence}; give a fraction between 0 and 1, e.g. 0.95`);
  }
  const va = (a.sd * a.sd) / a.n;
  const vb = (b.sd * b.sd) / b.n;
  const se2 = va + vb;
  if (!(se2 > 0)) {
    const what = wording.param ?? (wording.key ? labelOf(wording.key) : null);
    const names = wording.nameA && wording.nameB ? `${wording.nameA} and ${wording.nameB}` : 'both samples';
    throw new QualityError(`${names} have no spread${what ? ` in ${what}` : ''} (every value equal): the difference has no standard error and no test is possible`);
  }
  const standard_error = Math.sqrt(se2);
  const dof = (se2 * se2) / ((va * va) / (a.n - 1) + (vb * vb) / (b.n - 1));
  const difference = b.mean - a.mean;
  const t = difference / standard_error;
  // Two-sided p through the regularised incomplete beta, I_{ν/(ν+t²)}(ν/2, 1/2): no
  // 1 − cdf cancellation, so tiny p-values keep their relative precision.
  const p = Math.min(1, jStat.ibeta(dof / (dof + t * t), dof / 2, 0.5));
  const t_critical = jStat.studentt.inv(1 - (1 - confidence) / 2, dof);
  const half = t_critical * standard_error;
  const ci_low = difference - half;
  const ci_high = difference + half;
  const significant = ci_low > 0 || ci_high < 0;
  const direction = difference > 0 ? 'higher' : difference < 0 ? 'lower' : 'equal';
  const result: Omit<WelchResult, 'sentence'> = {
    n_a: a.n,
    n_b: b.n,
    mean_a: a.mean,
    mean_b: b.mean,
    sd_a: a.sd,
    sd_b: b.sd,
    difference,
    standard_error,
    dof,
    t,
    p,
    confidence,
    t_critical,
    ci_low,
    ci_high,
    significant,
    direction,
  };
  return { ...result, sentence: welchSentence(result, wording) };
}

/**
 * Welch's comparison of two raw samples (same unit): the difference is mean(b) − mean(a).
 * Each sample needs at least two finite values.
 */
export function welchDifference(
  a: readonly number[],
  b: readonly number[],
  confidence = 0.95,
  wording: WelchWording = {},
): WelchResult {
  assertFiniteArray(a, 'sample A');
  assertFiniteArray(b, 'sample B');
  // Named as the sentence would name them: "Lot 7 has 1 value of Pmax; …".
  const what = wording.param ?? (wording.key ? labelOf(wording.key) : null);
  const few = (name: string | undefined, fallback: string, n: number) =>
    name ? `${name} has ${n} value${n === 1 ? '' : 's'}${what ? ` of ${what}` : ''}; a standard deviation needs at least 2` : `${fallback} needs at least 2 values for a standard deviation (got ${n})`;
  if (a.length < 2) throw new QualityError(few(wording.nameA, 'sample A', a.length));
  if (b.length < 2) throw new QualityError(few(wording.nameB, 'sample B', b.length));
  const summarise = (xs: readonly number[]): SampleSummary => ({
    n: xs.length,
    mean: mean(xs),
    sd: Math.sqrt(sampleVariance(xs) as number),
  });
  return welchFromSummary(summarise(a), summarise(b), confidence, wording);
}

/** Decimals that give the interval's half width two significant digits. */
function decimalsFor(halfWidth: number): number {
  if (!(halfWidth > 0) || !Number.isFinite(halfWidth)) return 3;
  return Math.min(12, Math.max(0, 1 - Math.floor(Math.log10(halfWidth))));
}

const minusSign = (text: string): string => text.replace(/^-/, '−');

/** "Batch A's", "US cars'". */
const possessive = (name: string): string => (/s$/i.test(name) ? `${name}'` : `${name}'s`);

function makeFormatter(halfWidth: number, magnitude: number): (x: number) => string {
  const scale = Math.max(Math.abs(halfWidth), Math.abs(magnitude));
  if (scale > 0 && (scale < 1e-3 || scale >= 1e6)) {
    // Saturation currents and similar: keep 3 significant digits in exponent form.
    return (x) => minusSign(x.toExponential(2));
  }
  const d = decimalsFor(halfWidth);
  return (x) => minusSign(x.toFixed(d));
}

function formatP(p: number): string {
  if (p < 0.001) return 'p < 0.001';
  return `p = ${Number(p.toPrecision(2))}`;
}

function welchSentence(r: Omit<WelchResult, 'sentence'>, w: WelchWording): string {
  const nameA = w.nameA ?? 'Batch A';
  const nameB = w.nameB ?? 'Batch B';
  const param = w.param ?? (w.key ? labelOf(w.key) : 'mean value');
  const unitText = w.unit ?? (w.key ? unitOf(w.key) : '');
  const unit = unitText ? ` ${unitText}` : '';
  // Stored → shown (FF and efficiency are fractions in the engine, % in words).
  const scale = w.key ? (quantity(w.key)?.scale ?? 1) : 1;
  const shownFmt = makeFormatter(scale * r.t_critical * r.standard_error, scale * r.difference);
  const fmt = (x: number) => shownFmt(scale * x);
  const pct = `${Number((r.confidence * 100).toPrecision(4))} %`;
  const stats = `Welch t = ${minusSign(String(Number(r.t.toPrecision(3))))} on ${r.dof.toFixed(1)} degrees of freedom, ${formatP(r.p)}`;
  const subject = `${possessive(nameB)} ${param}`;
  if (r.significant) {
    const [lo, hi] = r.direction === 'higher' ? [r.ci_low, r.ci_high] : [-r.ci_high, -r.ci_low];
    return (
      `${subject} is ${r.direction} than ${possessive(nameA)} by ${fmt(Math.abs(r.difference))}${unit} ` +
      `(${pct} CI ${fmt(lo)}–${fmt(hi)}${unit}; ${stats}).`
    );
  }
  const lead =
    r.direction === 'equal'
      ? `${subject} has the same mean as ${possessive(nameA)}`
      : `${subject} is ${r.direction} than ${possessive(nameA)} by ${fmt(Math.abs(r.difference))}${unit}`;
  return (
    `${lead}, but the ${pct} CI of the difference (${fmt(r.ci_low)} to ${fmt(r.ci_high)}${unit}) includes zero: ` +
    `no clear difference (${stats}).`
  );
}
