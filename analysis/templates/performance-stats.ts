// Statistics the performance family needs beyond analysis/stats: per-group "cells" of summary
// pieces as SQL returns them, their intervals, pooling, two-cell tests (dispatching to the shared
// Welch and two-proportion tests) and a four-cell contrast for difference in differences. Pure.
import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';
import tCdf from '@stdlib/stats-base-dists-t-cdf';
import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import type { DifferenceTest, Direction, MeasureKind, NoTestReason, TestName, Verdict } from '../findings/performance.js';
import { combineMoments, twoProportionZTest, welchTTest } from '../stats/index.js';

export interface MeanCell {
  kind: 'mean';
  n: number;
  mean: number;
  /** Σ(x − mean)². */
  m2: number;
}
export interface ProportionCell {
  kind: 'proportion';
  n: number;
  hits: number;
}
/** Per-row x and y of a ratio of sums: means, sums of squared deviations and the co-moment Σ(x − x̄)(y − ȳ). */
export interface RatioCell {
  kind: 'ratio';
  n: number;
  mx: number;
  my: number;
  m2x: number;
  m2y: number;
  cxy: number;
}
export interface TotalCell {
  kind: 'total';
  n: number;
  value: number | null;
  /** Totals of disjoint parts add up (counts); distinct counts do not. */
  additive: boolean;
}
export type Cell = MeanCell | ProportionCell | RatioCell | TotalCell;

export function emptyCell(kind: MeasureKind, additive = false): Cell {
  switch (kind) {
    case 'mean':
      return { kind, n: 0, mean: 0, m2: 0 };
    case 'proportion':
      return { kind, n: 0, hits: 0 };
    case 'ratio':
      return { kind, n: 0, mx: 0, my: 0, m2x: 0, m2y: 0, cxy: 0 };
    case 'total':
      return { kind, n: 0, value: null, additive };
  }
}

/** The cell's estimate: mean, share, ratio or total; null when the cell has no rows or a zero denominator. */
export function cellEstimate(c: Cell): number | null {
  if (c.n <= 0) return c.kind === 'total' ? c.value : null;
  switch (c.kind) {
    case 'mean':
      return c.mean;
    case 'proportion':
      return c.hits / c.n;
    case 'ratio':
      return c.my === 0 ? null : c.mx / c.my;
    case 'total':
      return c.value;
  }
}

/** Sampling variance of the estimate with its degrees of freedom (Infinity for normal approximations). */
export function cellVariance(c: Cell): { variance: number; df: number } | null {
  switch (c.kind) {
    case 'mean':
      return c.n >= 2 ? { variance: c.m2 / (c.n - 1) / c.n, df: c.n - 1 } : null;
    case 'proportion': {
      if (c.n < 1) return null;
      const p = c.hits / c.n;
      return { variance: (p * (1 - p)) / c.n, df: Infinity };
    }
    case 'ratio': {
      // Delta method for R = x̄/ȳ: Var(R) ≈ (s_x² − 2R·s_xy + R²·s_y²) / (n·ȳ²).
      if (c.n < 2 || c.my === 0) return null;
      const r = c.mx / c.my;
      const k = c.n - 1;
      const v = (c.m2x / k - 2 * r * (c.cxy / k) + r * r * (c.m2y / k)) / (c.n * c.my * c.my);
      return { variance: Math.max(0, v), df: Infinity };
    }
    case 'total':
      return null;
  }
}

/** Two-sided interval for one cell: t for a mean, Wilson score for a share, normal (delta) for a ratio. */
export function cellInterval(c: Cell, confidence: number): [number, number] | null {
  const est = cellEstimate(c);
  if (est === null) return null;
  if (c.kind === 'proportion') return wilsonInterval(c.hits, c.n, confidence);
  const v = cellVariance(c);
  if (v === null) return null;
  const q = quantile(confidence, v.df);
  const half = q * Math.sqrt(v.variance);
  return Number.isFinite(half) ? [est - half, est + half] : null;
}

