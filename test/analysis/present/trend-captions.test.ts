// Titles, captions and chart specs of the trend-family presenters, from findings built here:
// exact numbers, wording by audience, and a fuzz that no text carries NaN, Infinity, undefined
// or a raw ISO date.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { BarsSpec, LineSpec, ParetoSpec, SeasonalProfileSpec } from '../../../analysis/charts/spec.js';
import type {
  CalendarMonthPattern,
  SegmentSharesFinding,
  SegmentTrendFinding,
  SegmentTrendOverviewFinding,
  TrendSeasonalityFinding,
  TrendSummaryFinding,
  TrendTestFinding,
  TrendWeekdayFinding,
} from '../../../analysis/findings/segments.js';
import { definitionOf } from '../../../analysis/sub-questions/registry.js';
import type { PresentContext } from '../../../analysis/present/presenter.js';
import { addMonths } from '../../../analysis/periods.js';
import type { Answer, Audience, Caveat, Finding, PeriodPoint, SubQuestion } from '../../../analysis/types.js';
import { exampleDataset } from '../../helpers/example-config.js';

const ctx = (audience: Audience): PresentContext => ({
  dataset: exampleDataset,
  locale: 'en-IE',
  audience,
  chart: { width: 1200, height: 675, scale: 1 },
  dataAsOf: '2025-06-18',
});
const sq = (over: Partial<SubQuestion>): SubQuestion => ({
  id: 'c',
  kind: 'trend',
  lens: 'time_pattern',
  template: 'trend_test',
  metrics: ['bookings'],
  grain: 'month',
  window: { start: '2022-01-01', end: '2025-01-01' },
  filters: [],
  ...over,
});
const answer = (q: SubQuestion, findings: Finding[], caveats: Caveat[] = []): Answer => ({ subQuestion: q, queries: [], tables: {}, findings, caveats });
const present = (a: Answer, audience: Audience) => definitionOf(a.subQuestion).present(a, ctx(audience));
const monthsFrom = (from: string, n: number) => Array.from({ length: n }, (_, i) => addMonths(from, i));
const STATS_WORDS = /p =|p <|Mann|τ|Sen's|HHI|z =/;

const points: PeriodPoint[] = monthsFrom('2022-01-01', 36).map((period, i) => ({ period, value: 4000 + 100 * i, partial: false }));
const series: Finding = { type: 'series', metric: 'bookings', grain: 'month', points };
const test: TrendTestFinding = {
  type: 'trend_test',
  metric: 'bookings',
  grain: 'month',
  n: 36,
  firstPeriod: '2022-01-01',
  lastPeriod: '2024-12-01',
  seasonallyAdjusted: true,
  s: 410,
  z: 5.5709,
  pValue: 2.53e-8,
  rawPValue: 0.19567,
  tau: 0.6508,
  alpha: 0.05,
  direction: 'up',
  slopePerPeriod: 15.3257,
  slopePerYear: 183.909,
  slopePerYearRelative: 0.037299,
  intercept: 4729.27,
  smallSample: false,
  byDecade: [],
};
const change: Finding = { type: 'change', metric: 'bookings', from: { period: '2023-07-01', value: 8449 }, to: { period: '2024-12-01', value: 4489 }, relative: -0.46869, absolute: -3960 };

