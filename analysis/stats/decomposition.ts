// Seasonal indices by classical decomposition, multiplicative or additive
// (Hyndman & Athanasopoulos, Forecasting: Principles and Practice, 3rd ed., section 3.4).
import { medianInPlace } from './order-stats.js';

/**
 * Multiplicative for a flow, whose cycle grows with its level (a ratio y/T, indices averaging 1);
 * additive for a level, whose cycle is a swing in its own units (a difference y − T, indices
 * summing to 0).
 */
export type SeasonalModel = 'multiplicative' | 'additive';

/** One period of a regular series; `season` is its position in the cycle, 1..period (e.g. month of year). */
export interface SeasonalPoint {
  season: number;
  value: number | null;
}

/** The detrended ratios y/T of one cycle (e.g. one calendar year), indexed by season − 1. */
export interface CycleRatios {
  /** 0-based cycle number; cycle 0 holds the first point, even when it starts mid-cycle. */
  cycle: number;
  ratios: (number | null)[];
  /** Every season of this cycle has a ratio. */
  complete: boolean;
}

/** For one season: in how many complete cycles its ratio was the highest, and the lowest, of that cycle. */
export interface SeasonExtremes {
  season: number;
  highestIn: number;
  lowestIn: number;
}

export type SeasonalIndexResult =
  | {
      kind: 'ok';
      period: number;
      model: SeasonalModel;
      /** Seasonal index per season (index 0 is season 1): multiplicative ones average exactly 1, additive ones (in units) sum to 0. */
      indices: number[];
      /** Centred moving average per input point; null at the ends and where the window holds a null. */
      trend: (number | null)[];
      /** y / trend (additive: y − trend) per input point; null where either is missing or (multiplicative) the trend is not positive. */
      ratios: (number | null)[];
      cycles: CycleRatios[];
      /** Counts over complete cycles only, so a half year cannot win. */
      extremes: SeasonExtremes[];
      completeCycles: number;
    }
  | { kind: 'too_few_cycles'; period: number; points: number; fullCycles: number; required: number }
  | { kind: 'negative_values'; period: number; positions: number[] }
  | { kind: 'uncovered_seasons'; period: number; seasons: number[] };

/** Fewer than two cycles leave some season with at most one detrended ratio, too few to separate season from noise. */
export const MIN_CYCLES = 2;

/**
 * Seasonal indices of a regular series: trend by a 2×m centred moving average (m-MA for odd m), ratios y/trend,
 * index = mean ratio per season normalised to average 1. Throws on a malformed series (season out of range or
 * not consecutive); data problems come back as a result kind instead.
 */
export function seasonalIndices(points: readonly SeasonalPoint[], period: number, model: SeasonalModel = 'multiplicative'): SeasonalIndexResult {
  if (!(Number.isInteger(period) && period >= 2)) throw new RangeError(`period must be an integer ≥ 2, got ${period}`);
  checkRegular(points, period);
  const fullCycles = Math.floor(points.length / period);
  if (fullCycles < MIN_CYCLES) {
    return { kind: 'too_few_cycles', period, points: points.length, fullCycles, required: MIN_CYCLES };
  }
  const y = points.map((p) => (typeof p.value === 'number' && Number.isFinite(p.value) ? p.value : null));
  // A ratio to the trend means nothing below zero; a difference from it does (a temperature).
  const negatives = model === 'additive' ? [] : y.flatMap((v, i) => (v !== null && v < 0 ? [i] : []));
  if (negatives.length > 0) return { kind: 'negative_values', period, positions: negatives };

  const trend = centredMovingAverage(y, period);
  const ratios = y.map((v, i) => {
    const t = trend[i];
    if (v === null || t === null || t === undefined) return null;
    if (model === 'additive') return v - t;
    return t > 0 ? v / t : null;
  });

  const sums = new Array<number>(period).fill(0);
  const counts = new Array<number>(period).fill(0);
  ratios.forEach((r, i) => {
    if (r === null) return;
    const s = points[i]!.season - 1;
    sums[s]! += r;
    counts[s]!++;
  });
  const uncovered = counts.flatMap((c, s) => (c === 0 ? [s + 1] : []));
  if (uncovered.length > 0) return { kind: 'uncovered_seasons', period, seasons: uncovered };
  const raw = sums.map((s, k) => s / counts[k]!);
  const rawMean = raw.reduce((a, b) => a + b, 0) / period;
  const indices = raw.map((r) => (model === 'additive' ? r - rawMean : r / rawMean));

  const cycles = groupByCycle(points, ratios, period);
  const extremes = countExtremes(cycles, period);
  return {
    kind: 'ok',
    period,
    model,
    indices,
    trend,
    ratios,
    cycles,
    extremes,
    completeCycles: cycles.filter((c) => c.complete).length,
  };
}

