import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  concentration,
  countToReachShare,
  herfindahlHirschman,
  hhiBand,
  paretoCurve,
  sharesOfTotal,
  topNShare,
} from '../../../analysis/stats/concentration.js';
import { loadSeattleWeather } from './seattle-weather.js';

describe('Herfindahl–Hirschman index', () => {
  it('matches the U.S. DoJ worked examples (recalled from memory)', () => {
    // U.S. DoJ, "Herfindahl-Hirschman Index": four firms with 30, 30, 20 and 20 percent give 2,600.
    expect(herfindahlHirschman([30, 30, 20, 20])).toBeCloseTo(2600, 9);
    // Two firms with 70% and 30%: 70² + 30² = 5,800 (hand-computed; shares given as fractions here).
    expect(herfindahlHirschman([0.7, 0.3])).toBeCloseTo(5800, 9);
  });

  it('is 10,000 for a monopoly and 10,000/n for n equal segments (definition)', () => {
    expect(herfindahlHirschman([42])).toBeCloseTo(10000, 9);
    for (const n of [2, 5, 10, 100]) expect(herfindahlHirschman(new Array<number>(n).fill(3))).toBeCloseTo(10000 / n, 8);
  });

  it('bands follow the 2010 Horizontal Merger Guidelines §5.3: < 1,500, 1,500–2,500, > 2,500', () => {
    expect(hhiBand(1499.9)).toBe('unconcentrated');
    expect(hhiBand(1500)).toBe('moderately_concentrated');
    expect(hhiBand(2500)).toBe('moderately_concentrated');
    expect(hhiBand(2500.1)).toBe('highly_concentrated');
  });

  it('flags the 2023 Merger Guidelines line (HHI above 1,800)', () => {
    const r = concentration([{ key: 'a', value: 30 }, { key: 'b', value: 30 }, { key: 'c', value: 20 }, { key: 'd', value: 20 }]);
    expect(r.kind === 'ok' && r.highlyConcentrated2023).toBe(true);
    const flat = concentration(Array.from({ length: 10 }, (_, i) => ({ key: `s${i}`, value: 1 })));
    expect(flat.kind === 'ok' && flat.highlyConcentrated2023).toBe(false);
  });
});

describe('concentration on the Seattle weather record (share of days by weather category, vega-datasets)', () => {
  const days = loadSeattleWeather();
  // Expected values by a plain reduction over the raw rows.
  const counts = new Map<string, number>();
  for (const d of days) counts.set(d.weather, (counts.get(d.weather) ?? 0) + 1);
  const segments = [...counts].map(([key, value]) => ({ key, value }));
  const total = days.length;

  it('shares, Pareto order, count to 80%, top-2 share and HHI match the plain reduction', () => {
    const r = concentration(segments, { topN: 2 });
    if (r.kind !== 'ok') throw new Error(r.kind);
    expect(r.total).toBe(1461);
    // rain 641, sun 640, fog 101, drizzle 53, snow 26 days.
    expect(r.pareto.map((p) => p.key)).toEqual(['rain', 'sun', 'fog', 'drizzle', 'snow']);
    for (const p of r.pareto) expect(p.share).toBeCloseTo(counts.get(p.key)! / total, 14);
    expect(r.pareto.at(-1)!.cumulativeShare).toBe(1);
    // Rain and sun days are 1,281 of 1,461 (87.7%): two categories reach 80%.
    expect(r.countToThreshold).toBe(2);
    expect(r.topNShare).toBeCloseTo((641 + 640) / 1461, 14);
    let hhi = 0;
    for (const c of counts.values()) hhi += ((100 * c) / total) ** 2;
    expect(r.hhi).toBeCloseTo(hhi, 9);
    expect(r.band).toBe('highly_concentrated');
  });
});

describe('edge cases and properties', () => {
  it('negative values or a non-positive total come back as result kinds', () => {
    expect(concentration([{ key: 'a', value: 5 }, { key: 'b', value: -1 }])).toEqual({ kind: 'negative_values', total: 4, negativeKeys: ['b'] });
    expect(concentration([])).toEqual({ kind: 'non_positive_total', total: 0 });
    expect(concentration([{ key: 'a', value: 0 }])).toEqual({ kind: 'non_positive_total', total: 0 });
    expect(sharesOfTotal([1, -1, 2])).toBeNull();
    expect(herfindahlHirschman([0, 0])).toBeNull();
    expect(paretoCurve([{ key: 'x', value: -3 }])).toBeNull();
    expect(topNShare([], 3)).toBeNull();
  });

  it('zero segments are allowed and ties order by key', () => {
    const p = paretoCurve([{ key: 'b', value: 1 }, { key: 'z', value: 0 }, { key: 'a', value: 1 }])!;
    expect(p.map((r) => r.key)).toEqual(['a', 'b', 'z']);
    expect(p.map((r) => r.cumulativeShare)).toEqual([0.5, 1, 1]);
  });

  it('count to a threshold is exact at the boundary (hand-computed: 50 + 30 reaches 80%)', () => {
    expect(countToReachShare([30, 50, 20])).toBe(2);
    expect(countToReachShare([30, 50, 20], 0.81)).toBe(3);
  });

  it('property: shares sum to 1, HHI lies in [10,000/n, 10,000], top-N share grows with N', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: 0, max: 1e9, noNaN: true }), { minLength: 1, maxLength: 30 }), (values) => {
        const shares = sharesOfTotal(values);
        if (shares === null) {
          expect(values.every((v) => v === 0)).toBe(true);
          return;
        }
        expect(shares.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 9);
        const hhi = herfindahlHirschman(values)!;
        expect(hhi).toBeGreaterThanOrEqual(10000 / values.length - 1e-6);
        expect(hhi).toBeLessThanOrEqual(10000 + 1e-6);
        let last = 0;
        for (let n = 0; n <= values.length; n++) {
          const s = topNShare(values, n)!;
          expect(s).toBeGreaterThanOrEqual(last - 1e-12);
          last = s;
        }
        expect(last).toBeCloseTo(1, 9);
      }),
    );
  });
});
