// Welch's unequal-variance t-test on two groups' summary moments (what a GROUP BY returns).
import tCdf from '@stdlib/stats-base-dists-t-cdf';
import tQuantile from '@stdlib/stats-base-dists-t-quantile';

export interface GroupMoments {
  n: number;
  mean: number;
  /** Sample standard deviation (n − 1). */
  sd: number;
}

export interface WelchResult {
  /** t = (mean1 − mean2) / √(sd1²/n1 + sd2²/n2). */
  t: number;
  /** Welch–Satterthwaite degrees of freedom. */
  df: number;
  /** Two-sided p-value. */
  pValue: number;
  /** Confidence interval for mean1 − mean2 at `confidence`. */
  ci: [number, number];
  confidence: number;
  standardError: number;
  /** mean1 − mean2. */
  difference: number;
  /** difference / mean2; null when mean2 is 0. */
  relativeLift: number | null;
  /** Pooled sd √(((n1−1)sd1² + (n2−1)sd2²)/(n1+n2−2)), the effect size's denominator. */
  pooledSd: number;
  /** Hedges' g: Cohen's d on the pooled sd times J = 1 − 3/(4(n1+n2) − 9); null when pooledSd is 0. */
  effectSize: number | null;
}

/** Welch's two-sample t-test of group 1 against group 2; null when either n < 2 or both spreads are 0 (no test exists). */
export function welchTTest(group1: GroupMoments, group2: GroupMoments, confidence = 0.95): WelchResult | null {
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`confidence must be in (0, 1), got ${confidence}`);
  const { n: n1, mean: m1, sd: s1 } = group1;
  const { n: n2, mean: m2, sd: s2 } = group2;
  if (!(n1 >= 2 && n2 >= 2)) return null;
  if (![m1, m2, s1, s2].every(Number.isFinite) || s1 < 0 || s2 < 0) return null;
  const v1 = (s1 * s1) / n1;
  const v2 = (s2 * s2) / n2;
  const se2 = v1 + v2;
  if (!(se2 > 0)) return null;
  const standardError = Math.sqrt(se2);
  const difference = m1 - m2;
  const t = difference / standardError;
  const df = (se2 * se2) / ((v1 * v1) / (n1 - 1) + (v2 * v2) / (n2 - 1));
  // 2·F(−|t|) rather than 2·(1 − F(|t|)) keeps tiny p-values instead of rounding them to 0.
  const pValue = Math.min(1, 2 * tCdf(-Math.abs(t), df));
  const margin = tQuantile(1 - (1 - confidence) / 2, df) * standardError;
  const pooledSd = Math.sqrt(((n1 - 1) * s1 * s1 + (n2 - 1) * s2 * s2) / (n1 + n2 - 2));
  // Small-sample correction of Hedges (1981), in the usual approximate form.
  const j = 1 - 3 / (4 * (n1 + n2) - 9);
  return {
    t,
    df,
    pValue,
    ci: [difference - margin, difference + margin],
    confidence,
    standardError,
    difference,
    relativeLift: m2 === 0 ? null : difference / m2,
    pooledSd,
    effectSize: pooledSd > 0 ? (difference / pooledSd) * j : null,
  };
}
