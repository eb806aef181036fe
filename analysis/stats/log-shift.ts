// A relative shift between two spans, read from per-period log ratios: each period gives one
// log ratio (members over others, phone over kiosk, this year over the year before), and the
// shift is the mean log ratio after minus the mean before, with Welch's t-test across periods.
// It is the log-linear difference in differences with period effects: whatever moves both
// series of a period alike (a season, a holiday) cancels in its ratio, and the spread between
// periods, not a count's Poisson noise, sets the interval. Stated back as a percentage.
import { welchTTest } from './welch.js';

/** What a shift's Welch's t-test across periods gives, on either scale. */
interface ShiftTest {
  ci: [number, number];
  confidence: number;
  t: number;
  df: number;
  pValue: number;
  standardError: number;
  /** Periods behind each side. */
  nBefore: number;
  nAfter: number;
}

export interface LogShift extends ShiftTest {
  /** Mean log ratio after − before (the log of 1 + relative). */
  logEstimate: number;
  /** exp(logEstimate) − 1: the shift as a relative change (0.22 is +22%); `ci` is its interval (the log interval, exponentiated). */
  relative: number;
}

/** The log ratio of two positive values; null when either is missing, zero or negative. */
export function logRatio(a: number | null | undefined, b: number | null | undefined): number | null {
  if (a === null || a === undefined || b === null || b === undefined) return null;
  if (!(a > 0 && b > 0) || !Number.isFinite(a) || !Number.isFinite(b)) return null;
  return Math.log(a / b);
}

function moments(xs: readonly number[]): { n: number; mean: number; sd: number } {
  const n = xs.length;
  const mean = xs.reduce((s, x) => s + x, 0) / n;
  const ss = xs.reduce((s, x) => s + (x - mean) ** 2, 0);
  return { n, mean, sd: n > 1 ? Math.sqrt(ss / (n - 1)) : 0 };
}

/**
 * The shift from `before` to `after` (per-period log ratios); null with fewer than two periods a
 * side or no spread at all (no test exists).
 */
export function logShift(before: readonly number[], after: readonly number[], confidence = 0.95): LogShift | null {
  const b = before.filter(Number.isFinite);
  const a = after.filter(Number.isFinite);
  if (a.length < 2 || b.length < 2) return null;
  const r = welchTTest(moments(a), moments(b), confidence);
  if (!r) return null;
  return {
    logEstimate: r.difference,
    relative: Math.expm1(r.difference),
    ci: [Math.expm1(r.ci[0]), Math.expm1(r.ci[1])],
    confidence,
    t: r.t,
    df: r.df,
    pValue: r.pValue,
    standardError: r.standardError,
    nBefore: b.length,
    nAfter: a.length,
  };
}

/**
 * The same shift on a scale where ratios mean nothing (a temperature, an average delay that goes
 * below zero, a rate in points: catalog.ts changeBasisOf): each period gives one difference
 * (first − second, in the metric's units), and the shift is the mean difference after minus the
 * mean before, with Welch's t-test across periods: the difference in differences with period
 * effects, stated in units.
 */
export interface DifferenceShift extends ShiftTest {
  /** Mean difference after − mean difference before, in the metric's units. */
  estimate: number;
}

/** The shift from `before` to `after` (per-period differences); null with fewer than two periods a side or no spread at all. */
export function differenceShift(before: readonly number[], after: readonly number[], confidence = 0.95): DifferenceShift | null {
  const b = before.filter(Number.isFinite);
  const a = after.filter(Number.isFinite);
  if (a.length < 2 || b.length < 2) return null;
  const r = welchTTest(moments(a), moments(b), confidence);
  if (!r) return null;
  return { estimate: r.difference, ci: r.ci, confidence, t: r.t, df: r.df, pValue: r.pValue, standardError: r.standardError, nBefore: b.length, nAfter: a.length };
}