/** Wilson (1927) score interval for a binomial proportion; null when n = 0. */
export function wilsonInterval(hits: number, n: number, confidence: number): [number, number] | null {
  if (!(n > 0)) return null;
  const z = normalQuantile(1 - (1 - confidence) / 2, 0, 1);
  const p = hits / n;
  const z2 = z * z;
  const centre = (p + z2 / (2 * n)) / (1 + z2 / n);
  const half = (z / (1 + z2 / n)) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  // At 0 or n hits the bound is exactly 0 or 1; the formula leaves rounding dust there.
  return [hits <= 0 ? 0 : Math.max(0, centre - half), hits >= n ? 1 : Math.min(1, centre + half)];
}

/** Pools cells of one kind over disjoint row sets (periods), exactly for every kind but non-additive totals. */
export function poolCells(cells: readonly Cell[], kind: MeasureKind, additive: boolean): Cell {
  switch (kind) {
    case 'mean': {
      const m = combineMoments(cells.map((c) => (c.kind === 'mean' && c.n > 0 ? { n: c.n, mean: c.mean, m2: c.m2 } : null)));
      return m === null ? emptyCell('mean') : { kind: 'mean', ...m };
    }
    case 'proportion': {
      let n = 0;
      let hits = 0;
      for (const c of cells) if (c.kind === 'proportion') (n += c.n), (hits += c.hits);
      return { kind, n, hits };
    }
    case 'ratio': {
      let acc: RatioCell = emptyCell('ratio') as RatioCell;
      for (const c of cells) if (c.kind === 'ratio' && c.n > 0) acc = combineRatio(acc, c);
      return acc;
    }
    case 'total': {
      let n = 0;
      let value = 0;
      for (const c of cells) {
        if (c.kind !== 'total') continue;
        n += c.n;
        value += c.value ?? 0;
      }
      // A distinct count over several periods is not the sum of the periods' counts.
      return { kind, n, value: additive ? value : null, additive };
    }
  }
}

// Chan, Golub & LeVeque pairwise update, extended to the co-moment (the same δx·δy·na·nb/n term).
function combineRatio(a: RatioCell, b: RatioCell): RatioCell {
  if (a.n === 0) return { ...b };
  const n = a.n + b.n;
  const dx = b.mx - a.mx;
  const dy = b.my - a.my;
  const w = (a.n * b.n) / n;
  return {
    kind: 'ratio',
    n,
    mx: a.mx + (dx * b.n) / n,
    my: a.my + (dy * b.n) / n,
    m2x: a.m2x + b.m2x + dx * dx * w,
    m2y: a.m2y + b.m2y + dy * dy * w,
    cxy: a.cxy + b.cxy + dx * dy * w,
  };
}

export interface TestedDifference extends DifferenceTest {
  kind: 'test';
}

export interface UntestedDifference {
  kind: 'none';
  reason: NoTestReason;
  first: number | null;
  second: number | null;
}

