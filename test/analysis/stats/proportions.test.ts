import { describe, expect, it } from 'vitest';
import { twoProportionZTest } from '../../../analysis/stats/proportions.js';
import { jStat } from './jstat.js';
import { loadSeattleWeather } from './seattle-weather.js';

describe('twoProportionZTest on the Physicians’ Health Study aspirin data (textbook example)', () => {
  // Myocardial infarction: placebo 189 of 11,034, aspirin 104 of 11,037 (Physicians' Health Study Research Group, 1989),
  // the worked example of Agresti, An Introduction to Categorical Data Analysis, section 2.2 (recalled from memory:
  // difference 0.0171 − 0.0094 = 0.0077, SE 0.0015, 95% CI (0.005, 0.011), relative risk 1.82, Pearson X² = 25.01).
  const r = twoProportionZTest({ successes: 189, n: 11034 }, { successes: 104, n: 11037 })!;

  it('reproduces the printed proportions, difference, SE and Wald interval', () => {
    expect(r.p1).toBeCloseTo(0.0171, 4);
    expect(r.p2).toBeCloseTo(0.0094, 4);
    expect(r.difference).toBeCloseTo(0.0077, 4);
    expect(r.unpooledSe).toBeCloseTo(0.0015, 4);
    expect(r.ci[0]).toBeCloseTo(0.005, 3);
    expect(r.ci[1]).toBeCloseTo(0.011, 3);
    expect(1 + r.relativeLift!).toBeCloseTo(1.82, 2);
  });

  it('z² equals the Pearson chi-squared statistic of the 2×2 table (25.01)', () => {
    // The pooled two-proportion z-test and Pearson's X² test of a 2×2 table are the same test: z² = X².
    expect(r.z * r.z).toBeCloseTo(25.01, 2);
    expect(r.pValue).toBeLessThan(1e-5);
  });
});

describe('twoProportionZTest against jStat on the Seattle weather record (vega-datasets)', () => {
  const days = loadSeattleWeather();
  const wet = (months: string[]) => {
    const sel = days.filter((d) => months.includes(d.date.slice(5, 7)));
    return { successes: sel.filter((d) => d.precipitation > 0).length, n: sel.length };
  };
  const cases: [string, { successes: number; n: number }, { successes: number; n: number }][] = [
    ['wet days, winter (Dec–Feb) vs summer (Jun–Aug)', wet(['12', '01', '02']), wet(['06', '07', '08'])],
    ['wet days, October vs March', wet(['10']), wet(['03'])],
    ['wet days, April vs May', wet(['04']), wet(['05'])],
  ];
  for (const [label, g1, g2] of cases) {
    it(`${label}: p-value and Wald interval match jStat`, () => {
      const r = twoProportionZTest(g1, g2)!;
      const p1 = g1.successes / g1.n;
      const p2 = g2.successes / g2.n;
      // jStat's twoSidedDifferenceOfProportions uses the pooled SE, as the test should.
      expect(r.pValue).toBeCloseTo(jStat().twoSidedDifferenceOfProportions(p1, g1.n, p2, g2.n), 12);
      // jStat.normalci(value, alpha, sd, n) = value ± z_{α/2}·sd/√n; with n = 1 and sd = the unpooled SE it is the Wald CI.
      const [lo, hi] = jStat.normalci(p1 - p2, 0.05, Math.sqrt((p1 * (1 - p1)) / g1.n + (p2 * (1 - p2)) / g2.n), 1);
      expect(r.ci[0]).toBeCloseTo(lo, 6);
      expect(r.ci[1]).toBeCloseTo(hi, 6);
    });
  }
});

describe('twoProportionZTest edge cases', () => {
  it('returns null when a group is empty or the pooled proportion is 0 or 1', () => {
    expect(twoProportionZTest({ successes: 0, n: 0 }, { successes: 1, n: 2 })).toBeNull();
    expect(twoProportionZTest({ successes: 0, n: 10 }, { successes: 0, n: 20 })).toBeNull();
    expect(twoProportionZTest({ successes: 10, n: 10 }, { successes: 20, n: 20 })).toBeNull();
  });

  it('relative lift is null against a zero baseline proportion', () => {
    expect(twoProportionZTest({ successes: 3, n: 10 }, { successes: 0, n: 10 })!.relativeLift).toBeNull();
  });

  it('rejects impossible counts', () => {
    expect(() => twoProportionZTest({ successes: 11, n: 10 }, { successes: 0, n: 10 })).toThrow(RangeError);
  });
});
