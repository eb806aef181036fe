import { describe, expect, it } from 'vitest';
import { centredMovingAverage, seasonalIndices, type SeasonalPoint } from '../../../analysis/stats/decomposition.js';
import { loadSeattleWeather, monthly } from './seattle-weather.js';

const months = monthly(loadSeattleWeather());

function ok(points: SeasonalPoint[], period: number) {
  const r = seasonalIndices(points, period);
  if (r.kind !== 'ok') throw new Error(`expected ok, got ${r.kind}`);
  return r;
}

const argmax = (xs: readonly number[]) => xs.indexOf(Math.max(...xs));
const argmin = (xs: readonly number[]) => xs.indexOf(Math.min(...xs));
const mean = (xs: readonly number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;

// Reference: R 4.2.2, decompose(ts(monthly, frequency = 12, start = c(2012, 1)), type = "multiplicative")$figure on
// the same monthly rollups of vega-datasets' seattle-weather.csv, run once by hand and recorded here. R's decompose is
// the classical decomposition of Hyndman & Athanasopoulos, FPP 3rd ed., section 3.4.
const R_PRECIPITATION = [
  1.181385308129449, 1.317766516199113, 1.67824702409952, 1.176867732648581, 0.594911316756635, 0.238541616738134,
  0.155159905875601, 0.314834856339839, 0.835950974498714, 1.484655886502783, 1.670592156990865, 1.351086705220765,
];
const R_TEMP_MAX = [
  0.507507780694236, 0.588923936075734, 0.785826968588254, 0.889698706290558, 1.172328123897633, 1.395025245681366,
  1.552598425716549, 1.599112663810361, 1.366406256728667, 0.966277886486035, 0.6930632567777, 0.483230749252907,
];

describe('seasonalIndices on the Seattle weather record (vega-datasets, 2012–2015)', () => {
  it('monthly mean temp_max: August warmest, December coldest, as R computes', () => {
    const r = ok(months.map((m) => ({ season: m.month, value: m.meanTempMax })), 12);
    r.indices.forEach((v, k) => expect(v).toBeCloseTo(R_TEMP_MAX[k]!, 12));
    // The public record: Seattle's warmest months are July/August and its coldest December/January.
    expect([7, 8]).toContain(argmax(r.indices) + 1);
    expect([12, 1]).toContain(argmin(r.indices) + 1);
    expect(mean(r.indices)).toBeCloseTo(1, 14);
  });

  it('monthly total precipitation: matches R; the wet season is October–March, the dry one June–August', () => {
    const r = ok(months.map((m) => ({ season: m.month, value: m.precipitation })), 12);
    r.indices.forEach((v, k) => expect(v).toBeCloseTo(R_PRECIPITATION[k]!, 12));
    expect(mean(r.indices)).toBeCloseTo(1, 14);

    // Independently, by a plain reduction: the mean monthly total over 2012–2015. November is the wettest
    // (160.6 mm), then December (155.7) and March (151.6).
    const plain = Array.from({ length: 12 }, (_, k) => mean(months.filter((m) => m.month === k + 1).map((m) => m.precipitation)));
    expect(argmax(plain) + 1).toBe(11);
    // The ratio-to-trend indices use only July 2012–June 2015 (the 2×12 average loses six months at each end), which
    // drops the very wet December 2015; on them March (1.678) edges out November (1.671), with December fourth.
    const byIndex = r.indices.map((v, k) => ({ month: k + 1, v })).sort((a, b) => b.v - a.v);
    expect(byIndex.slice(0, 2).map((x) => x.month)).toEqual([3, 11]);
    expect(byIndex[0]!.v - byIndex[1]!.v).toBeLessThan(0.01);
    expect(byIndex.slice(-3).map((x) => x.month).sort((a, b) => a - b)).toEqual([6, 7, 8]);
  });

  it('per-cycle ratios let callers count the years each month was highest and lowest', () => {
    const r = ok(months.map((m) => ({ season: m.month, value: m.meanTempMax })), 12);
    // 48 months from January 2012: ratios exist for July 2012–June 2015, so 2013 and 2014 are the complete years.
    expect(r.cycles.map((c) => c.complete)).toEqual([false, true, true, false]);
    expect(r.completeCycles).toBe(2);
    expect(r.extremes.reduce((a, e) => a + e.highestIn, 0)).toBe(2);
    expect(r.extremes.reduce((a, e) => a + e.lowestIn, 0)).toBe(2);
    // Cross-check one year by hand: the month whose ratio is highest in 2013 is counted once.
    const ratios2013 = r.cycles[1]!.ratios as number[];
    expect(r.extremes[argmax(ratios2013)]!.highestIn).toBeGreaterThanOrEqual(1);
    expect(r.ratios.slice(0, 6).every((x) => x === null)).toBe(true);
    expect(r.ratios[6]).not.toBeNull();
  });
});

describe('seasonalIndices on planted series', () => {
  it('recovers planted multiplicative factors from a sine season on a linear trend', () => {
    // y_t = (200 + 0.5 t) · (1 + 0.3 sin(2πk/12)). A 2×12 average of a product with a sloping trend picks up a small
    // bias (the slope times the seasonal pattern's first moment over the window), hence the tolerance.
    const planted = Array.from({ length: 12 }, (_, k) => 1 + 0.3 * Math.sin((2 * Math.PI * k) / 12));
    const points = Array.from({ length: 72 }, (_, t) => ({ season: (t % 12) + 1, value: (200 + 0.5 * t) * planted[t % 12]! }));
    const r = ok(points, 12);
    r.indices.forEach((v, k) => expect(Math.abs(v - planted[k]!)).toBeLessThan(2e-3));
    expect(mean(r.indices)).toBeCloseTo(1, 14);
  });

  it('recovers planted factors exactly on a flat trend, for odd and even periods, from a mid-cycle start', () => {
    for (const period of [4, 7, 12]) {
      const raw = Array.from({ length: period }, (_, k) => 1 + ((k * 37) % 11) / 20);
      const rawMean = mean(raw);
      const planted = raw.map((f) => f / rawMean);
      const start = 3; // season 3 first
      const points = Array.from({ length: period * 4 }, (_, t) => {
        const k = (start - 1 + t) % period;
        return { season: k + 1, value: 50 * planted[k]! };
      });
      const r = ok(points, period);
      r.indices.forEach((v, k) => expect(v).toBeCloseTo(planted[k]!, 12));
    }
  });

  it('the centred moving average is the 2×m average of FPP section 3.4 (hand-computed)', () => {
    // 2×4-MA at t: (y[t−2]/2 + y[t−1] + y[t] + y[t+1] + y[t+2]/2) / 4.
    const ma = centredMovingAverage([1, 2, 3, 4, 5, 6, 7], 4);
    expect(ma).toEqual([null, null, 3, 4, 5, null, null]);
    expect(centredMovingAverage([1, 5, 3, 8, 2], 3)).toEqual([null, 3, 16 / 3, 13 / 3, null]);
    // A null blanks every average whose window holds it: windows t−2..t+2 containing index 1 are t = 0..3.
    expect(centredMovingAverage([1, null, 3, 4, 5, 6, 7, 8, 9], 4)).toEqual([null, null, null, null, 5, 6, 7, null, null]);
  });
});

describe('seasonalIndices result kinds', () => {
  const series = (n: number, value: (t: number) => number | null = () => 10) =>
    Array.from({ length: n }, (_, t) => ({ season: (t % 12) + 1, value: value(t) }));

  it('flags fewer than two full cycles instead of throwing', () => {
    expect(seasonalIndices(series(23), 12)).toEqual({ kind: 'too_few_cycles', period: 12, points: 23, fullCycles: 1, required: 2 });
    expect(seasonalIndices(series(24), 12).kind).toBe('ok');
  });

  it('flags negative values, which a multiplicative index cannot describe', () => {
    const r = seasonalIndices(series(36, (t) => (t === 5 ? -1 : 10)), 12);
    expect(r).toEqual({ kind: 'negative_values', period: 12, positions: [5] });
  });

  it('flags seasons that nulls leave without a single ratio', () => {
    const r = seasonalIndices(series(24, (t) => (t === 17 ? null : 10 + (t % 3))), 12);
    // With 24 points the averages exist only at t = 6..17, one per season; the null at t = 17 also blanks the averages
    // at t = 11..17, leaving ratios for t = 6..10 (seasons 7..11) only.
    expect(r).toEqual({ kind: 'uncovered_seasons', period: 12, seasons: [1, 2, 3, 4, 5, 6, 12] });
  });

  it('throws on a malformed series (a programming error, not a data problem)', () => {
    expect(() => seasonalIndices([{ season: 1, value: 1 }, { season: 3, value: 1 }], 12)).toThrow(RangeError);
    expect(() => seasonalIndices([{ season: 13, value: 1 }], 12)).toThrow(RangeError);
    expect(() => seasonalIndices([], 1)).toThrow(RangeError);
  });
});
