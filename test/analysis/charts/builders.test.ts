// Chart builders are pure: inputs in, plain-data spec out. Checked by rule and by stored spec.
import { describe, expect, it } from 'vitest';
import { buildBars, foldTail } from '../../../analysis/charts/build-bars.js';
import { formatTick } from '../../../analysis/charts/chartjs.js';
import { barColour, roundTicks } from '../../../analysis/charts/draw-bars.js';
import { niceAxis } from '../../../analysis/charts/draw-group-compare.js';
import { alignedScale } from '../../../analysis/charts/draw-pareto.js';
import { SENTIMENT } from '../../../analysis/charts/theme.js';
import { buildGroupCompare } from '../../../analysis/charts/build-group-compare.js';
import { buildGrowthGrid, colourDomain } from '../../../analysis/charts/build-growth-grid.js';
import { buildKpiCard } from '../../../analysis/charts/build-kpi-card.js';
import { buildLine, periodIndexOf } from '../../../analysis/charts/build-line.js';
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

describe('upstream folds (a remainder folded in SQL)', () => {
  const items = [
    { label: 'A', value: 10 },
    { label: 'C', value: 30 },
    { label: 'B', value: 20 },
  ];

  it('bars: keeps the fold last and "other" whatever its size, folds nothing else', () => {
    const spec = buildBars({ ...header('t', 's'), items, folded: { label: 'All others (5)', value: 100 }, format: EUR, topN: 1 });
    expect(spec.bars.map((b) => [b.label, b.other])).toEqual([
      ['C', false],
      ['B', false],
      ['A', false],
      ['All others (5)', true],
    ]);
    // null: folded upstream with nothing left over; still nothing folded here despite topN 1.
    expect(buildBars({ ...header('t', 's'), items, folded: null, format: EUR, topN: 1 }).bars.map((b) => b.label)).toEqual(['C', 'B', 'A']);
  });

  it('Pareto: running shares in that order, reaching 100% at the fold', () => {
    const spec = buildPareto({ ...header('t', 's'), items, folded: { label: 'All others (5)', value: 40 }, format: EUR, valueLabel: 'Revenue' });
    expect(spec.bars.map((b) => b.label)).toEqual(['C', 'B', 'A', 'All others (5)']);
    // Total 100: 30, 50, 60, 100.
    expect(spec.bars.map((b) => b.cumulativeText)).toEqual(['30%', '50%', '60%', '100%']);
    expect(spec.bars.map((b) => b.other)).toEqual([false, false, false, true]);
    expect(spec.thresholdIndex).toBe(3);
  });

  it('bars: sign colours and signed texts only when asked', () => {
    const changes = [
      { label: 'up', value: 1200 },
      { label: 'down', value: -800 },
    ];
    const plain = buildBars({ ...header('t', 's'), items: changes, format: EUR });
    expect(plain.higherIsBetter).toBeUndefined();
    expect(plain.bars.map((b) => b.text)).toEqual(['€1.2K', '−€800']);
    const signed = buildBars({ ...header('t', 's'), items: changes, format: EUR, signed: true, higherIsBetter: false });
    expect(signed.higherIsBetter).toBe(false);
    expect(signed.bars.map((b) => b.text)).toEqual(['+€1.2K', '−€800']);
    // Lower is better: the rise is the bad colour, the fall the good one.
    expect(signed.bars.map((b) => barColour(b, signed.higherIsBetter))).toEqual([SENTIMENT.bad, SENTIMENT.good]);
  });
});

describe('axis helpers', () => {
  it('Pareto value axis: as many round steps as the share axis, hugging the tallest bar', () => {
    // 3.26M: 4 × 1M (25% steps) beats 5 × 1M; 9M: 5 × 2M = 10M ties 4 × 2.5M, the first (20% steps) kept.
    expect(alignedScale([3_260_000, 100])).toEqual({ max: 4_000_000, step: 1_000_000, intervals: 4 });
    expect(alignedScale([9_000_000])).toEqual({ max: 10_000_000, step: 2_000_000, intervals: 5 });
    expect(alignedScale([347_000])).toEqual({ max: 400_000, step: 100_000, intervals: 4 });
    expect(alignedScale([5, -1])).toBeNull();
    expect(alignedScale([0])).toBeNull();
  });

  it('axis labels: the fewest decimals that show every tick exactly, the same on all ticks', () => {
    const pct = { unit: 'percent' as const, decimals: 1, locale: LOCALE };
    expect([0, 0.2, 0.4].map((v, _i, all) => formatTick(v, all, pct))).toEqual(['0%', '20%', '40%']);
    expect([0, 0.025, 0.05].map((v, _i, all) => formatTick(v, all, pct))).toEqual(['0.0%', '2.5%', '5.0%']);
    expect([-0.1, 0, 0.1].map((v, _i, all) => formatTick(v, all, pct))).toEqual(['−10%', '0%', '10%']);
    const fare = { ...EUR, decimals: 2 };
    expect([19, 19.5, 20].map((v, _i, all) => formatTick(v, all, fare))).toEqual(['€19.00', '€19.50', '€20.00']);
    expect([19, 20, 21].map((v, _i, all) => formatTick(v, all, fare))).toEqual(['€19', '€20', '€21']);
    expect([0, 2_500_000, 5_000_000].map((v, _i, all) => formatTick(v, all, EUR))).toEqual(['€0', '€2.5M', '€5M']);
    expect([0, 0.5, 1, 1.5].map((v, _i, all) => formatTick(v, all, { unit: 'number', locale: LOCALE }))).toEqual(['0.0', '0.5', '1.0', '1.5']);
  });

  it('group comparison axis: a round maximum on whole round steps, just past the data', () => {
    // 99,609 bookings × 1.04 = 103,593: six steps of 20K end at 120K (not 50K steps with a stray 120K).
    expect(niceAxis(103_593)).toEqual({ max: 120_000, step: 20_000, intervals: 6 });
    expect(niceAxis(4.51)).toEqual({ max: 5, step: 1, intervals: 5 });
    expect(niceAxis(0)).toEqual({ max: 1, step: 0.2, intervals: 5 });
  });

  it('bars both sides of zero: round ticks inside the range, zero among them', () => {
    expect(roundTicks(-24_100, 32_900)).toEqual([-20_000, -10_000, 0, 10_000, 20_000, 30_000]);
    // 0.35 / 6 ≈ 0.058 rounds up to a step of 0.1, with no float noise in the values.
    expect(roundTicks(-0.3, 0.05)).toEqual([-0.3, -0.2, -0.1, 0]);
    // 8 / 6 ≈ 1.33 rounds up to 2; 1 is not a multiple of 2, so the last tick is 0.
    expect(roundTicks(-7, 1)).toEqual([-6, -4, -2, 0]);
  });
});

