import ttest2 from '@stdlib/stats-ttest2';
import { describe, expect, it } from 'vitest';
import { summarize } from '../../../analysis/stats/summary.js';
import { welchTTest, type GroupMoments } from '../../../analysis/stats/welch.js';
import { loadSeattleWeather, type WeatherDay } from './seattle-weather.js';

function moments(values: readonly number[]): GroupMoments {
  const s = summarize(values);
  return { n: s.n, mean: s.mean!, sd: s.sd! };
}

function relClose(actual: number, expected: number, rel: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(rel * Math.max(Math.abs(expected), Number.MIN_VALUE));
}

describe('welchTTest on the NIST AUTO83B summary numbers', () => {
  // NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.5.3, two-sample t-test example on AUTO83B.DAT:
  // US cars n = 249, mean 20.14458, sd 6.41470; Japanese cars n = 79, mean 30.48101, sd 6.10771.
  const us = { n: 249, mean: 20.14458, sd: 6.4147 };
  const japan = { n: 79, mean: 30.48101, sd: 6.10771 };
  const r = welchTTest(us, japan)!;

  it('reproduces the unequal-variance results printed by the Boost.Math example students_t_two_samples on these numbers', () => {
    // Boost.Math documentation example output for the same summary: df = 136.87499, T = -12.94627, p = 1.571e-025.
    expect(r.t).toBeCloseTo(-12.94627, 5);
    expect(r.df).toBeCloseTo(136.87499, 5);
    relClose(r.pValue, 1.571e-25, 1e-3);
  });

  it('uses the pooled standard deviation the handbook prints (sp = 6.34260)', () => {
    // e-Handbook 1.3.5.3 prints the pooled sd of its equal-variance test as 6.34260.
    expect(r.pooledSd).toBeCloseTo(6.3426, 5);
    // Hedges' g from that sd, with J = 1 − 3/(4·328 − 9): derived here, not printed in the handbook.
    expect(r.effectSize!).toBeCloseTo(((20.14458 - 30.48101) / 6.3426) * (1 - 3 / 1303), 4);
    expect(r.difference).toBeCloseTo(-10.33643, 10);
    expect(r.relativeLift!).toBeCloseTo(-10.33643 / 30.48101, 12);
  });
});

describe('welchTTest against @stdlib/stats-ttest2 (unequal variances) on the Seattle weather record', () => {
  const days = loadSeattleWeather();
  const pick = (f: (d: WeatherDay) => boolean, col: 'tempMax' | 'wind' | 'precipitation') => days.filter(f).map((d) => d[col]);
  const cases: [string, number[], number[]][] = [
    ['temp_max, sun vs rain days', pick((d) => d.weather === 'sun', 'tempMax'), pick((d) => d.weather === 'rain', 'tempMax')],
    ['wind, fog vs drizzle days', pick((d) => d.weather === 'fog', 'wind'), pick((d) => d.weather === 'drizzle', 'wind')],
    [
      'precipitation, January 2012 vs January 2013',
      pick((d) => d.date.startsWith('2012-01'), 'precipitation'),
      pick((d) => d.date.startsWith('2013-01'), 'precipitation'),
    ],
    ['temp_max, snow vs fog days', pick((d) => d.weather === 'snow', 'tempMax'), pick((d) => d.weather === 'fog', 'tempMax')],
  ];
  for (const [label, x, y] of cases) {
    for (const confidence of [0.95, 0.9]) {
      it(`${label} at ${confidence}: t, df, p and interval match to ~1e-8`, () => {
        const reference = ttest2(x, y, { alpha: 1 - confidence });
        const r = welchTTest(moments(x), moments(y), confidence)!;
        relClose(r.t, reference.statistic, 1e-8);
        relClose(r.df, reference.df, 1e-8);
        relClose(r.pValue, reference.pValue, 1e-8);
        relClose(r.ci[0], reference.ci[0]!, 1e-8);
        relClose(r.ci[1], reference.ci[1]!, 1e-8);
        relClose(r.difference, reference.xmean - reference.ymean, 1e-12);
      });
    }
  }
});

describe('welchTTest edge cases', () => {
  it('returns null where no test exists', () => {
    expect(welchTTest({ n: 1, mean: 3, sd: 0 }, { n: 10, mean: 2, sd: 1 })).toBeNull();
    expect(welchTTest({ n: 5, mean: 3, sd: 0 }, { n: 5, mean: 2, sd: 0 })).toBeNull();
    expect(welchTTest({ n: 5, mean: Number.NaN, sd: 1 }, { n: 5, mean: 2, sd: 1 })).toBeNull();
  });

  it('relative lift is null against a zero baseline mean', () => {
    expect(welchTTest({ n: 5, mean: 1, sd: 1 }, { n: 5, mean: 0, sd: 1 })!.relativeLift).toBeNull();
  });

  it('is antisymmetric: swapping groups negates t, the difference and the interval', () => {
    const a = { n: 12, mean: 4.2, sd: 1.1 };
    const b = { n: 30, mean: 3.1, sd: 2.5 };
    const ab = welchTTest(a, b)!;
    const ba = welchTTest(b, a)!;
    expect(ba.t).toBeCloseTo(-ab.t, 12);
    expect(ba.df).toBeCloseTo(ab.df, 12);
    expect(ba.pValue).toBeCloseTo(ab.pValue, 12);
    expect(ba.ci[0]).toBeCloseTo(-ab.ci[1], 12);
  });

  it('rejects a confidence level outside (0, 1)', () => {
    expect(() => welchTTest({ n: 5, mean: 1, sd: 1 }, { n: 5, mean: 0, sd: 1 }, 1)).toThrow(RangeError);
  });
});