describe('trend_test presenter', () => {
  const a = answer(sq({}), [series, test, change]);

  it('states the trend with its size in the title, for every audience', () => {
    for (const audience of ['leadership', 'managers', 'analysts'] as const) {
      expect(present(a, audience).title).toBe('Bookings show a rising trend of about 15.3 per month');
    }
  });

  it('analysts get the test, p-value, tau, Sen’s slope and the unadjusted p', () => {
    const c = present(a, 'analysts').caption;
    expect(c).toContain('Mann–Kendall on seasonally adjusted values, p < 0.001, τ = 0.65, n = 36 months, January 2022 to December 2024');
    expect(c).toContain("Sen's slope +15.3 per month, +184 a year (+3.7% of the mean level)");
    expect(c).toContain('On the unadjusted values the test gives p = 0.196.');
    expect(c).toContain('The peak was July 2023 at 8.45K; the latest complete month, December 2024, was 4.49K, 47% below it.');
  });

  it('leadership gets plain words and no test statistics; managers hear about the seasonal adjustment', () => {
    const lead = present(a, 'leadership').caption;
    expect(lead).toContain('Bookings are rising, by about 3.7% a year; this is unlikely to be chance.');
    expect(lead).not.toMatch(STATS_WORDS);
    const man = present(a, 'managers').caption;
    expect(man).toContain('Bookings rose by about 15.3 a month (+3.7% a year) from January 2022 to December 2024, after allowing for the usual seasonal pattern');
    expect(man).not.toMatch(STATS_WORDS);
  });

  it('draws Sen’s line as an overlay over the tested span', () => {
    const chart = present(a, 'managers').chart as LineSpec;
    expect(chart.kind).toBe('line');
    expect(chart.overlay?.label).toBe("Trend (Sen's slope)");
    chart.overlay!.values.forEach((v, i) => expect(v).toBeCloseTo(4729.27 + 15.3257 * i, 9));
  });

  it('says "no clear trend" when the test is not significant, and words a fall for a singular metric', () => {
    const none = answer(sq({}), [series, { ...test, direction: 'none', pValue: 0.4 }]);
    expect(present(none, 'analysts').title).toBe('Bookings: no clear trend from January 2022 to December 2024');
    expect(present(none, 'analysts').caption).toContain('No significant monotonic trend at the 5% level (Mann–Kendall on seasonally adjusted values, p = 0.400');
    expect(present(none, 'leadership').caption).toContain('could be chance');
    const down = answer(sq({ metrics: ['revenue'] }), [{ ...test, metric: 'revenue', direction: 'down', slopePerPeriod: -1234, slopePerYear: -14808 }]);
    expect(present(down, 'managers').title).toBe('Revenue shows a falling trend of about €1.23K per month');
  });
});

const monthsPattern: CalendarMonthPattern[] = [0.587, 0.581, 0.79, 0.907, 1.05, 1.26, 1.661, 1.607, 1.102, 0.876, 0.703, 0.876].map((index, k) => ({
  month: k + 1,
  index,
  min: index - 0.01,
  max: index + 0.02,
  highestIn: k === 6 ? 3 : 0,
  topTwoIn: k === 6 || k === 7 ? 3 : 0,
  lowestIn: k === 1 ? 2 : k === 0 ? 1 : 0,
  bottomTwoIn: k <= 1 ? 3 : 0,
}));
const seasonality: TrendSeasonalityFinding = {
  type: 'trend_seasonality',
  metric: 'bookings',
  model: 'multiplicative',
  firstPeriod: '2022-01-01',
  lastPeriod: '2025-05-01',
  months: monthsPattern,
  fullYears: [2022, 2023, 2024],
  rangeFromYear: 2022,
  rangeToYear: 2024,
  busiest: [7, 8],
  quietest: [2, 1],
};
const weekday: TrendWeekdayFinding = {
  type: 'trend_weekday',
  metric: 'bookings',
  additive: true,
  days: [0.946, 0.919, 0.926, 0.996, 1.093, 1.074, 1.048].map((index, i) => ({ isoDay: i + 1, value: 27000 + i, dayCount: 181, level: 150 * index, index, share: 1 / 7 })),
};

describe('a rate moves in points (issue 16)', () => {
  // A refund rate drifting up by 0.042 points a month (Sen's slope 0.00042 as a fraction): hand
  // arithmetic gives 0.504 points a year (12 × 0.042). Printed as "0.0%" before.
  const rateTest: TrendTestFinding = { ...test, metric: 'refund_rate', slopePerPeriod: 0.00042, slopePerYear: 0.00504, slopePerYearRelative: 0.084 };
  it('gives the slope in points per period and per year, never a percentage of the rate', () => {
    const a = answer(sq({ metrics: ['refund_rate'] }), [rateTest]);
    for (const audience of ['leadership', 'managers', 'analysts'] as const) {
      const p = present(a, audience);
      expect(p.title).toBe('Refund rate shows a rising trend of about 0.042 pts per month');
      expect(`${p.title} ${p.caption}`).not.toMatch(/\d%\s*(per|a) (month|year)/);
    }
    expect(present(a, 'managers').caption).toContain('rose by about 0.042 pts a month (+0.50 pts a year)');
    expect(present(a, 'analysts').caption).toContain("Sen's slope +0.042 pts per month, +0.50 pts a year");
    expect(present(a, 'leadership').caption).toContain('by about 0.50 pts a year');
    // A falling rate keeps its sign in points.
    const down = answer(sq({ metrics: ['refund_rate'] }), [{ ...rateTest, direction: 'down', slopePerPeriod: -0.0031, slopePerYear: -0.0372 }]);
    expect(present(down, 'analysts').caption).toContain("Sen's slope \u22120.31 pts per month, \u22123.7 pts a year");
  });
});

