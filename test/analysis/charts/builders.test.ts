// Chart builders are pure: inputs in, plain-data spec out. Checked by rule and by stored spec.
import { describe, expect, it } from 'vitest';
import { buildBars, foldTail } from '../../../analysis/charts/build-bars.js';
import { buildGroupCompare } from '../../../analysis/charts/build-group-compare.js';
import { buildGrowthGrid, colourDomain } from '../../../analysis/charts/build-growth-grid.js';
import { buildKpiCard } from '../../../analysis/charts/build-kpi-card.js';
import { buildLine } from '../../../analysis/charts/build-line.js';
import { buildPareto } from '../../../analysis/charts/build-pareto.js';
import { buildSeasonalProfile } from '../../../analysis/charts/build-seasonal-profile.js';
import { CHART_KINDS } from '../../../analysis/charts/spec.js';
import { allSamples, EUR, header, LOCALE, monthlyRevenue } from './samples.js';
import { checkSnapshot } from './snapshot.js';

describe('spec snapshots', () => {
  const samples = allSamples();
  it('covers every chart kind', () => {
    expect(new Set(Object.values(samples).map((s) => s.kind))).toEqual(new Set(CHART_KINDS));
  });
  for (const [name, spec] of Object.entries(samples)) {
    it(`${name} matches expected/${name}.json`, () => {
      const outcome = checkSnapshot(name, spec);
      expect(outcome.ok, outcome.message).toBe(true);
    });
  }
  it('specs are plain data: JSON round-trips them unchanged', () => {
    for (const spec of Object.values(samples)) expect(JSON.parse(JSON.stringify(spec))).toEqual(spec);
  });
});

describe('buildLine', () => {
  it('marks the highest and lowest complete periods with value and period', () => {
    const points = monthlyRevenue();
    const spec = buildLine({ ...header('t', 's'), seriesLabel: 'Revenue', grain: 'month', points, format: EUR });
    const complete = points.map((p, i) => ({ v: p.value!, i, partial: p.partial })).filter((p) => !p.partial);
    const max = complete.reduce((a, b) => (b.v > a.v ? b : a));
    const min = complete.reduce((a, b) => (b.v < a.v ? b : a));
    expect(spec.marks).toEqual([
      { role: 'high', index: max.i, text: expect.stringMatching(/^High: €\d\.\d\dM, \w+ \d{4}$/) },
      { role: 'low', index: min.i, text: expect.stringMatching(/^Low: €\d{3}K, \w+ \d{4}$/) },
    ]);
    expect(spec.points[0]!.label).toBe('Jan 2022');
  });

  it('never calls an unfinished last period the low', () => {
    const points = [
      { period: '2025-03-01', value: 100, partial: false },
      { period: '2025-04-01', value: 120, partial: false },
      { period: '2025-05-01', value: 110, partial: false },
      { period: '2025-06-01', value: 40, partial: true },
    ];
    const spec = buildLine({ ...header('t', 's'), seriesLabel: 'x', grain: 'month', points, format: EUR });
    expect(spec.marks.map((m) => [m.role, m.index])).toEqual([
      ['high', 1],
      ['low', 0],
    ]);
  });

  it('has no marks for a flat or single-point series, and turns non-finite values into gaps', () => {
    const flat = [1, 2, 3].map((m) => ({ period: `2024-0${m}-01`, value: 5, partial: false }));
    expect(buildLine({ ...header('t', 's'), seriesLabel: 'x', grain: 'month', points: flat, format: EUR }).marks).toEqual([]);
    const odd = [
      { period: '2024-01-01', value: Number.NaN, partial: false },
      { period: '2024-02-01', value: 3, partial: false },
    ];
    const spec = buildLine({ ...header('t', 's'), seriesLabel: 'x', grain: 'month', points: odd, format: EUR });
    expect(spec.points[0]!.value).toBeNull();
    expect(spec.marks).toEqual([]);
  });

  it('aligns the overlay with the points by index', () => {
    const points = [1, 2, 3].map((m) => ({ period: `2024-0${m}-01`, value: m, partial: false }));
    const spec = buildLine({
      ...header('t', 's'),
      seriesLabel: 'x',
      grain: 'month',
      points,
      format: EUR,
      overlay: { label: 'Last year', values: [5, Number.POSITIVE_INFINITY] },
    });
    expect(spec.overlay).toEqual({ label: 'Last year', values: [5, null, null] });
  });
});

describe('buildBars and foldTail', () => {
  const items = 'abcdefghijkl'.split('').map((label, i) => ({ label, value: (i * 7) % 12 }));

  it('sorts descending and folds everything past the top N into "All others (k)"', () => {
    const spec = buildBars({ ...header('t', 's'), items, format: EUR, topN: 5 });
    expect(spec.bars).toHaveLength(6);
    const values = spec.bars.slice(0, 5).map((b) => b.value);
    expect(values).toEqual([...values].sort((a, b) => b - a));
    const other = spec.bars[5]!;
    expect(other).toMatchObject({ label: 'All others (7)', other: true });
    const total = items.reduce((s, i) => s + i.value, 0);
    expect(spec.bars.reduce((s, b) => s + b.value, 0)).toBe(total);
  });

  it('does not fold a tail of one', () => {
    expect(foldTail(items.slice(0, 6), 5, 'All others').every((s) => !s.other)).toBe(true);
  });

  it('breaks ties by label so the order is stable', () => {
    const tied = foldTail([{ label: 'b', value: 1 }, { label: 'a', value: 1 }], 5, 'x');
    expect(tied.map((t) => t.label)).toEqual(['a', 'b']);
  });
});

