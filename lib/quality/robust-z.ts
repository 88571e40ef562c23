/**
 * Outliers by the modified z-score (Iglewicz & Hoaglin 1993, "How to Detect and Handle
 * Outliers", ASQC Basic References in Quality Control 16): M = 0.6745·(x − median)/MAD,
 * outlier when |M| > 3.5. Median and MAD ignore the outliers themselves, unlike mean and sd.
 */
import { assertFiniteArray, mean, percentileSorted } from '@/lib/quality/describe';

/** 0.6745 ≈ Φ⁻¹(0.75): makes MAD a consistent estimate of σ for normal data (Iglewicz & Hoaglin). */
export const MODIFIED_Z_FACTOR = 0.6745;
/** |M| above this is an outlier (Iglewicz & Hoaglin's recommendation). */
export const MODIFIED_Z_LIMIT = 3.5;
/**
 * When MAD is 0 (over half the values identical) the mean absolute deviation stands in,
 * scaled by sqrt(π/2) ≈ 1.2533 so it too estimates σ for normal data (common practice).
 */
const MEAN_AD_TO_SIGMA = Math.sqrt(Math.PI / 2);

export type RobustZResult = {
  median: number;
  /** Median absolute deviation from the median, in the values' unit. */
  mad: number;
  /**
   * 'mad': the modified z-score; 'meanad': MAD was 0 and the mean absolute deviation was used;
   * 'none': every value equals the median, all scores are 0.
   */
  scale: 'mad' | 'meanad' | 'none';
  /** One score per input value, in input order. */
  z: number[];
  isOutlier: boolean[];
  outlierCount: number;
};

/** Modified z-scores of `values` (any unit) and which ones are outliers (|z| > 3.5). */
export function robustZ(values: readonly number[]): RobustZResult {
  assertFiniteArray(values, 'values');
  if (values.length === 0) {
    return { median: 0, mad: 0, scale: 'none', z: [], isOutlier: [], outlierCount: 0 };
  }
  // Typed arrays sort numerically without a comparator callback (several times faster).
  const median = percentileSorted(Float64Array.from(values).sort(), 0.5);
  const absDev = values.map((v) => Math.abs(v - median));
  const mad = percentileSorted(Float64Array.from(absDev).sort(), 0.5);
  let z: number[];
  let scale: RobustZResult['scale'];
  if (mad > 0) {
    scale = 'mad';
    z = values.map((v) => (MODIFIED_Z_FACTOR * (v - median)) / mad);
  } else {
    const meanAd = mean(absDev);
    if (meanAd > 0) {
      scale = 'meanad';
      z = values.map((v) => (v - median) / (MEAN_AD_TO_SIGMA * meanAd));
    } else {
      scale = 'none';
      z = values.map(() => 0);
    }
  }
  const isOutlier = z.map((s) => Math.abs(s) > MODIFIED_Z_LIMIT);
  return { median, mad, scale, z, isOutlier, outlierCount: isOutlier.filter(Boolean).length };
}