describe("a rate's latest period against its peak is in points (issue 16)", () => {
  // An on-time rate that peaked at 88.9% and stands at 79.6%: 88.9 − 79.6 = 9.3 points by hand
  // arithmetic. It had read "79.6%, 10% below it" (a percentage of the rate).
  it('says "9.3 pts below it", not a relative percentage', () => {
    const rateChange: Finding = { type: 'change', metric: 'refund_rate', from: { period: '2023-07-01', value: 0.889 }, to: { period: '2024-12-01', value: 0.796 }, relative: -0.10461, absolute: -0.093 };
    const c = present(answer(sq({ metrics: ['refund_rate'] }), [{ ...test, metric: 'refund_rate' }, rateChange]), 'analysts').caption;
    expect(c).toContain('the latest complete month, December 2024, was 79.6%, 9.3 pts below it.');
    expect(c).not.toMatch(/10% below/);
  });
  it('a temperature sits degrees below its peak, never a percentage of it (0 °C is no zero amount)', () => {
    // 25.3 °C at the peak, 11.9 °C now: 13.4 °C lower by hand arithmetic; "53% below it" before.
    const tempChange: Finding = { type: 'change', metric: 'temp_max', from: { period: '2023-07-01', value: 25.3 }, to: { period: '2024-12-01', value: 11.9 }, relative: -0.52964, absolute: -13.4 };
    // The demo catalog with a temperature metric added (an average in °C, as on a weather dataset).
    const base = exampleDataset.metrics.find((m) => m.name === 'average_fare')!;
    const dataset = { ...exampleDataset, metrics: [...exampleDataset.metrics, { ...base, name: 'temp_max', label: 'Daily high temperature', unit: 'number' as const, unit_label: '°C', decimals: 1 }] };
    const a = answer(sq({ metrics: ['temp_max'] }), [{ ...test, metric: 'temp_max' }, tempChange]);
    const c = definitionOf(a.subQuestion).present(a, { ...ctx('analysts'), dataset }).caption;
    expect(c).toContain('was 11.9\u00a0°C, 13.4\u00a0°C below it.');
    expect(c).not.toMatch(/53% below/);
  });
});

describe('seasonal index words follow the side of the average (issue 16)', () => {
  // An index of 0.97 is 3% below an average month (1 − 0.97), whichever place it holds in the ranking.
  const flat = [1.2, 1.1, 1.0, 0.99, 0.98, 0.975, 0.97, 0.96, 0.955, 0.95, 0.96, 0.96].map((index, k) => ({ ...monthsPattern[k]!, month: k + 1, index }));
  it('a second-busiest month below average is said to be below', () => {
    const f: TrendSeasonalityFinding = { ...seasonality, months: flat.map((m, k) => (k === 1 ? { ...m, index: 0.97 } : m)), busiest: [1, 2], quietest: [10, 9] };
    const a = answer(sq({ template: 'trend_seasonality' }), [f]);
    const managers = present(a, 'managers').caption;
    expect(managers).toContain('January (index 1.20) and February (0.97) run about 20% above an average month and about 3.0% below an average month respectively');
    expect(managers).not.toMatch(/3\.0% above/);
    expect(present(a, 'leadership').caption).toContain('January and February are about 20% above an average month and about 3.0% below an average month respectively');
  });

  it('names two days of the week that print the same as a tie', () => {
    const tied: TrendWeekdayFinding = { ...weekday, days: weekday.days.map((d) => (d.isoDay === 6 ? { ...d, index: 1.093 } : d.isoDay === 2 ? { ...d, index: 0.926 } : d)) };
    const a = answer(sq({ template: 'trend_seasonality' }), [seasonality, tied]);
    expect(present(a, 'managers').caption).toContain('By day of week, Friday and Saturday tie as the busiest (about 9.3% above an average day) and Tuesday and Wednesday tie as the quietest (about 7.4% below).');
  });
});

