import { describe, expect, it } from 'vitest';
import * as stats from '../../../analysis/stats/index.js';

describe('analysis/stats index', () => {
  it('re-exports every family', () => {
    for (const name of [
      'summarize',
      'argExtremes',
      'momentsOf',
      'momentsFromSums',
      'combineMoments',
      'describeMoments',
      'welchTTest',
      'twoProportionZTest',
      'bootstrapMedianDifference',
      'mannKendall',
      'senSlope',
      'seasonalIndices',
      'centredMovingAverage',
      'periodOverPeriod',
      'yearOverYear',
      'cagr',
      'relativeChange',
      'trailingSum',
      'trailingSumGrowth',
      'sharesOfTotal',
      'paretoCurve',
      'countToReachShare',
      'topNShare',
      'herfindahlHirschman',
      'hhiBand',
      'concentration',
      'modifiedZScores',
      'median',
      'quantileSorted',
      'mulberry32',
    ]) {
      expect(typeof (stats as Record<string, unknown>)[name], name).toBe('function');
    }
  });
});
