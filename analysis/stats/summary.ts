// Descriptive statistics of one column, and moments that combine across groups without losing digits.
import { medianInPlace } from './order-stats.js';

export interface Summary {
  /** Count of finite values used. */
  n: number;
  /** Nulls plus non-finite numbers (NaN, ±Infinity), which are treated as missing. */
  nullCount: number;
  min: number | null;
  max: number | null;
  mean: number | null;
  median: number | null;
  /** Most frequent value, the smallest on ties; null when no value occurs twice (a mode of all-distinct data says nothing). */
  mode: number | null;
  /** How often `mode` occurs; 0 when mode is null. */
  modeCount: number;
  /** Sample standard deviation (n − 1); null when n < 2. */
  sd: number | null;
  /** Sample variance (n − 1); null when n < 2. */
  variance: number | null;
}

/**
 * Central moments of a group: count, mean and m2 = Σ(x − mean)².
 * Carrying m2 rather than Σx² keeps the spread exact-ish when the mean is large next to the spread.
 */
export interface Moments {
  n: number;
  mean: number;
  m2: number;
}

/** A per-group rollup as SQL returns it: COUNT(x), SUM(x − shift), SUM((x − shift)²), with the shift the query used (0 if none). */
export interface SumsRollup {
  n: number;
  sum: number;
  sumSquares: number;
  shift?: number;
}

/** Summarizes a column: counts, extremes, centre, mode and sample spread; all-null input gives nulls, never NaN. */
export function summarize(values: readonly (number | null)[]): Summary {
  const finite = finiteValues(values);
  const n = finite.length;
  const nullCount = values.length - n;
  if (n === 0) {
    return { n, nullCount, min: null, max: null, mean: null, median: null, mode: null, modeCount: 0, sd: null, variance: null };
  }
  const moments = momentsOfFinite(finite);
  const sorted = finite.slice().sort();
  const { mode, modeCount } = modeOfSorted(sorted);
  const variance = n < 2 ? null : moments.m2 / (n - 1);
  return {
    n,
    nullCount,
    min: sorted[0]!,
    max: sorted[n - 1]!,
    mean: moments.mean,
    median: medianInPlace(sorted),
    mode,
    modeCount,
    sd: variance === null ? null : Math.sqrt(variance),
    variance,
  };
}

/** Indices of the first minimum and first maximum among finite values; nulls when there are none. */
export function argExtremes(values: readonly (number | null)[]): { minIndex: number | null; maxIndex: number | null } {
  let minIndex: number | null = null;
  let maxIndex: number | null = null;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (typeof v !== 'number' || !Number.isFinite(v)) continue;
    if (minIndex === null || v < (values[minIndex] as number)) minIndex = i;
    if (maxIndex === null || v > (values[maxIndex] as number)) maxIndex = i;
  }
  return { minIndex, maxIndex };
}

/** Moments of raw values by the corrected two-pass algorithm; null when no finite value. */
export function momentsOf(values: readonly (number | null)[]): Moments | null {
  const finite = finiteValues(values);
  return finite.length === 0 ? null : momentsOfFinite(finite);
}

/**
 * Moments from SQL sums of shifted values. Σx² of raw values near 1e7 sits near 1e17, where one ulp is 16,
 * so Σx² − (Σx)²/n cancels every digit of a spread of 0.1; sums of (x − shift) with a shift near the mean
 * (any one value of the group, or a rounded prior mean) keep those digits. Null when n = 0.
 */
export function momentsFromSums(rollup: SumsRollup): Moments | null {
  const { n, sum, sumSquares } = rollup;
  const shift = rollup.shift ?? 0;
  if (!(n > 0) || !Number.isFinite(sum) || !Number.isFinite(sumSquares) || !Number.isFinite(shift)) return null;
  const offset = sum / n;
  // Rounding can push a tiny true m2 below zero; a negative sum of squares is impossible.
  const m2 = Math.max(0, sumSquares - offset * sum);
  return { n, mean: shift + offset, m2 };
}

/** Pools group moments into one (Chan, Golub & LeVeque 1979 pairwise update); null when the total count is 0. */
export function combineMoments(parts: readonly (Moments | null)[]): Moments | null {
  let acc: Moments | null = null;
  for (const part of parts) {
    if (part === null || part.n <= 0) continue;
    if (acc === null) {
      acc = { ...part };
      continue;
    }
    const n: number = acc.n + part.n;
    const delta: number = part.mean - acc.mean;
    acc = {
      n,
      mean: acc.mean + (delta * part.n) / n,
      m2: acc.m2 + part.m2 + ((delta * delta * acc.n) / n) * part.n,
    };
  }
  return acc;
}

/** Mean, sample variance and sample sd from moments; spread is null when n < 2. */
export function describeMoments(m: Moments): { n: number; mean: number; variance: number | null; sd: number | null } {
  const variance = m.n < 2 ? null : m.m2 / (m.n - 1);
  return { n: m.n, mean: m.mean, variance, sd: variance === null ? null : Math.sqrt(variance) };
}

function finiteValues(values: readonly (number | null)[]): Float64Array {
  const out = new Float64Array(values.length);
  let k = 0;
  for (const v of values) if (typeof v === 'number' && Number.isFinite(v)) out[k++] = v;
  return out.subarray(0, k);
}

// Corrected two-pass (Chan, Golub & LeVeque 1983): the second pass also removes the first pass's mean error.
function momentsOfFinite(x: Float64Array): Moments {
  const n = x.length;
  const rough = neumaierSum(x) / n;
  let d1 = 0;
  let d2 = 0;
  for (let i = 0; i < n; i++) {
    const d = x[i]! - rough;
    d1 += d;
    d2 += d * d;
  }
  return { n, mean: rough + d1 / n, m2: Math.max(0, d2 - (d1 * d1) / n) };
}

// Compensated summation (Neumaier 1974) so the first-pass mean is right to the last bit or two.
function neumaierSum(x: Float64Array): number {
  let sum = 0;
  let c = 0;
  for (let i = 0; i < x.length; i++) {
    const v = x[i]!;
    const t = sum + v;
    c += Math.abs(sum) >= Math.abs(v) ? sum - t + v : v - t + sum;
    sum = t;
  }
  return sum + c;
}

function modeOfSorted(sorted: Float64Array): { mode: number | null; modeCount: number } {
  let best: number | null = null;
  let bestCount = 1;
  let run = 1;
  for (let i = 1; i <= sorted.length; i++) {
    if (i < sorted.length && sorted[i] === sorted[i - 1]) {
      run++;
      continue;
    }
    // Strictly greater keeps the smallest value on ties, because runs arrive in ascending order.
    if (run > bestCount) {
      bestCount = run;
      best = sorted[i - 1]!;
    }
    run = 1;
  }
  return best === null ? { mode: null, modeCount: 0 } : { mode: best, modeCount: bestCount };
}