/** Tests first − second for two independent cells of the same kind. */
export function compareCells(first: Cell, second: Cell, confidence: number): TestedDifference | UntestedDifference {
  const e1 = cellEstimate(first);
  const e2 = cellEstimate(second);
  const none = (reason: NoTestReason): UntestedDifference => ({ kind: 'none', reason, first: e1, second: e2 });
  if (first.n <= 0 || second.n <= 0 || e1 === null || e2 === null) return none('empty_group');
  if (first.kind === 'total' || second.kind === 'total') return none('not_testable');
  if (first.kind === 'mean' && second.kind === 'mean') {
    if (first.n < 2 || second.n < 2) return none('too_few');
    const sd = (c: MeanCell) => Math.sqrt(c.m2 / (c.n - 1));
    const r = welchTTest({ n: first.n, mean: first.mean, sd: sd(first) }, { n: second.n, mean: second.mean, sd: sd(second) }, confidence);
    if (r === null) return none('no_variation');
    return {
      kind: 'test',
      test: 'welch_t',
      first: e1,
      second: e2,
      difference: r.difference,
      relative: r.relativeLift,
      ci: r.ci,
      confidence,
      statistic: r.t,
      df: r.df,
      pValue: r.pValue,
      effectSize: r.effectSize,
    };
  }
  if (first.kind === 'proportion' && second.kind === 'proportion') {
    const r = twoProportionZTest({ successes: first.hits, n: first.n }, { successes: second.hits, n: second.n }, confidence);
    if (r === null) return none('no_variation');
    return {
      kind: 'test',
      test: 'two_proportion_z',
      first: e1,
      second: e2,
      difference: r.difference,
      relative: r.relativeLift,
      ci: r.ci,
      confidence,
      statistic: r.z,
      df: null,
      pValue: r.pValue,
      effectSize: null,
    };
  }
  if (first.kind === 'ratio' && second.kind === 'ratio') {
    if (first.n < 2 || second.n < 2) return none('too_few');
    const v1 = cellVariance(first);
    const v2 = cellVariance(second);
    if (v1 === null || v2 === null) return none('empty_group');
    const se = Math.sqrt(v1.variance + v2.variance);
    if (!(se > 0)) return none('no_variation');
    const difference = e1 - e2;
    const z = difference / se;
    const half = normalQuantile(1 - (1 - confidence) / 2, 0, 1) * se;
    return {
      kind: 'test',
      test: 'delta_ratio_z',
      first: e1,
      second: e2,
      difference,
      relative: e2 === 0 ? null : difference / e2,
      ci: [difference - half, difference + half],
      confidence,
      statistic: z,
      df: null,
      pValue: Math.min(1, 2 * normalCdf(-Math.abs(z), 0, 1)),
      effectSize: null,
    };
  }
  return none('not_testable');
}

export interface ContrastResult {
  estimate: number;
  ci: [number, number] | null;
  test: 'did_t' | 'did_z' | null;
  statistic: number | null;
  df: number | null;
  pValue: number | null;
}

/**
 * Σ wᵢ·estimateᵢ over independent cells, with Var = Σ wᵢ²·Varᵢ. Means use t with the
 * Welch–Satterthwaite degrees of freedom generalised to k cells; shares and ratios use z.
 * Null when an estimate is missing; no interval when a variance is missing or all are zero.
 */
export function contrast(terms: readonly { cell: Cell; weight: number }[], confidence: number): ContrastResult | null {
  let estimate = 0;
  let variance = 0;
  let dfDenominator = 0;
  let haveVariance = true;
  let allMeans = true;
  for (const { cell, weight } of terms) {
    const e = cellEstimate(cell);
    if (e === null) return null;
    estimate += weight * e;
    const v = cellVariance(cell);
    if (v === null) {
      haveVariance = false;
      continue;
    }
    const wv = weight * weight * v.variance;
    variance += wv;
    if (cell.kind !== 'mean') allMeans = false;
    else dfDenominator += (wv * wv) / v.df;
  }
  if (!haveVariance || !(variance > 0)) return { estimate, ci: null, test: null, statistic: null, df: null, pValue: null };
  const se = Math.sqrt(variance);
  const statistic = estimate / se;
  const df = allMeans && dfDenominator > 0 ? (variance * variance) / dfDenominator : null;
  const pValue = df === null ? 2 * normalCdf(-Math.abs(statistic), 0, 1) : 2 * tCdf(-Math.abs(statistic), df);
  const half = quantile(confidence, df ?? Infinity) * se;
  return { estimate, ci: [estimate - half, estimate + half], test: df === null ? 'did_z' : 'did_t', statistic, df, pValue: Math.min(1, pValue) };
}