describe('line events', () => {
  const points = ['2023-02-01', '2023-03-01', '2023-04-01', '2023-05-01'].map((period, i) => ({ period, value: i, partial: false }));

  it('finds the period a date falls in, or none outside the points', () => {
    expect(periodIndexOf(points, '2023-04-01', 'month')).toBe(2);
    expect(periodIndexOf(points, '2023-04-17', 'month')).toBe(2);
    expect(periodIndexOf(points, '2023-05-31', 'month')).toBe(3);
    expect(periodIndexOf(points, '2023-06-01', 'month')).toBeNull();
    expect(periodIndexOf(points, '2023-01-31', 'month')).toBeNull();
  });

  it('keeps events that point at a period and have a label', () => {
    const spec = buildLine({
      ...header('t', 's'),
      seriesLabel: 'x',
      grain: 'month',
      points,
      format: EUR,
      events: [
        { index: 2, label: ' Launch ' },
        { index: 9, label: 'outside' },
        { index: 1, label: ' ' },
      ],
    });
    expect(spec.events).toEqual([{ index: 2, label: 'Launch' }]);
    expect(buildLine({ ...header('t', 's'), seriesLabel: 'x', grain: 'month', points, format: EUR }).events).toBeUndefined();
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
  it('lays cells out as year rows by month columns: n/a without a base, blank where no month was given', () => {
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
    expect(spec.rows[1]!.texts.slice(0, 3)).toEqual(['+10.0%', '', 'n/a']);
    expect(spec.rows[1]!.states.slice(0, 3)).toEqual(['value', 'no_data', 'not_comparable']);
  });

  it('marks partial months hatched and never coloured, months after the data blank', () => {
    const spec = buildGrowthGrid({
      ...header('t', 's'),
      cells: [
        { period: '2025-04-01', change: -0.02 },
        // A partial month's change (half a month against a whole one) is dropped, not coloured.
        { period: '2025-05-01', change: -0.4, state: 'partial' },
        { period: '2025-06-01', change: null, state: 'no_data' },
        // A year with nothing but "no data" gets no row at all.
        { period: '2026-01-01', change: null, state: 'no_data' },
      ],
      higherIsBetter: true,
      locale: LOCALE,
    });
    expect(spec.rows.map((r) => r.label)).toEqual(['2025']);
    const row = spec.rows[0]!;
    expect(row.states.slice(2, 7)).toEqual(['no_data', 'value', 'partial', 'no_data', 'no_data']);
    expect(row.texts.slice(2, 7)).toEqual(['', '−2.0%', 'partial', '', '']);
    expect(row.cells[4]).toBeNull();
    // The colour scale ignores the dropped partial change: only −2% is left, so the narrowest domain.
    expect(spec.domain).toBe(0.02);
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
    // The year earlier first (issue 17 item 8), then the month before.
    expect(spec.comparisons[1]).toEqual({
      label: 'vs April 2025',
      changeText: '+1.0 pts',
      baseText: '4.0%',
      direction: 'up',
      sentiment: 'bad',
    });
    expect(spec.comparisons[0]).toMatchObject({ label: 'vs May 2024', changeText: 'n/a', direction: 'none', sentiment: 'neutral' });
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
      ['+25.0%', 'up', 'good'],
      ['0.0%', 'flat', 'neutral'],
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
      flow: true,
    });
    expect(spec.months).toHaveLength(12);
    expect(spec.months[7]).toEqual({ label: 'Aug', index: 1.5, min: 1.4, max: 1.6, text: '1.50' });
    expect(spec.months[0]).toEqual({ label: 'Jan', index: null, min: null, max: null, text: 'n/a' });
    expect(spec.reference).toBe(1);
  });
});