describe('trend_seasonality presenter', () => {
  it('titles the busiest months with the years they held', () => {
    const a = answer(sq({ template: 'trend_seasonality' }), [seasonality, weekday]);
    const p = present(a, 'managers');
    expect(p.title).toBe('July and August are the busiest months (top two in 3 of 3 full years)');
    expect(p.caption).toContain('July (index 1.66) and August (1.61) run about 66% and 61% above an average month; February (0.58) and January (0.59) are the quietest, about 42% and 41% below.');
    expect(p.caption).toContain('By day of week, Friday is the busiest (about 9.3% above an average day) and Tuesday the quietest (about 8.1% below).');
    const lead = present(a, 'leadership').caption;
    expect(lead).toContain('July and August are about 61–66% above an average month for bookings; January and February about 41–42% below.');
    expect(present(a, 'analysts').caption).toContain('July 1.66, range 1.65–1.68');
    const chart = p.chart as SeasonalProfileSpec;
    expect(chart.kind).toBe('seasonal_profile');
    expect(chart.rangeLabel).toBe('Range across 2022–2024');
    expect(chart.months[6]).toMatchObject({ label: 'Jul', index: 1.661, min: 1.651, max: 1.681, text: '1.66' });
  });

  it('says "highest" for a metric that is not a total, and falls back to weekday bars without two full years', () => {
    const avg = answer(sq({ template: 'trend_seasonality', metrics: ['average_fare'] }), [{ ...seasonality, metric: 'average_fare' }]);
    expect(present(avg, 'managers').title).toBe('Average fare per booking is highest in July and August (top two in 3 of 3 full years)');
    const short = answer(sq({ template: 'trend_seasonality' }), [series, weekday], [{ code: 'too_few_cycles', data: { metric: 'bookings', fullCycles: 1, required: 2, months: 18 } }]);
    const p = present(short, 'managers');
    expect(p.title).toBe('Bookings: too little history to measure seasonality');
    expect(p.caption).toContain('this period has 36 complete months');
    expect((p.chart as BarsSpec).bars).toHaveLength(7);
    expect(p.notes).toContain('Fewer than two full years of data: too little to measure seasonality.');
  });
});

describe('trend_summary presenter', () => {
  it('gives the mean in the title and the extremes with their periods', () => {
    const s: TrendSummaryFinding = { type: 'trend_summary', metric: 'bookings', grain: 'month', n: 41, min: 2654, max: 8449, mean: 4788.12, median: 4435, mode: null, modeCount: 0, sd: 1704.4, minPeriod: '2022-02-01', maxPeriod: '2023-07-01' };
    const a = answer(sq({ template: 'trend_summary' }), [series, s]);
    expect(present(a, 'managers').title).toBe('Bookings averaged 4.79K a month, from 2.65K to 8.45K');
    expect(present(a, 'managers').caption).toBe('Over 41 complete months, bookings averaged 4.79K a month (median 4.44K), from 2.65K (February 2022) to 8.45K (July 2023).');
    expect(present(a, 'analysts').caption).toContain('standard deviation 1.7K, no repeated value');
    const chart = present(a, 'managers').chart as LineSpec;
    expect(chart.overlay).toEqual({ label: 'Mean (4.79K)', values: points.map(() => 4788.12) });
  });
});

const trend = (segment: string | null, rank: number, total: number, cagr: number | null, other = false, members = 1): SegmentTrendFinding => ({
  type: 'segment_trend',
  metric: 'bookings',
  dimension: 'channel',
  grain: 'month',
  segment,
  other,
  members,
  rank,
  total,
  points,
  firstPeriod: '2022-01-01',
  seasonallyAdjusted: false,
  slopePerPeriod: 1,
  slopePerYear: 12,
  slopePerYearRelative: 0.01,
  growth: cagr === null ? null : { fromYear: 2022, toYear: 2024, from: 100, to: 100 * (1 + cagr) ** 2, relative: (1 + cagr) ** 2 - 1, cagr },
  peak: { period: '2023-07-01', value: 3000 },
});