/** Centred moving average of order m (2×m for even m); null where the window runs off the ends or holds a null. */
export function centredMovingAverage(y: readonly (number | null)[], m: number): (number | null)[] {
  const half = Math.floor(m / 2);
  const even = m % 2 === 0;
  return y.map((_, t) => {
    if (t - half < 0 || t + half >= y.length) return null;
    let sum = 0;
    for (let j = -half; j <= half; j++) {
      const v = y[t + j];
      if (v === null || v === undefined) return null;
      // A 2×m-MA weights the two end points, which share a season, by half each.
      sum += even && Math.abs(j) === half ? v / 2 : v;
    }
    return sum / m;
  });
}

function checkRegular(points: readonly SeasonalPoint[], period: number): void {
  points.forEach((p, i) => {
    if (!(Number.isInteger(p.season) && p.season >= 1 && p.season <= period)) {
      throw new RangeError(`season at position ${i} must be an integer in 1..${period}, got ${p.season}`);
    }
    if (i > 0) {
      const expected = (points[i - 1]!.season % period) + 1;
      if (p.season !== expected) throw new RangeError(`series is not regular at position ${i}: season ${p.season}, expected ${expected}`);
    }
  });
}

function groupByCycle(points: readonly SeasonalPoint[], ratios: readonly (number | null)[], period: number): CycleRatios[] {
  const cycles: CycleRatios[] = [];
  const offset = points.length > 0 ? points[0]!.season - 1 : 0;
  ratios.forEach((r, i) => {
    const c = Math.floor((offset + i) / period);
    while (cycles.length <= c) cycles.push({ cycle: cycles.length, ratios: new Array<number | null>(period).fill(null), complete: false });
    cycles[c]!.ratios[points[i]!.season - 1] = r;
  });
  for (const c of cycles) c.complete = c.ratios.every((r) => r !== null);
  return cycles;
}

function countExtremes(cycles: readonly CycleRatios[], period: number): SeasonExtremes[] {
  const out = Array.from({ length: period }, (_, k) => ({ season: k + 1, highestIn: 0, lowestIn: 0 }));
  for (const c of cycles) {
    if (!c.complete) continue;
    const r = c.ratios as number[];
    let hi = 0;
    let lo = 0;
    for (let k = 1; k < period; k++) {
      if (r[k]! > r[hi]!) hi = k;
      if (r[k]! < r[lo]!) lo = k;
    }
    out[hi]!.highestIn++;
    out[lo]!.lowestIn++;
  }
  return out;
}

/** What is left of each point once its trend and seasonal part are taken out (see `seasonalRemainders`). */
export type SeasonalRemainderResult =
  | {
      kind: 'ok';
      period: number;
      model: SeasonalModel;
      /** Full cycles in the series (its length over the period, rounded down). */
      fullCycles: number;
      /** Trend per point: the centred moving average, carried half a cycle past both ends on a straight line; null where a gap leaves none. */
      trend: (number | null)[];
      /** Seasonal part per point (it repeats every period): multiplicative ones average 1 over a cycle, additive ones sum to 0. */
      seasonal: number[];
      /** Trend and season together, what the point would be if nothing unusual happened: T·S (additive: T + S). */
      expected: (number | null)[];
      /** y/(T·S) − 1 (additive: y − T − S); null for a missing value or where there is no trend. */
      remainder: (number | null)[];
    }
  | { kind: 'too_few_cycles'; period: number; points: number; fullCycles: number; required: number };

