// Robust outlier screening with the modified z-score of Iglewicz & Hoaglin (1993).
import { medianInPlace } from './order-stats.js';

export interface ModifiedZResult {
  median: number;
  /** Median absolute deviation from the median. */
  mad: number;
  /** Mean absolute deviation from the median, used only when MAD is 0. */
  meanAbsDev: number;
  /** Which spread the scores divide by: MAD, the mean-absolute-deviation fallback, or none (all values equal). */
  scale: 'mad' | 'mean_abs_dev' | 'none';
  /** One score per input; null where the input is null or non-finite. */
  scores: (number | null)[];
  /** Indices whose |score| exceeds the threshold. */
  outlierIndices: number[];
  threshold: number;
}

// 0.6745 ≈ Φ⁻¹(0.75), so 0.6745·(x − median)/MAD estimates (x − μ)/σ for normal data (Iglewicz & Hoaglin 1993).
export const MODIFIED_Z_CONSTANT = 0.6745;
/** Iglewicz & Hoaglin's recommended cut-off for |modified z|. */
export const MODIFIED_Z_THRESHOLD = 3.5;
// √(π/2): for normal data σ ≈ 1.2533 × mean absolute deviation, the same scale as 0.6745/MAD above.
const MEAN_ABS_DEV_TO_SIGMA = Math.sqrt(Math.PI / 2);

/**
 * Modified z-scores 0.6745·(x − median)/MAD. When MAD is 0 (over half the values equal the median) it falls back to
 * (x − median)/(1.2533·mean absolute deviation); when that is 0 too, every score is 0. Null with no finite value.
 */
export function modifiedZScores(
  values: readonly (number | null)[],
  threshold = MODIFIED_Z_THRESHOLD,
): ModifiedZResult | null {
  const finite: number[] = [];
  for (const v of values) if (typeof v === 'number' && Number.isFinite(v)) finite.push(v);
  if (finite.length === 0) return null;
  const med = medianInPlace(Float64Array.from(finite));
  const deviations = Float64Array.from(finite, (v) => Math.abs(v - med));
  const meanAbsDev = deviations.reduce((acc, d) => acc + d, 0) / deviations.length;
  const mad = medianInPlace(deviations);
  let scale: ModifiedZResult['scale'];
  let score: (x: number) => number;
  if (mad > 0) {
    scale = 'mad';
    score = (x) => (MODIFIED_Z_CONSTANT * (x - med)) / mad;
  } else if (meanAbsDev > 0) {
    scale = 'mean_abs_dev';
    score = (x) => (x - med) / (MEAN_ABS_DEV_TO_SIGMA * meanAbsDev);
  } else {
    scale = 'none';
    score = () => 0;
  }
  const scores = values.map((v) => (typeof v === 'number' && Number.isFinite(v) ? score(v) : null));
  const outlierIndices: number[] = [];
  scores.forEach((s, i) => {
    if (s !== null && Math.abs(s) > threshold) outlierIndices.push(i);
  });
  return { median: med, mad, meanAbsDev, scale, scores, outlierIndices, threshold };
}
