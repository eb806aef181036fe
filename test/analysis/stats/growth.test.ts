import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  cagr,
  periodOverPeriod,
  relativeChange,
  trailingSum,
  trailingSumGrowth,
  yearOverYear,
} from '../../../analysis/stats/growth.js';
import { loadSeattleWeather, monthly } from './seattle-weather.js';

describe('growth worked examples (common practice)', () => {
  it('CAGR: 100 → 121 over 2 years is 10% a year; 100 → 200 over 1 year is 100%', () => {
    expect(cagr(100, 121, 2)).toBeCloseTo(0.1, 14);
    expect(cagr(100, 200, 1)).toBeCloseTo(1, 14);
    // Doubling in 10 years is about 7.18% a year (the "rule of 72" gives 7.2%).
    expect(cagr(1, 2, 10)).toBeCloseTo(2 ** 0.1 - 1, 14);
    expect(cagr(100, 0, 3)).toBe(-1);
  });

  it('CAGR is undefined from a zero or negative start, to a negative end, or over no time', () => {
    expect(cagr(0, 100, 2)).toBeNull();
    expect(cagr(-100, 50, 2)).toBeNull();
    expect(cagr(100, -50, 2)).toBeNull();
    expect(cagr(100, 121, 0)).toBeNull();
    expect(cagr(null, 121, 2)).toBeNull();
  });

  it('period over period and year over year (hand-computed)', () => {
    expect(periodOverPeriod([100, 110, 99, null, 50, 0, 10])).toEqual([null, 0.1, expect.closeTo(-0.1, 14), null, null, -1, null]);
    const quarters = [10, 20, 30, 40, 12, 18, 0, 44];
    expect(yearOverYear(quarters, 4)).toEqual([null, null, null, null, expect.closeTo(0.2, 14), expect.closeTo(-0.1, 14), -1, expect.closeTo(0.1, 14)]);
  });

  it('relative change against a negative base is null (its sign would mislead)', () => {
    expect(relativeChange(-10, -5)).toBeNull();
    expect(relativeChange(10, -5)).toBe(-1.5);
  });

  it('trailing sums wait for a full window and stop at nulls', () => {
    expect(trailingSum([1, 2, 3, null, 5, 6, 7], 3)).toEqual([null, null, 6, null, null, null, 18]);
  });
});

describe('trailing-12 growth on the Seattle weather record (vega-datasets)', () => {
  it('at each December equals that year’s total over the previous year’s, computed by a plain reduction', () => {
    const m = monthly(loadSeattleWeather());
    const values = m.map((x) => x.precipitation);
    const growth = trailingSumGrowth(values, 12);
    const yearTotal = (y: string) => m.filter((x) => x.key.startsWith(y)).reduce((acc, x) => acc + x.precipitation, 0);
    for (const [year, prior] of [['2014', '2013'], ['2015', '2014']] as const) {
      const dec = m.findIndex((x) => x.key === `${year}-12`);
      expect(growth[dec]!).toBeCloseTo((yearTotal(year) - yearTotal(prior)) / yearTotal(prior), 12);
    }
    // The first 23 months lack a prior trailing year.
    expect(growth.slice(0, 23).every((g) => g === null)).toBe(true);
    expect(growth[23]).not.toBeNull();
  });
});

describe('no NaN or Infinity ever (fast-check)', () => {
  const anyValue = fc.oneof(
    fc.constant(null),
    fc.constant(0),
    fc.constant(-0),
    fc.double(),
    fc.constant(Number.MIN_VALUE),
    fc.constant(Number.MAX_VALUE),
    fc.constant(-Number.MAX_VALUE),
  );
  const finiteOrNull = (v: number | null) => v === null || Number.isFinite(v);

  it('every growth function returns finite numbers or null for any input', () => {
    fc.assert(
      fc.property(fc.array(anyValue, { maxLength: 40 }), fc.integer({ min: 1, max: 13 }), (values, k) => {
        expect(periodOverPeriod(values).every(finiteOrNull)).toBe(true);
        expect(yearOverYear(values, k).every(finiteOrNull)).toBe(true);
        expect(trailingSum(values, k).every(finiteOrNull)).toBe(true);
        expect(trailingSumGrowth(values, k).every(finiteOrNull)).toBe(true);
      }),
    );
  });

  it('cagr and relativeChange return finite numbers or null for any input', () => {
    fc.assert(
      fc.property(anyValue, anyValue, fc.oneof(fc.double(), fc.constant(1e-300)), (a, b, years) => {
        expect(finiteOrNull(cagr(a, b, years))).toBe(true);
        expect(finiteOrNull(relativeChange(a, b))).toBe(true);
      }),
    );
  });
});