/**
 * A contrast of logs of independent cells, Σ w·log(estimate), as a relative change exp(Σ) − 1:
 * for difference in differences, (members after / members before) / (others after / others
 * before) − 1, the effect in a log-linear model of the four cells. Its standard error is from
 * the delta method, Var(log m) ≈ Var(m) / m², with a normal interval, so the interval and the
 * p-value agree: the interval leaves out 0 exactly when p < 1 − confidence. Null unless every
 * estimate is positive with a variance.
 */
export function logRatioContrast(terms: readonly { cell: Cell; weight: number }[], confidence: number): { estimate: number; ci: [number, number]; pValue: number; se: number } | null {
  let log = 0;
  let variance = 0;
  for (const { cell, weight } of terms) {
    const e = cellEstimate(cell);
    const v = cellVariance(cell);
    if (e === null || !(e > 0) || v === null) return null;
    log += weight * Math.log(e);
    variance += (weight * weight * v.variance) / (e * e);
  }
  if (!(variance > 0)) return null;
  const se = Math.sqrt(variance);
  const z = normalQuantile(1 - (1 - confidence) / 2, 0, 1);
  return {
    estimate: Math.exp(log) - 1,
    ci: [Math.exp(log - z * se) - 1, Math.exp(log + z * se) - 1],
    pValue: Math.min(1, 2 * normalCdf(-Math.abs(log / se), 0, 1)),
    se,
  };
}

/**
 * Interval for the ratio of two independent means m1/m2 with standard errors se1, se2, by the
 * delta method on the log scale (keeps the interval positive); null unless both means are positive.
 */
export function ratioOfMeansInterval(m1: number, se1: number, m2: number, se2: number, confidence: number): [number, number] | null {
  if (!(m1 > 0 && m2 > 0) || !Number.isFinite(se1) || !Number.isFinite(se2)) return null;
  const s = Math.sqrt((se1 / m1) ** 2 + (se2 / m2) ** 2);
  const z = normalQuantile(1 - (1 - confidence) / 2, 0, 1);
  const r = m1 / m2;
  return [r * Math.exp(-z * s), r * Math.exp(z * s)];
}

export function directionOf(difference: number | null): Direction {
  return difference === null || difference === 0 ? 'equal' : difference > 0 ? 'higher' : 'lower';
}

export interface VerdictParts {
  verdict: Verdict;
  direction: Direction;
  basis: 'test' | 'exact' | 'none';
  pValue: number | null;
}

/**
 * Better / worse only when the test rejects equality at `alpha` (or when neither group varies at
 * all, so the difference is exact); `higherIsBetter` (the compared quantity's good direction,
 * `goodDirection`) decides which way is better, and when it is null a clear difference is only a
 * clear difference.
 */
export function verdictOf(result: TestedDifference | UntestedDifference, higherIsBetter: boolean | null, alpha: number): VerdictParts {
  if (result.kind === 'test') {
    const direction = directionOf(result.difference);
    const clear = result.pValue < alpha && direction !== 'equal';
    return { verdict: clear ? goodOrBad(direction, higherIsBetter) : 'no_clear_difference', direction, basis: 'test', pValue: result.pValue };
  }
  const diff = result.first !== null && result.second !== null ? result.first - result.second : null;
  const direction = directionOf(diff);
  if (result.reason === 'no_variation' && direction !== 'equal') {
    return { verdict: goodOrBad(direction, higherIsBetter), direction, basis: 'exact', pValue: null };
  }
  return { verdict: 'no_clear_difference', direction, basis: 'none', pValue: null };
}

function goodOrBad(direction: Direction, higherIsBetter: boolean | null): Verdict {
  if (higherIsBetter === null) return 'clear_difference';
  return (direction === 'higher') === higherIsBetter ? 'better' : 'worse';
}

function quantile(confidence: number, df: number): number {
  const p = 1 - (1 - confidence) / 2;
  return Number.isFinite(df) ? tQuantile(p, df) : normalQuantile(p, 0, 1);
}
