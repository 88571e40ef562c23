/** The quality test of a fit, shared by the flags (lib/iv/analyse.ts) and the model comparison (lib/analysis/compare-fits.ts). */
import type { FitResult } from '@/lib/iv/types';

/** A fit RMSE above this share of Isc means the model does not describe the curve. */
export const POOR_FIT_SHARE = 0.01;

/** True when a converged fit misses the curve by more than POOR_FIT_SHARE of Isc (true-current RMSE). */
export function isPoorFit(fit: FitResult, isc_a: number): boolean {
  return fit.converged && fit.rmse_true_current_a !== null && fit.rmse_true_current_a > POOR_FIT_SHARE * isc_a;
}
