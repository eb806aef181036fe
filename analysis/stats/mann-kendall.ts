// Mann–Kendall test for a monotonic trend, and Sen's slope for its size.
import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import { median, medianInPlace } from './order-stats.js';
import { mulberry32, randomIndex } from './random.js';

export interface MannKendallResult {
  /** Values used (nulls and non-finite values dropped; order kept). */
  n: number;
  /** S = Σ_{i<j} sign(x_j − x_i). */
  s: number;
  /** Var(S) = [n(n−1)(2n+5) − Σ t(t−1)(2t+5)] / 18, t the size of each group of tied values. */
  varS: number;
  /** (S − sign(S)) / √Var(S): the normal approximation with continuity correction; 0 when S is 0. */
  z: number;
  /** Two-sided p-value from the standard normal. */
  pValue: number;
  /** Kendall's tau-b between position and value; null when every value is tied. */
  tau: number | null;
  /** Gilbert (1987) gives exact tables below n = 10; the normal p-value is rough there. */
  smallSample: boolean;
}

export interface SenSlope {
  /** Median of the pairwise slopes (x_j − x_i)/(t_j − t_i). */
  slope: number;
  /** Conover's intercept: median(x) − slope · median(t). */
  intercept: number;
  n: number;
  /** True when the pairs exceeded `maxPairs` and the median was taken over a seeded random sample of pairs. */
  approximate: boolean;
}

/** Mann–Kendall trend test with tie correction on values in time order; null with fewer than 3 finite values. */
export function mannKendall(values: readonly (number | null)[]): MannKendallResult | null {
  const x = values.filter((v): v is number => typeof v === 'number' && Number.isFinite(v));
  const n = x.length;
  if (n < 3) return null;
  let s = 0;
  for (let i = 0; i < n - 1; i++) {
    const xi = x[i]!;
    for (let j = i + 1; j < n; j++) {
      const d = x[j]! - xi;
      s += d > 0 ? 1 : d < 0 ? -1 : 0;
    }
  }
  let tieTerm = 0;
  let tiedPairs = 0;
  for (const t of tieSizes(x)) {
    tieTerm += t * (t - 1) * (2 * t + 5);
    tiedPairs += (t * (t - 1)) / 2;
  }
  const varS = (n * (n - 1) * (2 * n + 5) - tieTerm) / 18;
  const z = s === 0 || !(varS > 0) ? 0 : (s - Math.sign(s)) / Math.sqrt(varS);
  const pairs = (n * (n - 1)) / 2;
  return {
    n,
    s,
    varS,
    z,
    pValue: Math.min(1, 2 * normalCdf(-Math.abs(z), 0, 1)),
    tau: pairs - tiedPairs > 0 ? s / Math.sqrt(pairs * (pairs - tiedPairs)) : null,
    smallSample: n < 10,
  };
}

/**
 * Sen's slope (Theil–Sen): median slope over all pairs with distinct times; `times` defaults to positions 0..n−1,
 * so a null keeps its gap. Null with fewer than 2 usable points or no pair of distinct times.
 */
export function senSlope(
  values: readonly (number | null)[],
  times?: readonly number[],
  options: { maxPairs?: number; seed?: number } = {},
): SenSlope | null {
  if (times !== undefined && times.length !== values.length) throw new RangeError('times must have one entry per value');
  const xs: number[] = [];
  const ts: number[] = [];
  values.forEach((v, i) => {
    const t = times === undefined ? i : times[i]!;
    if (typeof v === 'number' && Number.isFinite(v) && Number.isFinite(t)) {
      xs.push(v);
      ts.push(t);
    }
  });
  const n = xs.length;
  if (n < 2) return null;
  const maxPairs = options.maxPairs ?? 5_000_000;
  const totalPairs = (n * (n - 1)) / 2;
  let slopes: Float64Array;
  let count = 0;
  let approximate = false;
  if (totalPairs <= maxPairs) {
    slopes = new Float64Array(totalPairs);
    for (let i = 0; i < n - 1; i++) {
      for (let j = i + 1; j < n; j++) {
        const dt = ts[j]! - ts[i]!;
        if (dt !== 0) slopes[count++] = (xs[j]! - xs[i]!) / dt;
      }
    }
  } else {
    // All pairs would not fit in memory; a seeded sample of pairs estimates the same median.
    approximate = true;
    slopes = new Float64Array(maxPairs);
    const next = mulberry32(options.seed ?? 1);
    for (let k = 0; k < maxPairs; k++) {
      const i = randomIndex(next, n);
      let j = randomIndex(next, n - 1);
      if (j >= i) j++;
      const dt = ts[j]! - ts[i]!;
      if (dt !== 0) slopes[count++] = (xs[j]! - xs[i]!) / dt;
    }
  }
  if (count === 0) return null;
  const slope = medianInPlace(slopes, count);
  return { slope, intercept: median(xs)! - slope * median(ts)!, n, approximate };
}

function tieSizes(x: readonly number[]): number[] {
  const sorted = Float64Array.from(x).sort();
  const sizes: number[] = [];
  let run = 1;
  for (let i = 1; i <= sorted.length; i++) {
    if (i < sorted.length && sorted[i] === sorted[i - 1]) run++;
    else {
      if (run > 1) sizes.push(run);
      run = 1;
    }
  }
  return sizes;
}
