import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { mannKendall, senSlope } from '../../../analysis/stats/mann-kendall.js';
import { loadSeattleWeather, monthly } from './seattle-weather.js';

describe('mannKendall and senSlope on USEPA (2009) Unified Guidance, Example 17-7 (sodium)', () => {
  // USEPA, Statistical Analysis of Groundwater Monitoring Data at RCRA Facilities: Unified Guidance (EPA 530/R-09-007),
  // Example 17-7: sodium (ppm) by sampling year. Data and results as reproduced by the EnvStats R package's script for
  // that guidance (kendallTrendTest, "with continuity correction"): tau = 0.5555556, slope = 1.3333333,
  // intercept = -65.9666667 (Conover's estimator), z = 2.146625, p = 0.03182313.
  const year = [89.6, 90.1, 90.8, 91.1, 92.1, 93.1, 94.1, 95.6, 96.1, 96.3];
  const sodium = [56, 53, 51, 55, 52, 60, 62, 59, 61, 63];

  it('S, z, p and tau match the published output', () => {
    const r = mannKendall(sodium)!;
    expect(r.n).toBe(10);
    expect(r.s).toBe(25); // tau × n(n−1)/2 = 0.5555556 × 45
    expect(r.varS).toBeCloseTo(125, 12); // 10·9·25/18, no ties
    expect(r.z).toBeCloseTo(2.146625, 6);
    expect(r.pValue).toBeCloseTo(0.03182313, 8);
    expect(r.tau!).toBeCloseTo(0.5555556, 7);
    expect(r.smallSample).toBe(false);
  });

  it("Sen's slope and Conover's intercept on the sampling years match the published output", () => {
    const r = senSlope(sodium, year)!;
    expect(r.slope).toBeCloseTo(1.3333333, 7);
    expect(r.intercept).toBeCloseTo(-65.9666667, 6);
    expect(r.approximate).toBe(false);
  });
});

describe('mannKendall on tied data', () => {
  it('Gilbert (1987), Statistical Methods for Environmental Pollution Monitoring, p. 212: Z reported as 3.1', () => {
    // The 22 values of Gilbert's worked example, as transcribed in public test suites of trend-test code; the book
    // reports Z rounded to one decimal. Ties: 20 ×6, 23 ×2, 26 ×2, 30 ×2.
    const gilbert = [20, 20, 20, 20, 15, 20, 20, 30, 27, 26, 23, 35, 25, 28, 70, 26, 24, 34, 32, 23, 50, 30];
    const r = mannKendall(gilbert)!;
    expect(Math.round(r.z * 10) / 10).toBe(3.1);
    // Tie-corrected variance from the formula, by hand: [22·21·49 − (6·5·17 + 3·(2·1·9))]/18.
    expect(r.varS).toBeCloseTo((22 * 21 * 49 - (6 * 5 * 17 + 3 * 2 * 1 * 9)) / 18, 10);
  });

  it('a published hand computation (College of the Holy Cross course notes): S = 54, Z ≈ 2.9058, one-sided p ≈ 0.0018', () => {
    // "A Mann-Kendall Example (By Hand)", mathcs.holycross.edu: 14 values with one tied pair (12.9),
    // V = 14·13·33/18 − 2·1·9/18.
    const series = [12.9, 14.8, 13.2, 15.7, 13.8, 15.6, 12.9, 11.0, 17.3, 15.9, 19.0, 18.3, 20.1, 21.7];
    const r = mannKendall(series)!;
    expect(r.s).toBe(54);
    expect(r.varS).toBeCloseTo((14 * 13 * 33) / 18 - (2 * 1 * 9) / 18, 10);
    expect(r.z).toBeCloseTo(2.9058, 4);
    expect(r.pValue / 2).toBeCloseTo(0.0018, 4);
  });

  it('all-equal values: S = 0, no spread, p = 1, tau undefined', () => {
    const r = mannKendall([4, 4, 4, 4])!;
    expect(r).toMatchObject({ s: 0, varS: 0, z: 0, pValue: 1, tau: null });
  });

  it('fewer than three finite values gives null; nulls are dropped', () => {
    expect(mannKendall([1, null, 2])).toBeNull();
    expect(mannKendall([1, null, 2, 3])!.n).toBe(3);
  });
});