describe('segment_trend presenter', () => {
  const overview: SegmentTrendOverviewFinding = { type: 'segment_trend_overview', metric: 'bookings', dimension: 'channel', grain: 'month', segmentCount: 12, folded: 4, fastest: { segment: 'app', measure: 'cagr', value: 0.10531 } };
  const a = answer(sq({ template: 'segment_trend', lens: 'breakdown', dimension: 'channel' }), [
    trend('web', 1, 86538, -0.05007),
    trend('app', 2, 81136, 0.10531),
    trend('phone', 3, 23070, -0.13098),
    trend(null, 9, 120000, null, true, 4),
    overview,
  ]);

  it('names the fastest-growing segment, with the slowest and the largest', () => {
    const p = present(a, 'managers');
    expect(p.title).toBe('App grew fastest: +10.5% a year from 2022 to 2024');
    expect(p.caption).toBe('Among booking channels, app grew fastest, +10.5% a year from 2022 to 2024. Phone shrank the most (−13.1% a year). Web is the largest, at 86.5K over the period.');
    expect(present(a, 'leadership').caption).toBe('App is growing fastest, about 11% a year. Web is the largest, at 86.5K over the period.');
    expect(present(a, 'analysts').caption).toContain('app: 81.1K, CAGR +10.5% 2022–2024, Sen\'s slope +1 per month');
  });

  it('bars draw each segment’s yearly growth, which the title is about (issue 17 item 9); the SQL fold stays last', () => {
    const withFold = answer(sq({ template: 'segment_trend', lens: 'breakdown', dimension: 'channel' }), [
      trend('web', 1, 86538, -0.05007),
      trend('app', 2, 81136, 0.10531),
      trend('phone', 3, 23070, -0.13098),
      trend(null, 9, 120000, 0.2, true, 4),
      overview,
    ]);
    const chart = present(withFold, 'managers').chart as BarsSpec;
    expect(chart.format.unit).toBe('percent');
    expect(chart.bars.map((b) => [b.label, b.text])).toEqual([
      ['app', '+10.5%'],
      ['web', '−5.0%'],
      ['phone', '−13.1%'],
      ['All others (4)', '+20.0%'],
    ]);
    expect(chart.bars.at(-1)!.other).toBe(true);
    expect(chart.subtitle).toMatch(/^growth a year, 2022 to 2024 \(full calendar years\) · /);
  });

  it('names no single fastest segment on a lead under a percentage point', () => {
    const close = answer(sq({ template: 'segment_trend', lens: 'breakdown', dimension: 'channel' }), [
      trend('web', 1, 86538, 0.1003),
      trend('app', 2, 81136, 0.10531),
      trend('phone', 3, 23070, -0.13098),
      { ...overview, runnerUp: { segment: 'web', value: 0.1003 } },
    ]);
    const p = present(close, 'managers');
    expect(p.title).toBe('App and web grew at about the same pace: +10.5% and +10.0% a year from 2022 to 2024');
    expect(p.caption).toContain('too close to name one');
    // With a clear lead (10.5% against 5%), the fastest is named.
    expect(present(answer(sq({ template: 'segment_trend', lens: 'breakdown', dimension: 'channel' }), [trend('web', 1, 86538, 0.05), trend('app', 2, 81136, 0.10531), { ...overview, runnerUp: { segment: 'web', value: 0.05 } }]), 'managers').title).toBe(
      'App grew fastest: +10.5% a year from 2022 to 2024',
    );
  });
});

const shares = (rows: SegmentSharesFinding['rows'], over: Partial<SegmentSharesFinding> = {}): SegmentSharesFinding => ({
  type: 'segment_shares',
  metric: 'revenue',
  dimension: 'route',
  additive: true,
  total: 7547992.16,
  segmentCount: rows.length,
  folded: 0,
  rows,
  threshold: 0.8,
  countToThreshold: 3,
  topN: 3,
  topNShare: 0.85208,
  hhi: 2882.5,
  hhiBand: 'highly_concentrated',
  ...over,
});
const routeRows = [
  ['Mainland–Tern Holm', 3011793.76, 0.39902, 0.39902],
  ['Mainland–Saltreach', 2359779.85, 0.31264, 0.71166],
  ['Mainland–Kelpie Sound', 1059885.49, 0.14042, 0.85208],
  ['Mainland–Dunlin Quay', 692638.94, 0.09176, 0.94384],
  ['Tern Holm–Saltreach', 423894.12, 0.05616, 1],
].map(([segment, value, share, cumulativeShare], i) => ({ segment: segment as string, other: false, members: 1, rank: i + 1, value: value as number, share: share as number, cumulativeShare: cumulativeShare as number }));

