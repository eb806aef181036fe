// Unusual periods in a series: the modified z-score (Iglewicz & Hoaglin 1993) over the complete
// periods, so one storm month cannot hide itself by inflating the spread it is judged against.
import { MODIFIED_Z_THRESHOLD, modifiedZScores } from '../stats/index.js';
import type { Caveat, Grain, PeriodPoint } from '../types.js';

/**
 * Below this many complete periods no period is called an outlier: a median absolute deviation
 * of three or four values says little about what is usual (a rule of thumb, common practice).
 */
export const MIN_OUTLIER_PERIODS = 5;

/** One `outlier` caveat per complete period whose |modified z| exceeds 3.5; partial and missing periods are left out. */
export function seriesOutliers(points: PeriodPoint[], grain: Grain): Caveat[] {
  const complete = points.filter((p): p is PeriodPoint & { value: number } => !p.partial && p.value !== null && Number.isFinite(p.value));
  if (complete.length < MIN_OUTLIER_PERIODS) return [];
  const result = modifiedZScores(complete.map((p) => p.value), MODIFIED_Z_THRESHOLD);
  if (!result) return [];
  return result.outlierIndices.map((i) => ({
    code: 'outlier' as const,
    data: { period: complete[i]!.period, grain, value: complete[i]!.value, score: result.scores[i]! },
  }));
}
