import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bootstrapMedianDifference } from '../../../analysis/stats/bootstrap.js';
import { median, medianInPlace, quantileSorted } from '../../../analysis/stats/order-stats.js';
import { mulberry32, sampleWithoutReplacement } from '../../../analysis/stats/random.js';
import { jStat } from './jstat.js';
import { loadSeattleWeather } from './seattle-weather.js';

const days = loadSeattleWeather();
const sunMax = days.filter((d) => d.weather === 'sun').map((d) => d.tempMax);
const rainMax = days.filter((d) => d.weather === 'rain').map((d) => d.tempMax);

describe('bootstrapMedianDifference', () => {
  it('its point estimate is the difference of medians as jStat computes them (Seattle temp_max, sun vs rain days)', () => {
    const r = bootstrapMedianDifference(sunMax, rainMax)!;
    expect(r.estimate).toBe(jStat.median(sunMax) - jStat.median(rainMax));
    expect(r.nA).toBe(640);
    expect(r.nB).toBe(641);
    expect(r.resamples).toBe(2000);
    expect(r.ci[0]).toBeLessThanOrEqual(r.estimate);
    expect(r.ci[1]).toBeGreaterThanOrEqual(r.estimate);
  });

  it('is deterministic for a seed and changes with the seed', () => {
    const a = bootstrapMedianDifference(sunMax, rainMax, { seed: 42, resamples: 500 });
    const b = bootstrapMedianDifference(sunMax, rainMax, { seed: 42, resamples: 500 });
    expect(a).toEqual(b);
    // Continuous values, so that two seeds cannot land on the same pair of order statistics by chance.
    const next = mulberry32(11);
    const x = Array.from({ length: 300 }, () => next());
    const y = Array.from({ length: 300 }, () => next());
    const c = bootstrapMedianDifference(x, y, { seed: 42, resamples: 500 })!;
    const d = bootstrapMedianDifference(x, y, { seed: 43, resamples: 500 })!;
    expect(c.estimate).toBe(d.estimate);
    expect(c.ci).not.toEqual(d.ci);
  });

  it('covers a known population difference at about the nominal rate (common practice: a coverage simulation)', () => {
    // Two normal populations whose medians differ by exactly 3 (10 vs 7, sd 2); samples drawn by inverse CDF from a
    // seeded generator. The percentile interval should cover 3 in roughly 95% of repetitions.
    const next = mulberry32(2024);
    const draw = (mu: number, n: number) => Array.from({ length: n }, () => normalQuantile(next() * 0.999998 + 1e-6, mu, 2));
    const reps = 200;
    let covered = 0;
    for (let i = 0; i < reps; i++) {
      const r = bootstrapMedianDifference(draw(10, 60), draw(7, 80), { seed: i + 1, resamples: 1000 })!;
      if (r.ci[0] <= 3 && 3 <= r.ci[1]) covered++;
    }
    // Binomial(200, 0.95) lies in [180, 198] with probability > 0.99; the median bootstrap runs slightly wide.
    expect(covered).toBeGreaterThanOrEqual(180);
    expect(covered).toBeLessThanOrEqual(199);
  });

  it('subsamples huge inputs deterministically and says so', () => {
    const next = mulberry32(7);
    const big = Array.from({ length: 5000 }, () => next() * 100);
    const r1 = bootstrapMedianDifference(big, sunMax, { maxSampleSize: 1000, resamples: 200, seed: 9 })!;
    const r2 = bootstrapMedianDifference(big, sunMax, { maxSampleSize: 1000, resamples: 200, seed: 9 })!;
    expect(r1.subsampled).toBe(true);
    expect(r1).toEqual(r2);
    expect(r1.estimate).toBe(jStat.median(big) - jStat.median(sunMax));
    expect(bootstrapMedianDifference(sunMax, rainMax, { resamples: 10 })!.subsampled).toBe(false);
  });

  it('returns null without data and ignores nulls', () => {
    expect(bootstrapMedianDifference([null], [1, 2])).toBeNull();
    const r = bootstrapMedianDifference([1, null, 3], [2, 2], { resamples: 50 })!;
    expect(r.estimate).toBe(0);
    expect(r.nA).toBe(2);
  });
});

describe('order statistics and the PRNG behind the bootstrap', () => {
  it('median and quickselect agree with a full sort (property)', () => {
    // Small integers make long runs of ties, the hard case for a partition-based selection.
    const value = fc.oneof(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e9, max: 1e9 }), fc.integer({ min: -3, max: 3 }));
    fc.assert(
      fc.property(fc.array(value, { minLength: 1, maxLength: 200 }), (xs) => {
        const sorted = [...xs].sort((a, b) => a - b);
        const n = sorted.length;
        const expected = n % 2 ? sorted[(n - 1) / 2]! : (sorted[n / 2 - 1]! + sorted[n / 2]!) / 2;
        // Two ways of taking a midpoint differ by rounding relative to the operands, not to the result
        // (a midpoint of −1e9 and +1e9 is small; its rounding error is not).
        const scale = Math.max(1, Math.abs(sorted[0]!), Math.abs(sorted[n - 1]!));
        expect(Math.abs(median(xs)! - expected)).toBeLessThanOrEqual(1e-12 * scale);
        expect(medianInPlace(Float64Array.from(xs))).toBe(median(xs));
      }),
    );
  });

  it('quantileSorted is Hyndman & Fan (1996) type 7 (hand-computed on 1..5)', () => {
    // Type 7, R's default: h = (n−1)p, linear interpolation; on 1..5, p = 0.1 → 1.4 and p = 0.95 → 4.8
    // (hand-computed from the definition; R's quantile(1:5, c(.1, .95)) gives the same, recalled from memory).
    expect(quantileSorted([1, 2, 3, 4, 5], 0.1)).toBeCloseTo(1.4, 12);
    expect(quantileSorted([1, 2, 3, 4, 5], 0.95)).toBeCloseTo(4.8, 12);
    expect(quantileSorted([1, 2, 3, 4, 5], 0)).toBe(1);
    expect(quantileSorted([1, 2, 3, 4, 5], 1)).toBe(5);
  });

  it('mulberry32 stays in [0, 1), repeats for a seed and looks uniform (common practice: moment and bucket checks)', () => {
    const a = mulberry32(123);
    const b = mulberry32(123);
    const counts = new Array<number>(10).fill(0);
    let sum = 0;
    const n = 100_000;
    let mismatches = 0;
    let outOfRange = 0;
    for (let i = 0; i < n; i++) {
      const u = a();
      if (u !== b()) mismatches++;
      if (!(u >= 0 && u < 1)) outOfRange++;
      counts[Math.floor(u * 10)]!++;
      sum += u;
    }
    expect(mismatches).toBe(0);
    expect(outOfRange).toBe(0);
    expect(sum / n).toBeCloseTo(0.5, 2);
    // Chi-squared with 9 df: the 0.999 quantile is 27.88 (standard tables).
    const chi2 = counts.reduce((acc, c) => acc + (c - n / 10) ** 2 / (n / 10), 0);
    expect(chi2).toBeLessThan(27.88);
  });

  it('sampleWithoutReplacement picks distinct positions and leaves its input alone', () => {
    const input = Float64Array.from({ length: 100 }, (_, i) => i);
    const picked = sampleWithoutReplacement(input, 30, mulberry32(5));
    expect(new Set(picked).size).toBe(30);
    expect([...input]).toEqual(Array.from({ length: 100 }, (_, i) => i));
  });
});