describe('segment_shares presenter', () => {
  const a = answer(sq({ template: 'segment_shares', lens: 'distribution', dimension: 'route', metrics: ['revenue'] }), [shares(routeRows)]);

  it('titles the fewest routes carrying half of revenue; words vary by audience', () => {
    expect(present(a, 'managers').title).toBe('Two routes carry 71% of revenue');
    expect(present(a, 'managers').caption).toBe('Mainland–Tern Holm (39.9%) and Mainland–Saltreach (31.3%) together carry 71.2% of revenue; three routes reach 80% of revenue, together 85.2% (the 80% mark is a common rule of thumb, not a law).');
    expect(present(a, 'leadership').caption).toBe('Two routes carry about 71% of revenue; three routes carry over 80%.');
    expect(present(a, 'leadership').caption).not.toMatch(STATS_WORDS);
    expect(present(a, 'analysts').caption).toContain('HHI 2,883 (highly concentrated by the 2010 US Horizontal Merger Guidelines bands); top 3 share 85.2%.');
  });

  it('draws a Pareto chart with the 80% mark at the third route', () => {
    const chart = present(a, 'managers').chart as ParetoSpec;
    expect(chart.kind).toBe('pareto');
    expect(chart.thresholdIndex).toBe(2);
    expect(chart.bars.map((b) => b.cumulativeText)).toEqual(['40%', '71%', '85%', '94%', '100%']);
  });

  it('keeps the SQL fold last in the Pareto, with running shares recomputed in that order', () => {
    const rows = [
      { segment: 'a', other: false, members: 1, rank: 1, value: 300, share: 0.3, cumulativeShare: 0.3 },
      { segment: 'b', other: false, members: 1, rank: 2, value: 100, share: 0.1, cumulativeShare: 0.4 },
      { segment: null, other: true, members: 40, rank: 3, value: 600, share: 0.6, cumulativeShare: 1 },
    ];
    const folded = answer(a.subQuestion, [shares(rows, { folded: 40, segmentCount: 42, countToThreshold: null, total: 1000 })]);
    const chart = present(folded, 'managers').chart as ParetoSpec;
    expect(chart.bars.map((b) => b.label)).toEqual(['a', 'b', 'All others (40)']);
    expect(chart.bars.map((b) => b.cumulative)).toEqual([0.3, 0.4, 1]);
    expect(chart.bars[2]!.other).toBe(true);
    expect(chart.thresholdIndex).toBe(2);
    expect(present(folded, 'managers').title).toBe('Routes are spread out: the largest carries 30% of revenue');
  });

  it('says shares do not apply to an average, and shows the values as bars', () => {
    const avgRows = routeRows.map((r, i) => ({ ...r, value: [42.79, 39.05, 35.14, 33.21, 23.33][i]!, share: null, cumulativeShare: null }));
    const avg = answer(sq({ template: 'segment_shares', dimension: 'route', metrics: ['average_fare'] }), [shares(avgRows, { metric: 'average_fare', additive: false, total: null, countToThreshold: null, topNShare: null, hhi: null, hhiBand: null })]);
    const p = present(avg, 'managers');
    expect(p.title).toBe('Average fare per booking is highest for Mainland–Tern Holm (€42.79)');
    // Said as the config's choice, naming the catalog's own sum of the same column.
    expect(p.caption).toContain('Shares do not apply here: average fare per booking is set up in the config as an average per row, not as a total that splits across routes (Revenue, set up as sum: fare_total, would).');
    expect(p.chart?.kind).toBe('bars');
  });
});