/**
 * Remainders of a classical decomposition (Hyndman & Athanasopoulos, FPP 3rd ed., section 3.4), set up to judge single
 * points rather than to describe the cycle, in two ways that differ from `seasonalIndices`:
 * - the seasonal part of a season is the median, not the mean, of its detrended values, so one storm month cannot
 *   move its own month's index and hide in it (with three or more cycles; with two the median is their mean);
 * - the centred moving average has no value in the first and last half cycle; there the trend is carried on by the
 *   least-squares line through the nearest cycle of trend values (half a cycle at most), so the latest periods, the
 *   ones most asked about, are judged too.
 * Seasons are positions in the series (point i is season i mod period), which is all the remainders need. A value of
 * null (a gap, a partial period) is left out of every average and gets no remainder. Multiplicative needs positive
 * trend values; where the trend is not positive the point gets no remainder.
 */
export function seasonalRemainders(
  values: readonly (number | null)[],
  period: number,
  model: SeasonalModel,
  minCycles = MIN_CYCLES,
): SeasonalRemainderResult {
  if (!(Number.isInteger(period) && period >= 2)) throw new RangeError(`period must be an integer ≥ 2, got ${period}`);
  const fullCycles = Math.floor(values.length / period);
  if (fullCycles < minCycles) return { kind: 'too_few_cycles', period, points: values.length, fullCycles, required: minCycles };
  const y = values.map((v) => (typeof v === 'number' && Number.isFinite(v) ? v : null));
  const trend = extendEnds(centredMovingAverage(y, period), period);
  const detrended = y.map((v, i) => {
    const t = trend[i];
    if (v === null || t === null || t === undefined) return null;
    if (model === 'additive') return v - t;
    return t > 0 ? v / t : null;
  });
  const bySeason = Array.from({ length: period }, () => [] as number[]);
  detrended.forEach((d, i) => {
    if (d !== null) bySeason[i % period]!.push(d);
  });
  // A season with no detrended value (gaps) borrows the neutral part: no seasonal effect.
  const neutral = model === 'additive' ? 0 : 1;
  const raw = bySeason.map((ds) => (ds.length === 0 ? neutral : medianInPlace(Float64Array.from(ds))));
  const rawMean = raw.reduce((a, b) => a + b, 0) / period;
  const indices = raw.map((r) => (model === 'additive' ? r - rawMean : rawMean > 0 ? r / rawMean : neutral));
  const seasonal = y.map((_, i) => indices[i % period]!);
  const expected = trend.map((t, i) => (t === null ? null : model === 'additive' ? t + seasonal[i]! : t * seasonal[i]!));
  const remainder = y.map((v, i) => {
    const e = expected[i];
    if (v === null || e === null || e === undefined) return null;
    if (model === 'additive') return v - e;
    return e > 0 ? v / e - 1 : null;
  });
  return { kind: 'ok', period, model, fullCycles, trend, seasonal, expected, remainder };
}

/** Up to span/2 leading and trailing nulls of a trend filled from the least-squares line through the nearest `span` trend values. */
function extendEnds(trend: readonly (number | null)[], span: number): (number | null)[] {
  const out = [...trend];
  const first = out.findIndex((t) => t !== null);
  if (first < 0) return out;
  let last = out.length - 1;
  while (out[last] === null) last--;
  const line = (from: number, to: number) => {
    const xs: number[] = [];
    const ts: number[] = [];
    for (let i = from; i <= to; i++) {
      const t = out[i];
      if (t !== null && t !== undefined) {
        xs.push(i);
        ts.push(t);
      }
    }
    if (xs.length < 2) return (_: number) => ts[0] ?? null;
    const mx = xs.reduce((a, b) => a + b, 0) / xs.length;
    const mt = ts.reduce((a, b) => a + b, 0) / ts.length;
    let sxx = 0;
    let sxt = 0;
    xs.forEach((x, k) => {
      sxx += (x - mx) ** 2;
      sxt += (x - mx) * (ts[k]! - mt);
    });
    const slope = sxt / sxx;
    return (x: number) => mt + slope * (x - mx);
  };
  // Only as far as the moving average itself falls short of an end (half a cycle): further out, past a gap near
  // the start, a line is a guess, and a point with no trend is left unjudged.
  const reach = Math.floor(span / 2);
  const head = line(first, Math.min(last, first + span - 1));
  for (let i = Math.max(0, first - reach); i < first; i++) out[i] = head(i);
  const tail = line(Math.max(first, last - span + 1), last);
  for (let i = last + 1; i <= Math.min(out.length - 1, last + reach); i++) out[i] = tail(i);
  return out;
}
