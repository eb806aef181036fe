import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  argExtremes,
  combineMoments,
  describeMoments,
  momentsFromSums,
  momentsOf,
  summarize,
  type Moments,
} from '../../../analysis/stats/summary.js';
import { jStat } from './jstat.js';
import { loadSeattleWeather } from './seattle-weather.js';

// NIST Statistical Reference Datasets (StRD), univariate summary statistics, NumAcc1–NumAcc4.
// Values and certified results recalled from memory, constructed per NIST StRD's published description:
// NumAcc1 = {10000001, 10000003, 10000002}: mean 10000002, sd 1.
// NumAcc2..4 = 1001 values: a centre value, then 500 pairs (centre − 0.1, centre + 0.1): mean = centre, sd 0.1.
function numAcc(centre: number, low: number, high: number): number[] {
  const values = [centre];
  for (let i = 0; i < 500; i++) values.push(low, high);
  return values;
}
// sdDigits: the digits we require. Binary doubles cannot hold 1000000.1 or 10000000.1 exactly (the error is up to
// half an ulp, 6e-11 and 9e-10), so the best any double-precision method can reach is about 9 and 8 digits there.
const NIST = [
  { name: 'NumAcc1', values: [10000001, 10000003, 10000002], mean: 10000002, sd: 1, sdDigits: 14 },
  { name: 'NumAcc2', values: numAcc(1.2, 1.1, 1.3), mean: 1.2, sd: 0.1, sdDigits: 13 },
  { name: 'NumAcc3', values: numAcc(1000000.2, 1000000.1, 1000000.3), mean: 1000000.2, sd: 0.1, sdDigits: 9 },
  { name: 'NumAcc4', values: numAcc(10000000.2, 10000000.1, 10000000.3), mean: 10000000.2, sd: 0.1, sdDigits: 8 },
];

// NIST scores accuracy as the log relative error: the number of correct significant digits.
function lre(actual: number, certified: number): number {
  if (actual === certified) return 15;
  return -Math.log10(Math.abs(actual - certified) / Math.abs(certified));
}

// The textbook one-pass formula, (Σx² − (Σx)²/n)/(n − 1), here only to show that it fails.
function naiveVariance(values: readonly number[]): number {
  let sum = 0;
  let sumSquares = 0;
  for (const v of values) {
    sum += v;
    sumSquares += v * v;
  }
  return (sumSquares - (sum * sum) / values.length) / (values.length - 1);
}

describe('summarize against NIST StRD NumAcc1–4 (certified values recalled from memory)', () => {
  for (const { name, values, mean, sd, sdDigits } of NIST) {
    it(`${name}: mean to ≥ 14 digits, sd to ≥ ${sdDigits} digits`, () => {
      const s = summarize(values);
      expect(s.n).toBe(values.length);
      expect(lre(s.mean!, mean)).toBeGreaterThanOrEqual(14);
      expect(lre(s.sd!, sd)).toBeGreaterThanOrEqual(sdDigits);
      expect(s.median).toBe(mean);
    });
  }

  it('the naive one-pass variance fails NumAcc3 and NumAcc4 while the shifted sums pass', () => {
    for (const name of ['NumAcc3', 'NumAcc4']) {
      const { values, sd } = NIST.find((d) => d.name === name)!;
      // Measured: about 1 correct digit on NumAcc3 and none on NumAcc4 (it returns 0).
      const naiveSd = Math.sqrt(Math.max(0, naiveVariance(values)));
      expect(lre(naiveSd, sd)).toBeLessThan(2);
      // The same rollup SQL would return, but of x − shift with the shift at any one value of the group.
      const shift = values[0]!;
      let sum = 0;
      let sumSquares = 0;
      for (const v of values) {
        sum += v - shift;
        sumSquares += (v - shift) * (v - shift);
      }
      const shifted = describeMoments(momentsFromSums({ n: values.length, sum, sumSquares, shift })!);
      expect(lre(shifted.sd!, sd)).toBeGreaterThanOrEqual(8);
      // And unshifted sums through the same helper fail as the naive formula does: the loss is in Σx² itself.
      let rawSum = 0;
      let rawSquares = 0;
      for (const v of values) {
        rawSum += v;
        rawSquares += v * v;
      }
      const unshifted = describeMoments(momentsFromSums({ n: values.length, sum: rawSum, sumSquares: rawSquares })!);
      expect(lre(unshifted.sd ?? 0, sd)).toBeLessThan(2);
    }
  });

  it('combining per-group moments of NumAcc4 split into uneven groups keeps the certified values', () => {
    const { values, mean, sd } = NIST[3]!;
    const cuts = [0, 1, 7, 300, 301, 777, values.length];
    const parts: (Moments | null)[] = [];
    for (let i = 0; i + 1 < cuts.length; i++) parts.push(momentsOf(values.slice(cuts[i], cuts[i + 1])));
    const combined = describeMoments(combineMoments(parts)!);
    expect(combined.n).toBe(1001);
    expect(lre(combined.mean, mean)).toBeGreaterThanOrEqual(14);
    expect(lre(combined.sd!, sd)).toBeGreaterThanOrEqual(8);
  });
});

