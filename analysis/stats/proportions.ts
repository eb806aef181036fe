// Two-proportion z-test: pooled standard error under H0 for the test, unpooled for the Wald interval.
import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';

export interface ProportionGroup {
  successes: number;
  n: number;
}

export interface TwoProportionResult {
  p1: number;
  p2: number;
  /** p1 − p2. */
  difference: number;
  /** (p1 − p2) / pooled SE, with pooled p = (x1 + x2)/(n1 + n2). */
  z: number;
  /** Two-sided p-value from the standard normal. */
  pValue: number;
  /** Wald interval for p1 − p2 with the unpooled SE √(p1(1−p1)/n1 + p2(1−p2)/n2). */
  ci: [number, number];
  confidence: number;
  pooledSe: number;
  unpooledSe: number;
  /** difference / p2; null when p2 is 0. */
  relativeLift: number | null;
}

/** Tests p1 = p2 for counts of successes out of n; null when a group is empty or the pooled proportion is 0 or 1. */
export function twoProportionZTest(
  group1: ProportionGroup,
  group2: ProportionGroup,
  confidence = 0.95,
): TwoProportionResult | null {
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`confidence must be in (0, 1), got ${confidence}`);
  const { successes: x1, n: n1 } = group1;
  const { successes: x2, n: n2 } = group2;
  if (!(n1 > 0 && n2 > 0)) return null;
  if (!(x1 >= 0 && x1 <= n1 && x2 >= 0 && x2 <= n2)) {
    throw new RangeError(`successes must lie in [0, n]; got ${x1}/${n1} and ${x2}/${n2}`);
  }
  const p1 = x1 / n1;
  const p2 = x2 / n2;
  const pooled = (x1 + x2) / (n1 + n2);
  const pooledSe = Math.sqrt(pooled * (1 - pooled) * (1 / n1 + 1 / n2));
  if (!(pooledSe > 0)) return null;
  const difference = p1 - p2;
  const z = difference / pooledSe;
  const unpooledSe = Math.sqrt((p1 * (1 - p1)) / n1 + (p2 * (1 - p2)) / n2);
  const margin = normalQuantile(1 - (1 - confidence) / 2, 0, 1) * unpooledSe;
  return {
    p1,
    p2,
    difference,
    z,
    pValue: Math.min(1, 2 * normalCdf(-Math.abs(z), 0, 1)),
    ci: [difference - margin, difference + margin],
    confidence,
    pooledSe,
    unpooledSe,
    relativeLift: p2 === 0 ? null : difference / p2,
  };
}
