/**
 * Which diode model describes a curve better, with the evidence: the RMSE of each and the
 * Bayesian information criterion BIC = m·ln(SSE/m) + k·ln(m) (Schwarz 1978), which charges the
 * double diode for its extra parameters. A BIC lower by more than 10 is "very strong" evidence
 * (Kass & Raftery 1995); between 2 and 10 it is "positive" to "strong".
 */
import type { FitResult } from '@/lib/iv/types';

export type FitComparison = {
  preferred: 'single-diode' | 'double-diode' | 'either';
  bic_single: number;
  bic_double: number;
  /** BIC(double) − BIC(single): negative favours the double diode. */
  delta_bic: number;
  rmse_ratio: number;
  sentence: string;
};

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

/** Compares a single- and a double-diode fit of the same points; null when either did not converge. */
export function compareFits(single: FitResult | undefined, double: FitResult | undefined): FitComparison | null {
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
  return { preferred, bic_single: b1, bic_double: b2, delta_bic: delta, rmse_ratio: ratio, sentence };
}