describe('mannKendall against R on the Seattle weather record (vega-datasets), many ties', () => {
  // Reference: R 4.2.2, cor.test(seq_along(y), y, method = "kendall", exact = FALSE, continuity = TRUE), run once by
  // hand and recorded here. With untied positions its z is the tie-corrected Mann–Kendall Z with continuity correction,
  // and its estimate is tau-b.
  const days = loadSeattleWeather();
  const cases: [string, number[], number, number, number][] = [
    ['daily wind, first 200 days', days.slice(0, 200).map((d) => d.wind), -3.476559348023001, 0.000507891807282613, -0.167216078834408838],
    ['monthly mean temp_max, 48 months', monthly(days).map((m) => m.meanTempMax), 1.3776462556891, 0.168312532232199, 0.138297872340426],
    [
      'daily temp_min, January–March 2015',
      days.filter((d) => d.date >= '2015-01-01' && d.date < '2015-04-01').map((d) => d.tempMin),
      3.23040722764969646,
      0.00123614013873787,
      0.23770435242946664,
    ],
  ];
  for (const [label, y, z, p, tau] of cases) {
    it(`${label}: z, p and tau-b match`, () => {
      const r = mannKendall(y)!;
      expect(r.z).toBeCloseTo(z, 10);
      expect(r.pValue).toBeCloseTo(p, 12);
      expect(r.tau!).toBeCloseTo(tau, 12);
    });
  }
});

describe('invariants (fast-check)', () => {
  const series = fc.array(fc.integer({ min: -50, max: 50 }), { minLength: 3, maxLength: 40 });

  it('a strictly increasing series has S = n(n−1)/2, a decreasing one the negative', () => {
    fc.assert(
      fc.property(fc.uniqueArray(fc.integer({ min: -1e6, max: 1e6 }), { minLength: 3, maxLength: 60 }), (xs) => {
        const up = [...xs].sort((a, b) => a - b);
        const n = up.length;
        expect(mannKendall(up)!.s).toBe((n * (n - 1)) / 2);
        expect(mannKendall(up.reverse())!.s).toBe(-(n * (n - 1)) / 2);
      }),
    );
  });

  it('reversing the series negates S and z and keeps Var(S) and p', () => {
    fc.assert(
      fc.property(series, (xs) => {
        const a = mannKendall(xs)!;
        const b = mannKendall([...xs].reverse())!;
        expect(b.s === -a.s).toBe(true);
        expect(b.z).toBeCloseTo(-a.z, 12);
        expect(b.varS).toBe(a.varS);
        expect(b.pValue).toBeCloseTo(a.pValue, 12);
      }),
    );
  });

  it('a strictly increasing transform of the values leaves S unchanged (the test uses ranks only)', () => {
    fc.assert(
      fc.property(series, (xs) => {
        expect(mannKendall(xs.map((v) => Math.exp(v / 10) * 3 + 7))!.s).toBe(mannKendall(xs)!.s);
      }),
    );
  });

  it('p-values lie in [0, 1] and |tau| ≤ 1', () => {
    fc.assert(
      fc.property(series, (xs) => {
        const r = mannKendall(xs)!;
        expect(r.pValue >= 0 && r.pValue <= 1).toBe(true);
        if (r.tau !== null) expect(Math.abs(r.tau)).toBeLessThanOrEqual(1 + 1e-12);
      }),
    );
  });

  it("Sen's slope recovers the slope of any exact line, and of a line with a few wild points", () => {
    fc.assert(
      fc.property(fc.integer({ min: -100, max: 100 }), fc.integer({ min: -20, max: 20 }), fc.integer({ min: 5, max: 40 }), (a, b, n) => {
        const line = Array.from({ length: n }, (_, t) => a + b * t);
        expect(senSlope(line)!.slope).toBeCloseTo(b, 12);
        expect(senSlope(line)!.intercept).toBeCloseTo(a, 9);
      }),
    );
    const noisy = Array.from({ length: 30 }, (_, t) => 5 + 2 * t);
    noisy[3] = 1000;
    noisy[17] = -1000;
    expect(senSlope(noisy)!.slope).toBeCloseTo(2, 12);
  });
});

describe('senSlope details', () => {
  it('keeps the gap of a null at its position', () => {
    expect(senSlope([0, null, 2, 3])!.slope).toBe(1);
  });

  it('skips pairs with equal times and returns null without usable pairs', () => {
    expect(senSlope([1, 2], [5, 5])).toBeNull();
    expect(senSlope([1])).toBeNull();
  });

  it('samples pairs deterministically past maxPairs and flags the result', () => {
    const line = Array.from({ length: 200 }, (_, t) => 3 * t + ((t * 7919) % 13) / 13);
    const exact = senSlope(line)!;
    const a = senSlope(line, undefined, { maxPairs: 2000, seed: 3 })!;
    const b = senSlope(line, undefined, { maxPairs: 2000, seed: 3 })!;
    expect(a).toEqual(b);
    expect(a.approximate).toBe(true);
    expect(a.slope).toBeCloseTo(exact.slope, 1);
  });
});
