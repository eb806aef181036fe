// Growth rates between periods. Every output is a finite number or null, never NaN or Infinity.

/**
 * (value − base) / base; null when either is missing or non-finite, or base ≤ 0
 * (a rate against a zero base is undefined, and against a negative base its sign misleads).
 */
export function relativeChange(base: number | null, value: number | null): number | null {
  if (!isNum(base) || !isNum(value) || base <= 0) return null;
  return finiteOrNull((value - base) / base);
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
