/**
 * Which diode model describes a curve better, with the evidence: the RMSE of each and the
 * Bayesian information criterion BIC = m·ln(SSE/m) + k·ln(m) (Schwarz 1978), which charges the
 * double diode for its extra parameters. A BIC lower by more than 10 is "very strong" evidence
 * (Kass & Raftery 1995); between 2 and 10 it is "positive" to "strong".
 */
import { isPoorFit, POOR_FIT_SHARE } from '@/lib/iv/fit-quality';
import type { FitResult } from '@/lib/iv/types';

export type FitComparison = {
  preferred: 'single-diode' | 'double-diode' | 'either';
  bic_single: number;
  bic_double: number;
  /** BIC(double) − BIC(single): negative favours the double diode. */
  delta_bic: number;
  rmse_ratio: number;
  /** True when the model the BIC prefers fails the quality test (a step, a poor-fit flag, an RMSE above 1 % of Isc): then it is not called enough. */
  preferred_fails_quality: boolean;
  sentence: string;
};

/** What the quality test of the fits needs: the curve's Isc and its flag codes. */
export type FitQualityInput = { isc_a: number; flags?: readonly string[] };

/** Free parameters of a fit: 5 for the single diode; 5 or 7 for the double (fixed or free n1, n2). */
export function freeParameters(f: FitResult): number {
  if (f.model === 'single-diode') return 5;
  const fixed = f.stderr?.n1 === null && f.stderr?.n2 === null;
  return fixed ? 5 : 7;
}

function bic(f: FitResult): number | null {
  const m = f.residuals_a?.length ?? 0;
  if (!f.converged || m < 8) return null;
  const sse = f.residuals_a.reduce((s, r) => s + r * r, 0);
  if (!(sse > 0)) return null;
  return m * Math.log(sse / m) + freeParameters(f) * Math.log(m);
}

const share = (f: FitResult, isc: number) => `${Number((((f.rmse_true_current_a ?? 0) / isc) * 100).toPrecision(2))} %`;

/**
 * Compares a single- and a double-diode fit of the same points; null when either did not converge.
 * With `quality`, a preferred model whose fit fails the quality test (the curve has a step, the
 * single diode is flagged as a poor fit, or a fit misses by more than 1 % of Isc, lib/iv/analyse.ts)
 * is never called enough: the sentence says that neither model describes the curve.
 */
export function compareFits(single: FitResult | undefined, double: FitResult | undefined, quality?: FitQualityInput): FitComparison | null {
  if (!single || !double) return null;
  const b1 = bic(single);
  const b2 = bic(double);
  if (b1 === null || b2 === null || single.rmse_a == null || double.rmse_a == null) return null;
  const delta = b2 - b1;
  const ratio = double.rmse_a / single.rmse_a;
  const strength = Math.abs(delta) > 10 ? 'very strongly' : Math.abs(delta) > 6 ? 'strongly' : 'somewhat';
  let preferred: FitComparison['preferred'];
  let sentence: string;
  if (Math.abs(delta) < 2) {
    preferred = 'either';
    sentence = `Both models describe the curve about equally well (BIC differs by ${Math.abs(delta).toFixed(1)}); the simpler single diode is enough.`;
  } else if (delta < 0) {
    preferred = 'double-diode';
    sentence = `The double diode fits ${strength} better: its RMSE is ${(100 * (1 - ratio)).toFixed(0)} % lower and its BIC lower by ${(-delta).toFixed(1)} even after the charge for its extra parameters — recombination in the depletion region matters for this device.`;
  } else {
    preferred = 'single-diode';
    sentence = `The single diode is ${strength} preferred (BIC lower by ${delta.toFixed(1)}): the second diode does not improve the fit enough to justify it${ratio > 1 ? ', and with its fixed ideality factors it even fits worse' : ''}.`;
  }
  let preferred_fails_quality = false;
  if (quality && quality.isc_a > 0) {
    const flags = new Set(quality.flags ?? []);
    const step = flags.has('step');
    const poorSingle = step || flags.has('poor-fit') || isPoorFit(single, quality.isc_a);
    const poorDouble = step || isPoorFit(double, quality.isc_a);
    const fails = preferred === 'single-diode' ? poorSingle : preferred === 'double-diode' ? poorDouble : poorSingle || poorDouble;
    if (fails && poorSingle && poorDouble) {
      preferred_fails_quality = true;
      sentence =
        `Neither model describes this curve: the single diode misses it by ${share(single, quality.isc_a)} of Isc and the double diode by ${share(double, quality.isc_a)} ` +
        `(a fit within ${POOR_FIT_SHARE * 100} % is asked)${step ? ', and the curve has a step that no diode model makes' : ''}. ` +
        `The BIC difference of ${Math.abs(delta).toFixed(1)} only ranks two fits that both fail; neither model's parameters describe the device.`;
    } else if (fails) {
      const [bad, good, badFit] = poorSingle ? ['single', 'double', single] : ['double', 'single', double];
      preferred_fails_quality = true;
      sentence =
        `The ${bad} diode misses this curve by ${share(badFit, quality.isc_a)} of Isc, more than the ${POOR_FIT_SHARE * 100} % asked, so it is not enough whatever the BIC says; ` +
        `only the ${good} diode stays within ${POOR_FIT_SHARE * 100} %.`;
    }
  }
  return { preferred, bic_single: b1, bic_double: b2, delta_bic: delta, rmse_ratio: ratio, preferred_fails_quality, sentence };
}
