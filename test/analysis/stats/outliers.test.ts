import { describe, expect, it } from 'vitest';
import { MODIFIED_Z_CONSTANT, MODIFIED_Z_THRESHOLD, modifiedZScores } from '../../../analysis/stats/outliers.js';
import { jStat } from './jstat.js';
import { loadSeattleWeather } from './seattle-weather.js';

describe('modifiedZScores (Iglewicz & Hoaglin 1993)', () => {
  it('uses 0.6745 ≈ Φ⁻¹(0.75) and the 3.5 cut-off', () => {
    // The constant is the standard normal's upper quartile, so MAD/0.6745 estimates σ; jStat supplies Φ⁻¹.
    expect(MODIFIED_Z_CONSTANT).toBeCloseTo(jStat.normal.inv(0.75, 0, 1), 4);
    // Iglewicz & Hoaglin recommend labelling |M| > 3.5 as potential outliers (as quoted in the NIST/SEMATECH
    // e-Handbook, section 1.3.5.17; recalled from memory).
    expect(MODIFIED_Z_THRESHOLD).toBe(3.5);
  });

  it('scores a small sample by hand', () => {
    // [1, 2, 3, 4, 100]: median 3, |x − 3| = [2, 1, 0, 1, 97], MAD 1.
    const r = modifiedZScores([1, 2, 3, 4, 100])!;
    expect(r.median).toBe(3);
    expect(r.mad).toBe(1);
    expect(r.scale).toBe('mad');
    expect(r.scores[4]).toBeCloseTo(0.6745 * 97, 12);
    expect(r.scores[0]).toBeCloseTo(-0.6745 * 2, 12);
    expect(r.outlierIndices).toEqual([4]);
  });

  it('falls back to the mean absolute deviation when MAD is 0 (common practice)', () => {
    // [5, 5, 5, 5, 5, 6, 50]: median 5, MAD 0; mean |x − 5| = 46/7; score = (x − 5)/(√(π/2)·46/7).
    const r = modifiedZScores([5, 5, 5, 5, 5, 6, 50])!;
    expect(r.mad).toBe(0);
    expect(r.scale).toBe('mean_abs_dev');
    expect(r.scores[6]).toBeCloseTo(45 / (Math.sqrt(Math.PI / 2) * (46 / 7)), 12);
    expect(r.scores[5]).toBeCloseTo(1 / (Math.sqrt(Math.PI / 2) * (46 / 7)), 12);
    expect(r.outlierIndices).toEqual([6]);
  });

  it('all-equal values score 0 with no outliers; nulls keep their positions; no data gives null', () => {
    expect(modifiedZScores([2, 2, 2])).toMatchObject({ scale: 'none', scores: [0, 0, 0], outlierIndices: [] });
    const r = modifiedZScores([null, 1, 2, 3, null, 40])!;
    expect(r.scores[0]).toBeNull();
    expect(r.scores[4]).toBeNull();
    expect(r.outlierIndices).toEqual([5]);
    expect(modifiedZScores([null])).toBeNull();
  });

  it('on Seattle daily wind (vega-datasets) matches a plain sort-based median and MAD', () => {
    const x = loadSeattleWeather().map((d) => d.wind);
    const sortedMedian = (v: number[]) => {
      const s = [...v].sort((a, b) => a - b);
      const n = s.length;
      return n % 2 ? s[(n - 1) / 2]! : (s[n / 2 - 1]! + s[n / 2]!) / 2;
    };
    const med = sortedMedian(x);
    const mad = sortedMedian(x.map((v) => Math.abs(v - med)));
    const r = modifiedZScores(x)!;
    expect(r.median).toBe(med);
    expect(r.mad).toBeCloseTo(mad, 12);
    const expected = x.flatMap((v, i) => (Math.abs((0.6745 * (v - med)) / mad) > 3.5 ? [i] : []));
    expect(r.outlierIndices).toEqual(expected);
    expect(expected.length).toBeGreaterThan(0);
  });
});
