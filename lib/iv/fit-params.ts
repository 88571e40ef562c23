/** Telling fits apart by model and reading their parameters, for every consumer of a FitResult. */
import type { DoubleDiodeParams, FitResult, SingleDiodeParams } from '@/lib/iv/types';

/** True for a single-diode fit (converged or not). */
export function isSingleDiodeFit<F extends { model: string }>(f: F | undefined | null): f is Extract<F, { model: 'single-diode' }> {
  return f?.model === 'single-diode';
}

/** True for a double-diode fit (converged or not). */
export function isDoubleDiodeFit<F extends { model: string }>(f: F | undefined | null): f is Extract<F, { model: 'double-diode' }> {
  return f?.model === 'double-diode';
}

/** The fitted single-diode parameters of a converged single-diode fit, else null. */
export function singleDiodeParamsOf(f: FitResult | undefined | null): SingleDiodeParams | null {
  if (!f || f.model !== 'single-diode' || !f.converged) return null;
  const { iph_a, i0_a, n, rs_ohm, rsh_ohm } = f;
  if (iph_a == null || i0_a == null || n == null || rs_ohm == null || rsh_ohm == null) return null;
  return { iph_a, i0_a, n, rs_ohm, rsh_ohm };
}

/** The fitted double-diode parameters of a converged double-diode fit, else null. */
export function doubleDiodeParamsOf(f: FitResult | undefined | null): DoubleDiodeParams | null {
  if (!f || f.model !== 'double-diode' || !f.converged) return null;
  const { iph_a, i01_a, n1, i02_a, n2, rs_ohm, rsh_ohm } = f;
  if (iph_a == null || i01_a == null || n1 == null || i02_a == null || n2 == null || rs_ohm == null || rsh_ohm == null) return null;
  return { iph_a, i01_a, n1, i02_a, n2, rs_ohm, rsh_ohm };
}