describe('summarize against jStat on the Seattle weather record (vega-datasets)', () => {
  const days = loadSeattleWeather();
  for (const column of ['precipitation', 'tempMax', 'wind'] as const) {
    it(`${column}: n, min, max, mean, median, sd, variance match jStat`, () => {
      const values = days.map((d) => d[column]);
      const s = summarize(values);
      expect(s.n).toBe(1461);
      expect(s.nullCount).toBe(0);
      expect(s.min).toBe(jStat.min(values));
      expect(s.max).toBe(jStat.max(values));
      expect(s.mean).toBeCloseTo(jStat.mean(values), 10);
      expect(s.median).toBe(jStat.median(values));
      expect(s.sd).toBeCloseTo(jStat.stdev(values, true), 10);
      expect(s.variance).toBeCloseTo(jStat.variance(values, true), 9);
    });
  }

  it('mode agrees with jStat where jStat finds a single mode', () => {
    const values = days.map((d) => d.tempMax);
    const reference = jStat.mode(values);
    const s = summarize(values);
    // jStat returns an array on ties; we keep the smallest tied value, so compare with its minimum.
    expect(s.mode).toBe(Array.isArray(reference) ? Math.min(...reference) : reference);
    expect(s.modeCount).toBe(values.filter((v) => v === s.mode).length);
  });
});

describe('summarize edge cases', () => {
  it('empty and all-null input give nulls, never NaN', () => {
    for (const input of [[], [null, null], [null, Number.NaN, Number.POSITIVE_INFINITY]]) {
      const s = summarize(input);
      expect(s).toEqual({
        n: 0,
        nullCount: input.length,
        min: null,
        max: null,
        mean: null,
        median: null,
        mode: null,
        modeCount: 0,
        sd: null,
        variance: null,
      });
    }
  });

  it('one value has a mean but no spread and no mode', () => {
    expect(summarize([null, 4])).toMatchObject({ n: 1, nullCount: 1, mean: 4, median: 4, sd: null, variance: null, mode: null });
  });

  it('mode is the smallest of the most frequent values and null when all are distinct (hand-computed)', () => {
    expect(summarize([3, 1, 3, 1, 2])).toMatchObject({ mode: 1, modeCount: 2 });
    expect(summarize([5, 4, 3]).mode).toBeNull();
    expect(summarize([2, 2, 2, 9]).mode).toBe(2);
  });

  it('argExtremes returns first indices and skips nulls (hand-computed)', () => {
    expect(argExtremes([null, 3, 1, 7, 1, 7])).toEqual({ minIndex: 2, maxIndex: 3 });
    expect(argExtremes([null])).toEqual({ minIndex: null, maxIndex: null });
  });

  it('property: matches jStat on arbitrary finite arrays, ignoring interleaved nulls', () => {
    const value = fc.double({ min: -1e6, max: 1e6, noNaN: true });
    fc.assert(
      fc.property(fc.array(fc.option(value, { nil: null }), { minLength: 0, maxLength: 60 }), (input) => {
        const finite = input.filter((v): v is number => v !== null);
        const s = summarize(input);
        expect(s.n + s.nullCount).toBe(input.length);
        if (finite.length === 0) return;
        // Rounding error is relative to the values summed, not to the mean: [1e6, −1e6] has a mean near zero.
        const scale = Math.max(1, ...finite.map(Math.abs));
        expect(Math.abs(s.mean! - jStat.mean(finite))).toBeLessThanOrEqual(1e-9 * scale);
        // Our midpoint is lower + (upper − lower)/2 (no overflow near ±1e308), jStat's (a + b)/2: equal up to rounding.
        expect(Math.abs(s.median! - jStat.median(finite))).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(s.median!)));
        expect(s.min! <= s.mean! + 1e-9 && s.mean! <= s.max! + 1e-9).toBe(true);
        if (finite.length > 1) expect(Math.abs(s.sd! - jStat.stdev(finite, true))).toBeLessThanOrEqual(1e-9 * scale);
      }),
    );
  });

  it('property: combining moments of any split equals the moments of the whole', () => {
    const value = fc.double({ min: -1e3, max: 1e3, noNaN: true });
    fc.assert(
      fc.property(fc.array(fc.array(value, { maxLength: 20 }), { minLength: 1, maxLength: 6 }), (groups) => {
        const whole = groups.flat();
        const combined = combineMoments(groups.map((g) => momentsOf(g)));
        const direct = momentsOf(whole);
        if (direct === null) {
          expect(combined).toBeNull();
          return;
        }
        expect(combined!.n).toBe(direct.n);
        expect(combined!.mean).toBeCloseTo(direct.mean, 8);
        expect(combined!.m2).toBeCloseTo(direct.m2, 4);
      }),
    );
  });
});