describe('no presenter text carries NaN, Infinity, undefined or a raw ISO date (fuzz)', () => {
  const BAD = /NaN|Infinity|undefined|\d{4}-\d{2}-\d{2}|null/;
  const num = fc.double({ min: -1e12, max: 1e12, noNaN: true, noDefaultInfinity: true });
  const pos = fc.double({ min: 0, max: 1e9, noNaN: true, noDefaultInfinity: true });
  const unit = fc.double({ min: 0, max: 1, noNaN: true });
  const period = fc.integer({ min: 0, max: 200 }).map((i) => addMonths('2010-01-01', i));
  const maybe = <T>(a: fc.Arbitrary<T>) => fc.option(a, { nil: null });

  const testF = fc.record({
    n: fc.integer({ min: 3, max: 500 }),
    s: fc.integer({ min: -1000, max: 1000 }),
    z: num,
    pValue: unit,
    rawPValue: unit,
    tau: maybe(fc.double({ min: -1, max: 1, noNaN: true })),
    direction: fc.constantFrom('up', 'down', 'none'),
    slopePerPeriod: num,
    slopePerYear: num,
    slopePerYearRelative: maybe(num),
    intercept: num,
    seasonallyAdjusted: fc.boolean(),
    firstPeriod: period,
    lastPeriod: period,
  });
  const monthsArb = fc.array(fc.record({ index: pos, min: maybe(pos), max: maybe(pos), topTwoIn: fc.nat(5), bottomTwoIn: fc.nat(5) }), { minLength: 12, maxLength: 12 });
  const segRows = fc.array(fc.record({ segment: maybe(fc.constantFrom('app', 'web', 'Mainland–Tern Holm', 'kiosk', '')), value: maybe(pos), share: maybe(unit) }), { minLength: 1, maxLength: 10 });

  it('holds for random findings across all five presenters and three audiences', () => {
    fc.assert(
      fc.property(testF, monthsArb, segRows, fc.array(maybe(num), { minLength: 1, maxLength: 30 }), fc.constantFrom<Audience>('leadership', 'managers', 'analysts'), (t, ms, rows, values, audience) => {
        const pts = values.map((value, i) => ({ period: addMonths('2020-01-01', i), value, partial: i === values.length - 1 }));
        const ser: Finding = { type: 'series', metric: 'bookings', grain: 'month', points: pts };
        const tf: TrendTestFinding = { type: 'trend_test', metric: 'bookings', grain: 'month', alpha: 0.05, smallSample: t.n < 10, ...t } as TrendTestFinding;
        const busiest = [...ms.keys()].sort((x, y) => ms[y]!.index - ms[x]!.index);
        const sf: TrendSeasonalityFinding = {
          ...seasonality,
          months: ms.map((m, k) => ({ month: k + 1, highestIn: 0, lowestIn: 0, ...m })),
          busiest: [busiest[0]! + 1, busiest[1]! + 1],
          quietest: [busiest[11]! + 1, busiest[10]! + 1],
        };
        let run = 0;
        const shareRows = rows.map((r, i) => {
          run += r.share ?? 0;
          return { segment: r.segment, other: i === rows.length - 1 && rows.length > 3, members: 3, rank: i + 1, value: r.value, share: r.share, cumulativeShare: r.share === null ? null : run };
        });
        const sums = values.filter((v): v is number => v !== null);
        const answers = [
          answer(sq({}), [ser, tf, change]),
          answer(sq({ template: 'trend_seasonality' }), [ser, sf, weekday]),
          answer(sq({ template: 'trend_summary' }), [
            ser,
            ...(sums.length ? [{ type: 'trend_summary', metric: 'bookings', grain: 'month', n: sums.length, min: Math.min(...sums), max: Math.max(...sums), mean: sums[0]!, median: sums[0]!, mode: null, modeCount: 0, sd: sums.length > 1 ? 1 : null, minPeriod: pts[0]!.period, maxPeriod: pts[0]!.period } as TrendSummaryFinding] : []),
          ]),
          answer(sq({ template: 'segment_trend', dimension: 'channel' }), [
            ...shareRows.map((r, i) => ({ ...trend(r.segment, i + 1, r.value ?? 0, t.slopePerYearRelative, r.other, 3), slopePerYearRelative: t.slopePerYearRelative })),
            { type: 'segment_trend_overview', metric: 'bookings', dimension: 'channel', grain: 'month', segmentCount: rows.length, folded: 3, fastest: t.slopePerYearRelative === null ? null : { segment: shareRows[0]!.segment, measure: 'slope', value: t.slopePerYearRelative } } as SegmentTrendOverviewFinding,
          ]),
          answer(sq({ template: 'segment_shares', dimension: 'route', metrics: ['revenue'] }), [
            shares(shareRows.map((r) => ({ ...r })), { countToThreshold: rows.length > 2 ? 2 : null, hhi: t.intercept, total: 1 }),
          ]),
        ];
        for (const a of answers) {
          const p = present(a, audience);
          const texts = [p.title, p.caption, ...p.notes];
          if (p.chart) texts.push(p.chart.title, p.chart.subtitle, ...p.chart.footer);
          if (p.chart && 'bars' in p.chart) texts.push(...p.chart.bars.map((b) => `${b.label} ${b.text}`));
          for (const text of texts) expect(text).not.toMatch(BAD);
        }
      }),
      { numRuns: 300 },
    );
  });
});
