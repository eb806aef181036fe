// Growth rates between periods. Every output is a finite number or null, never NaN or Infinity.

/**
 * (value − base) / base; null when either is missing or non-finite, or base ≤ 0
 * (a rate against a zero base is undefined, and against a negative base its sign misleads).
 */
export function relativeChange(base: number | null, value: number | null): number | null {
  if (!isNum(base) || !isNum(value) || base <= 0) return null;
  return finiteOrNull((value - base) / base);
}

/**
 * Below this fraction of a quantity's typical level (the median of its absolute values in the
 * window) a base is too small to divide by: on wildlife-strike costs a September of US$313 against
 * a typical month of US$15,592 turned the next September into "+1,217,656%". Withholding a
 * percentage off a tiny base is common practice; the cut-off is our rule. The change is then said
 * in the quantity's units.
 */
export const TINY_BASE_FRACTION = 0.1;

/** What one quantity's values in a window allow a percentage change to be taken against. */
export interface PercentScale {
  /** Median of the absolute values in the window (of the non-zero ones for a count or sum); null when there are none. */
  typical: number | null;
  /**
   * The quantity is signed in this window: it went below zero, or (for an average, a ratio or a
   * level, where zero is no natural floor) reached zero. No percentage of it is given at all:
   * an average delay from 10.4 to −0.07 min is not "−100.7%".
   */
  signed: boolean;
  /**
   * The quantity is on an interval scale (°C, °F: catalog.ts onIntervalScale): its zero is a point
   * on the scale, not none of it, so no percentage of it means anything whatever its values.
   */
  interval: boolean;
}

/**
 * The scale of one quantity from its values in the window. `zeroIsALevel`: a count or a sum of
 * amounts, where zero means "none" (a month without strikes) and a fall to it is a true −100%.
 */
export function percentScale(values: readonly (number | null)[], zeroIsALevel: boolean, interval = false): PercentScale {
  const present = values.filter(isNum);
  const signed = present.some((v) => v < 0 || (!zeroIsALevel && v === 0));
  // For a count or a sum, zero is "none" (a month without any cost), not its level: on a sparse
  // quantity where most months are zero the median would be zero and any base would pass.
  const abs = present.map(Math.abs).filter((v) => !zeroIsALevel || v > 0).sort((a, b) => a - b);
  const mid = abs.length >> 1;
  const typical = abs.length === 0 ? null : abs.length % 2 ? abs[mid]! : (abs[mid - 1]! + abs[mid]!) / 2;
  return { typical, signed, interval };
}

/**
 * Whether any percentage or ratio of the quantity may be given on this scale: a change ("rose
 * 8.1%"), a ratio to a mean ("12% above an average month") or a relative gap ("8% warmer"). Not
 * for a quantity on an interval scale, nor one that reaches or crosses zero in the window.
 */
export function percentsApply(scale: PercentScale): boolean {
  return !scale.signed && !scale.interval;
}

/**
 * From this many times its base a rise is said as a multiple ("×15") rather than a percentage
 * ("+1,426%"), which few readers take in at a glance. Saying large rises as multiples is common
 * practice in reporting; the threshold is our rule.
 */
export const MULTIPLE_FROM = 3;

/** The multiple of its base a growth rate (current / base − 1) reaches, when it is said as one; else null. */
export function growthMultiple(growth: number | null): number | null {
  return isNum(growth) && growth + 1 >= MULTIPLE_FROM ? growth + 1 : null;
}

/** Whether a percentage may be taken against `base` on this scale (the rule above, in one place). */
export function percentBaseUsable(base: number | null, scale: PercentScale): boolean {
  if (!percentsApply(scale) || !isNum(base) || base <= 0) return false;
  return scale.typical === null || base >= TINY_BASE_FRACTION * scale.typical;
}

/** `relativeChange` where the scale allows a percentage, else null (say the change in units instead). */
export function percentChange(base: number | null, value: number | null, scale: PercentScale): number | null {
  return percentBaseUsable(base, scale) ? relativeChange(base, value) : null;
}

/** Change of each period against the one before; the first entry is null. */
export function periodOverPeriod(values: readonly (number | null)[]): (number | null)[] {
  return lagged(values, 1);
}

/** Change of each period against the same period a year earlier; the first `periodsPerYear` entries are null. */
export function yearOverYear(values: readonly (number | null)[], periodsPerYear: number): (number | null)[] {
  if (!(Number.isInteger(periodsPerYear) && periodsPerYear >= 1)) {
    throw new RangeError(`periodsPerYear must be a positive integer, got ${periodsPerYear}`);
  }
  return lagged(values, periodsPerYear);
}

/**
 * Compound annual growth rate (last/first)^(1/years) − 1; null when first ≤ 0 (so negative-to-positive is
 * undefined), last < 0, years ≤ 0, or anything is missing.
 */
export function cagr(first: number | null, last: number | null, years: number): number | null {
  if (!isNum(first) || !isNum(last) || !isNum(years) || first <= 0 || last < 0 || years <= 0) return null;
  // expm1/log keeps small rates precise; last = 0 gives log = −∞ and a rate of exactly −100%.
  return finiteOrNull(Math.expm1(Math.log(last / first) / years));
}

/** Sum of the trailing `window` periods ending at each index; null until the window is full or while it holds a null. */
export function trailingSum(values: readonly (number | null)[], window: number): (number | null)[] {
  if (!(Number.isInteger(window) && window >= 1)) throw new RangeError(`window must be a positive integer, got ${window}`);
  return values.map((_, i) => {
    if (i + 1 < window) return null;
    let sum = 0;
    for (let k = i - window + 1; k <= i; k++) {
      const v = values[k];
      if (!isNum(v)) return null;
      sum += v;
    }
    return finiteOrNull(sum);
  });
}

/** Growth of the trailing-`window` sum against the same sum `lag` periods earlier (e.g. trailing-12 over the prior trailing-12). */
export function trailingSumGrowth(values: readonly (number | null)[], window: number, lag = window): (number | null)[] {
  if (!(Number.isInteger(lag) && lag >= 1)) throw new RangeError(`lag must be a positive integer, got ${lag}`);
  return lagged(trailingSum(values, window), lag);
}

function lagged(values: readonly (number | null)[], lag: number): (number | null)[] {
  return values.map((v, i) => (i < lag ? null : relativeChange(values[i - lag] ?? null, v)));
}

function isNum(v: number | null | undefined): v is number {
  return typeof v === 'number' && Number.isFinite(v);
}

function finiteOrNull(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}