describe('buildPareto', () => {
  it('computes shares, the running share and the first bar reaching 80%', () => {
    const spec = buildPareto({
      ...header('t', 's'),
      items: [
        { label: 'C', value: 10 },
        { label: 'A', value: 50 },
        { label: 'B', value: 30 },
        { label: 'D', value: 10 },
      ],
      format: EUR,
      valueLabel: 'Revenue',
    });
    expect(spec.bars.map((b) => b.label)).toEqual(['A', 'B', 'C', 'D']);
    expect(spec.bars.map((b) => b.cumulative)).toEqual([0.5, 0.8, 0.9, 1]);
    expect(spec.bars.map((b) => b.cumulativeText)).toEqual(['50%', '80%', '90%', '100%']);
    expect(spec.thresholdIndex).toBe(1);
  });

  it('handles an all-zero total without NaN', () => {
    const spec = buildPareto({ ...header('t', 's'), items: [{ label: 'A', value: 0 }], format: EUR, valueLabel: 'x' });
    expect(spec.bars[0]).toMatchObject({ share: 0, cumulative: 0 });
    expect(spec.thresholdIndex).toBe(-1);
  });
});

describe('buildGrowthGrid', () => {
  it('lays cells out as year rows by month columns, n/a where missing', () => {
    const spec = buildGrowthGrid({
      ...header('t', 's'),
      cells: [
        { period: '2024-01-01', change: 0.1 },
        { period: '2023-12-01', change: -0.05 },
        { period: '2024-03-01', change: null },
      ],
      higherIsBetter: true,
      locale: LOCALE,
    });
    expect(spec.rows.map((r) => r.label)).toEqual(['2023', '2024']);
    expect(spec.columns[0]).toBe('Jan');
    expect(spec.rows[0]!.cells[11]).toBe(-0.05);
    expect(spec.rows[1]!.texts.slice(0, 3)).toEqual(['+10.0%', 'n/a', 'n/a']);
  });

  it('picks a round colour domain from the 90th percentile, so one outlier does not wash out the rest', () => {
    const values = [...Array.from({ length: 20 }, (_, i) => (i % 2 ? 0.04 : -0.03)), 3];
    expect(colourDomain(values)).toBe(0.05);
    expect(colourDomain([])).toBe(0.05);
  });
});

describe('buildKpiCard', () => {
  const base = {
    ...header('t', 's'),
    metricLabel: 'Refund share',
    grain: 'month' as const,
    current: { period: '2025-05-01', value: 0.05 },
    previous: { period: '2025-04-01', value: 0.04 },
    lastYear: { period: '2024-05-01', value: null },
  };

  it('colours a rise as bad when lower is better, and compares rates in percentage points', () => {
    const spec = buildKpiCard({ ...base, format: { unit: 'percent', locale: LOCALE }, higherIsBetter: false });
    expect(spec.valueText).toBe('5.0%');
    expect(spec.periodText).toBe('May 2025');
    expect(spec.comparisons[0]).toEqual({
      label: 'vs April 2025',
      changeText: '+1.0 pp',
      baseText: '4.0%',
      direction: 'up',
      sentiment: 'bad',
    });
    expect(spec.comparisons[1]).toMatchObject({ changeText: 'n/a', direction: 'none', sentiment: 'neutral' });
  });

  it('uses relative change for other units and calls a tiny change flat', () => {
    const spec = buildKpiCard({
      ...base,
      format: EUR,
      higherIsBetter: true,
      current: { period: '2025-05-01', value: 100.01 },
      previous: { period: '2025-04-01', value: 100 },
      lastYear: { period: '2024-05-01', value: 80 },
    });
    expect(spec.comparisons.map((c) => [c.changeText, c.direction, c.sentiment])).toEqual([
      ['0.0%', 'flat', 'neutral'],
      ['+25.0%', 'up', 'good'],
    ]);
  });
});

describe('buildGroupCompare', () => {
  it('writes estimate, interval and n texts, widening decimals until the interval ends differ', () => {
    const spec = buildGroupCompare({
      ...header('t', 's'),
      groups: [{ label: 'Pass', estimate: 3.9, low: 3.86, high: 3.94, n: 27450 }],
      format: { unit: 'number', decimals: 1, locale: LOCALE },
      valueLabel: 'Bookings per customer',
    });
    expect(spec.groups[0]).toMatchObject({ estimateText: '3.9', intervalText: '95% CI 3.86 – 3.94', nText: 'n = 27,450' });
  });
});

describe('buildSeasonalProfile', () => {
  it('orders months Jan–Dec and leaves missing months empty', () => {
    const spec = buildSeasonalProfile({
      ...header('t', 's'),
      months: [{ month: 8, index: 1.5, min: 1.4, max: 1.6 }],
      locale: LOCALE,
      rangeLabel: 'Range',
    });
    expect(spec.months).toHaveLength(12);
    expect(spec.months[7]).toEqual({ label: 'Aug', index: 1.5, min: 1.4, max: 1.6, text: '1.50' });
    expect(spec.months[0]).toEqual({ label: 'Jan', index: null, min: null, max: null, text: 'n/a' });
    expect(spec.reference).toBe(1);
  });
});
