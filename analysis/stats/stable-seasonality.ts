// The F-test for stable seasonality of the X-11 method: a one-way analysis of variance of the
// detrended values (SI ratios, or differences for an additive model) with the calendar months as
// the groups. X-11 takes seasonality as present when the test is significant at the 0.1% level
// (Lothian & Morry, "A test for the presence of identifiable seasonality when using the X-11
// program", Statistics Canada, 1978; the same test is reported in X-13ARIMA-SEATS' table D8.A).
import fCdf from '@stdlib/stats-base-dists-f-cdf';

export interface StableSeasonalityTest {
  f: number;
  df1: number;
  df2: number;
  pValue: number;
}

/** The level at which X-11 takes stable seasonality as present. */
export const STABLE_SEASONALITY_ALPHA = 0.001;

/** `bySeason[k]`: the detrended values of season k over the cycles; null when there are too few to test. */
export function stableSeasonalityTest(bySeason: readonly (readonly number[])[]): StableSeasonalityTest | null {
  const groups = bySeason.filter((g) => g.length > 0);
  const k = groups.length;
  const n = groups.reduce((s, g) => s + g.length, 0);
  if (k < 2 || n - k < 1) return null;
  const grand = groups.reduce((s, g) => s + g.reduce((a, b) => a + b, 0), 0) / n;
  let between = 0;
  let within = 0;
  for (const g of groups) {
    const mean = g.reduce((a, b) => a + b, 0) / g.length;
    between += g.length * (mean - grand) ** 2;
    for (const x of g) within += (x - mean) ** 2;
  }
  const df1 = k - 1;
  const df2 = n - k;
  if (within === 0) return between === 0 ? null : { f: Infinity, df1, df2, pValue: 0 };
  const f = between / df1 / (within / df2);
  return { f, df1, df2, pValue: 1 - fCdf(f, df1, df2) };
}
