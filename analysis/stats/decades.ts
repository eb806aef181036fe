// The rate of change of a series within each calendar decade (the 1960s are 1960–1969), so "how
// fast per decade" is answered decade by decade, not by one slope over the whole span.
import { senSlope } from './mann-kendall.js';

export interface TimedValue {
  /** Time in years, e.g. 1960.5 for the start of July 1960. */
  year: number;
  value: number;
}

export interface DecadeSlope {
  /** First year of the decade: 1960 for the 1960s. */
  decade: number;
  /** Sen's slope of the decade's values, in units per year. */
  perYear: number;
  n: number;
  /** Years from the first to the last value inside the decade. */
  spanYears: number;
}

/** A decade is measured only when its values span at least this many years (half a decade). */
export const MIN_DECADE_SPAN_YEARS = 5;

/** Sen's slope per calendar decade; decades whose values span under five years are left out. */
export function slopesByDecade(values: readonly TimedValue[]): DecadeSlope[] {
  const byDecade = new Map<number, TimedValue[]>();
  for (const v of values) {
    if (!Number.isFinite(v.value) || !Number.isFinite(v.year)) continue;
    const decade = Math.floor(Math.floor(v.year) / 10) * 10;
    const list = byDecade.get(decade) ?? [];
    list.push(v);
    byDecade.set(decade, list);
  }
  const out: DecadeSlope[] = [];
  for (const [decade, list] of [...byDecade].sort((a, b) => a[0] - b[0])) {
    const years = list.map((v) => v.year);
    const spanYears = Math.max(...years) - Math.min(...years);
    if (spanYears < MIN_DECADE_SPAN_YEARS) continue;
    const sen = senSlope(list.map((v) => v.value), years);
    if (sen) out.push({ decade, perYear: sen.slope, n: list.length, spanYears });
  }
  return out;
}
