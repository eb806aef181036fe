// Performance presenters: captions written from findings built here (exact numbers, wording by
// audience), chart specs, and a fast-check fuzz that no text carries NaN, Infinity, "undefined"
// or a raw ISO date, whatever the result tables hold.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { PerformanceFinding } from '../../../analysis/findings/performance.js';
import { definitionOf, SUB_QUESTIONS, type TemplateName } from '../../../analysis/sub-questions/registry.js';
import type { PresentContext, Presented } from '../../../analysis/present/presenter.js';
import type { Answer, Audience, Caveat, CellValue, Finding, ResultTable, SubQuestion } from '../../../analysis/types.js';
import { exampleDataset } from '../../helpers/example-config.js';

const ctxFor = (audience: Audience): PresentContext => ({
  dataset: exampleDataset,
  locale: 'en-IE',
  audience,
  chart: { width: 1200, height: 675, scale: 1 },
  dataAsOf: '2025-06-18',
});

function sq(template: TemplateName, extra: Partial<SubQuestion> = {}): SubQuestion {
  return {
    id: template,
    kind: 'performance',
    lens: 'summary',
    template,
    metrics: ['average_fare'],
    grain: 'month',
    window: { start: '2022-01-01', end: '2025-06-19' },
    filters: [],
    comparisonGroup: 'skerrypass',
    ...extra,
  };
}

function answer(q: SubQuestion, findings: PerformanceFinding[], caveats: Caveat[] = [{ code: 'observational', data: { group: 'skerrypass' } }]): Answer {
  return { subQuestion: q, queries: [], tables: {}, findings, caveats };
}

const present = (a: Answer, audience: Audience): Presented => definitionOf(a.subQuestion).present(a, ctxFor(audience));

const WINDOW: PerformanceFinding = { type: 'performance_window', group: 'skerrypass', start: '2023-04-01', end: '2025-06-19', launchDate: '2023-04-01', clippedToLaunch: true };

const group = (role: 'members' | 'others', n: number, estimate: number, low: number, high: number, extra: Partial<Extract<PerformanceFinding, { type: 'performance_group' }>> = {}): PerformanceFinding => ({
  type: 'performance_group',
  metric: 'average_fare',
  group: role,
  measure: 'mean',
  quantity: 'metric',
  n,
  estimate,
  low,
  high,
  confidence: 0.95,
  sd: 22,
  median: null,
  metricValue: estimate,
  ...extra,
});

const fareCompare = answer(sq('performance_compare'), [
  WINDOW,
  group('members', 34336, 33.81, 33.57, 34.04),
  group('others', 99609, 39.36, 39.2, 39.52),
  {
    type: 'performance_difference',
    metric: 'average_fare',
    comparison: 'members_vs_others',
    measure: 'mean',
    test: 'welch_t',
    first: 33.81,
    second: 39.36,
    difference: -5.55,
    relative: -0.141,
    ci: [-5.84, -5.26],
    confidence: 0.95,
    statistic: -37.99,
    df: 69070.6,
    pValue: 0,
    effectSize: -0.2204,
    nFirst: 34336,
    nSecond: 99609,
  },
  { type: 'performance_verdict', metric: 'average_fare', comparison: 'members_vs_others', verdict: 'worse', direction: 'lower', basis: 'test', pValue: 0, alpha: 0.05, higherIsBetter: true, relative: -0.141 },
  {
    type: 'performance_median_difference',
    metric: 'average_fare',
    medianMembers: 26.72,
    medianOthers: 31.09,
    difference: -4.37,
    ci: [-6.31, -3.71],
    confidence: 0.95,
    resamples: 2000,
    seed: 4021,
    sampleMembers: 4000,
    sampleOthers: 4000,
  },
]);

describe('performance_compare captions', () => {
  it('leadership: plain words, the size, chance and the observational caution; no test statistics', () => {
    const p = present(fareCompare, 'leadership');
    expect(p.title).toBe('Average fare per booking is about 14% lower for pass holders than for other customers');
    expect(p.caption).toBe(
      'Since the SkerryPass launch on 1 April 2023, average fare per booking is about 14% lower for pass holders than for other customers (€33.81 against €39.36); the difference is unlikely to be chance. This is an observational comparison, not proof of cause.',
    );
    expect(p.caption).not.toMatch(/p [<=]|t =|CI/);
    // The caption carries the caution already, so it is not repeated as a note.
    expect(p.notes).toEqual([]);
  });

  it('managers: the gap, its likely range, the sizes, the median and what it means for the metric', () => {
    const p = present(fareCompare, 'managers');
    expect(p.caption).toContain('€33.81 against €39.36 for pass holders and other customers: €5.55 lower, over 34,336 and 99,609 bookings');
    expect(p.caption).toContain('the true gap is probably €5.26 to €5.84');
    expect(p.caption).toContain('worse for pass holders');
    expect(p.caption).toContain('The median is €26.72 against €31.09, a gap of €4.37 for the typical booking.');
    expect(p.caption).not.toMatch(/p [<=]/);
    expect(p.notes).toContain('This compares groups that were not randomly assigned, so it cannot prove cause.');
  });

  it('analysts: the test, its statistic, p-value, interval, effect size and the bootstrap details', () => {
    const p = present(fareCompare, 'analysts');
    expect(p.caption).toContain("Welch's t-test, pass holders − other customers on average fare per booking");
    expect(p.caption).toContain('−€5.55 (95% CI −€5.84 to −€5.26), −14.1% relative; t = −38.0, df = 69,071, p < 0.001, Hedges\' g = −0.22');
    expect(p.caption).toContain('n = 34,336 vs 99,609 bookings');
    expect(p.caption).toContain('Median difference −€4.37 (seeded percentile bootstrap, 95% CI −€6.31 to −€3.71; 2,000 resamples of up to 4,000 sampled bookings per group, seed 4021)');
  });

  it('draws both groups with interval whiskers and "n = …"', () => {
    const chart = present(fareCompare, 'managers').chart;
    expect(chart?.kind).toBe('group_compare');
    if (chart?.kind !== 'group_compare') return;
    expect(chart.groups.map((g) => [g.label, g.estimateText, g.nText])).toEqual([
      ['Pass holders', '€33.81', 'n = 34,336'],
      ['Other customers', '€39.36', 'n = 99,609'],
    ]);
    expect(chart.groups[0]!.intervalText).toBe('95% CI €33.57 – €34.04');
    expect(chart.subtitle).toContain('from 1 April 2023 to 18 June 2025');
    expect(chart.footer).toContain('Caveats: Groups were not randomly assigned, so this cannot prove cause.');
  });

  it('a share reads in percentage points, and a p-value above 0.05 says it could be chance', () => {
    const a = answer(sq('performance_compare', { metrics: ['refund_rate'] }), [
      WINDOW,
      group('members', 900, 0.05, 0.04, 0.065, { metric: 'refund_rate', measure: 'proportion', sd: null }),
      group('others', 1100, 0.056, 0.045, 0.07, { metric: 'refund_rate', measure: 'proportion', sd: null }),
      {
        type: 'performance_difference',
        metric: 'refund_rate',
        comparison: 'members_vs_others',
        measure: 'proportion',
        test: 'two_proportion_z',
        first: 0.05,
        second: 0.056,
        difference: -0.006,
        relative: -0.107,
        ci: [-0.026, 0.014],
        confidence: 0.95,
        statistic: -0.6,
        df: null,
        pValue: 0.5485,
        effectSize: null,
        nFirst: 900,
        nSecond: 1100,
      },
      { type: 'performance_verdict', metric: 'refund_rate', comparison: 'members_vs_others', verdict: 'no_clear_difference', direction: 'lower', basis: 'test', pValue: 0.5485, alpha: 0.05, higherIsBetter: false, relative: -0.107 },
    ]);
    expect(present(a, 'leadership').caption).toContain('a difference this size could be chance');
    expect(present(a, 'managers').caption).toContain('0.6 pts lower');
    expect(present(a, 'managers').caption).toContain('the range of likely gaps includes no gap at all');
    expect(present(a, 'analysts').caption).toContain('−0.6 pts (95% CI −2.6 to +1.4 pts), −10.7% relative; z = −0.60, p = 0.55');
  });
});

describe('performance_frequency captions', () => {
  const freq = (role: 'members' | 'others', units: number, mean: number, median: number, p90: number, shares: [number, number, number]): PerformanceFinding => ({
    type: 'performance_frequency_group',
    metric: 'bookings',
    group: role,
    units,
    total: Math.round(units * mean),
    mean,
    sd: 2,
    low: mean - 0.05,
    high: mean + 0.05,
    confidence: 0.95,
    median,
    p90,
    buckets: [
      { min: 1, max: 1, units: Math.round(units * shares[0]), share: shares[0] },
      { min: 2, max: 5, units: Math.round(units * shares[1]), share: shares[1] },
      { min: 6, max: null, units: Math.round(units * shares[2]), share: shares[2] },
    ],
  });
  const a = answer(sq('performance_frequency', { metrics: ['bookings'], lens: 'distribution' }), [
    WINDOW,
    freq('members', 7996, 4.294, 4, 7, [0.065, 0.676, 0.259]),
    freq('others', 57945, 1.719, 1, 3, [0.516, 0.482, 0.002]),
    {
      type: 'performance_difference',
      metric: 'bookings',
      comparison: 'members_vs_others',
      measure: 'mean',
      test: 'welch_t',
      first: 4.294,
      second: 1.719,
      difference: 2.575,
      relative: 1.498,
      ci: [2.53, 2.62],
      confidence: 0.95,
      statistic: 112.5,
      df: 8447.3,
      pValue: 0,
      effectSize: 2.33,
      nFirst: 7996,
      nSecond: 57945,
    },
    { type: 'performance_verdict', metric: 'bookings', comparison: 'members_vs_others', verdict: 'better', direction: 'higher', basis: 'test', pValue: 0, alpha: 0.05, higherIsBetter: true, relative: 1.498 },
    { type: 'performance_frequency_ratio', metric: 'bookings', ratio: 2.498, low: 2.47, high: 2.526, confidence: 0.95 },
  ]);

  it('states the multiple, the share of frequent customers and the membership rule', () => {
    const p = present(a, 'leadership');
    expect(p.title).toBe('Pass holders have 2.5 times as many bookings per customer as other customers');
    expect(p.caption).toBe(
      'Since the SkerryPass launch on 1 April 2023, pass holders have 2.5 times as many bookings per customer as other customers (4.29 against 1.72); the difference is unlikely to be chance. 26% of them had 6 or more bookings, against 0.2% of the others. This is an observational comparison, not proof of cause.',
    );
    expect(p.notes[0]).toBe('A customer counts among pass holders when any of their bookings in the period is flagged SkerryPass.');
  });

  it('managers get medians and buckets; analysts the test and the ratio interval', () => {
    expect(present(a, 'managers').caption).toContain('Shares of customers with 1, 2–5 and 6 or more bookings: pass holders 7%, 68%, 26%; other customers 52%, 48%, 0.2%.');
    expect(present(a, 'managers').caption).toContain('The median customer had 4 among pass holders against 1 among other customers');
    expect(present(a, 'analysts').caption).toContain('ratio of means 2.50 (95% CI 2.47 to 2.53, delta method on the log scale)');
    const chart = present(a, 'analysts').chart;
    expect(chart?.kind === 'group_compare' && chart.groups.map((g) => g.nText)).toEqual(['n = 7,996', 'n = 57,945']);
  });
});

describe('performance_before_after captions', () => {
  const series = (role: 'members' | 'others', from: number): PerformanceFinding => ({
    type: 'performance_group_series',
    metric: 'average_fare',
    group: role,
    grain: 'month',
    points: ['2023-02-01', '2023-03-01', '2023-04-01', '2023-05-01'].map((period, i) => ({ period, value: role === 'members' && i < 2 ? null : from + i, partial: false })),
  });
  const periods: PerformanceFinding = { type: 'performance_periods', launchDate: '2023-04-01', before: { start: '2022-04-01', end: '2023-04-01' }, after: { start: '2023-04-01', end: '2024-04-01' }, months: 12 };
  const diff = (comparison: 'members_vs_others' | 'others_after_vs_before', first: number, second: number, p: number): PerformanceFinding => ({
    type: 'performance_difference',
    metric: 'average_fare',
    comparison,
    measure: 'mean',
    test: 'welch_t',
    first,
    second,
    difference: first - second,
    relative: (first - second) / second,
    ci: [first - second - 0.4, first - second + 0.4],
    confidence: 0.95,
    statistic: 8.4,
    df: 101498,
    pValue: p,
    effectSize: 0.05,
    nFirst: 12456,
    nSecond: 48415,
  });

  it('members absent before the launch: says DiD does not apply, gives both comparisons and the windows', () => {
    const a = answer(sq('performance_before_after', { lens: 'time_pattern' }), [
      series('members', 33),
      series('others', 38),
      periods,
      { type: 'performance_did_not_applicable', metric: 'average_fare', reason: 'members_empty_before' },
      diff('others_after_vs_before', 38.67, 37.36, 1e-17),
      diff('members_vs_others', 33.11, 38.67, 1e-100),
      { type: 'performance_verdict', metric: 'average_fare', comparison: 'members_vs_others', verdict: 'worse', direction: 'lower', basis: 'test', pValue: 1e-100, alpha: 0.05, higherIsBetter: true, relative: -0.144 },
    ]);
    const p = present(a, 'managers');
    expect(p.caption).toContain('SkerryPass had no pass holders before 1 April 2023, so the same group cannot be compared before and after (no difference in differences).');
    expect(p.caption).toContain('In the 12 months after the launch (April 2023 to March 2024), average fare per booking was €33.11 for pass holders against €38.67 for other customers');
    expect(p.caption).toContain("Other customers' own average fare per booking rose about 4% on the 12 months before (€38.67 against €37.36)");
    expect(p.notes).toContain('Equal windows of 12 months either side of the launch: April 2022 to March 2023 before, April 2023 to March 2024 after.');
    const chart = p.chart;
    expect(chart?.kind).toBe('line');
    if (chart?.kind !== 'line') return;
    expect(chart.seriesLabel).toBe('Pass holders');
    expect(chart.overlay?.label).toBe('Other customers');
    expect(chart.points.map((x) => x.value)).toEqual([null, null, 35, 36]);
    expect(chart.overlay?.values).toEqual([38, 39, 40, 41]);
    // The launch (1 April 2023, from the catalog) marked on the third month.
    expect(chart.events).toEqual([{ index: 2, label: 'SkerryPass launch' }]);
  });

  it('members absent before the launch, a count per day: the groups\' volumes are said, never a result or a summary line', () => {
    // Bookings per day of each group follow how many customers it holds (the demo's pass holders
    // book 2.5 times as often per customer, yet make fewer bookings a day as a group).
    const counts = (role: 'members' | 'others', from: number): PerformanceFinding => ({ ...series(role, from), metric: 'bookings', quantity: 'per_day' } as PerformanceFinding);
    const perDay = (comparison: 'members_vs_others' | 'others_after_vs_before', first: number, second: number, p: number): PerformanceFinding => ({ ...diff(comparison, first, second, p), metric: 'bookings', measure: 'mean' } as PerformanceFinding);
    const a = answer(sq('performance_before_after', { lens: 'time_pattern', metrics: ['bookings'] }), [
      counts('members', 30),
      counts('others', 130),
      periods,
      { type: 'performance_did_not_applicable', metric: 'bookings', reason: 'members_empty_before' },
      perDay('others_after_vs_before', 132, 156, 1e-10),
      perDay('members_vs_others', 34, 132, 1e-100),
      { type: 'performance_verdict', metric: 'bookings', comparison: 'members_vs_others', verdict: 'no_clear_difference', direction: 'lower', basis: 'test', pValue: 1e-100, alpha: 0.05, higherIsBetter: null, relative: -0.74 },
    ]);
    for (const audience of ['leadership', 'managers', 'analysts'] as const) {
      const p = present(a, audience);
      expect(p.title).toBe('Bookings per day before and after the SkerryPass launch: no like-for-like comparison');
      expect(p.title).not.toMatch(/lower|higher|%/);
      expect(p.caption).toContain('pass holders accounted for 34.0 bookings per day against 132 for other customers');
      expect(p.caption).toContain('not how each behaves');
      expect(p.takeaway).toBeNull();
    }
  });

  it('with a DiD: the four cells, the estimate, and the parallel-trends caution', () => {
    const a = answer(sq('performance_before_after', { lens: 'time_pattern' }), [
      series('members', 33),
      series('others', 38),
      periods,
      {
        type: 'performance_did',
        metric: 'average_fare',
        measure: 'mean',
        membersBefore: 33.11,
        membersAfter: 33.98,
        othersBefore: 38.67,
        othersAfter: 39.91,
        estimate: -0.37,
        relative: -0.0108,
        ci: [-0.98, 0.24],
        confidence: 0.95,
        test: 'did_t',
        statistic: -1.2,
        df: 54079,
        pValue: 0.23,
      },
    ]);
    const lead = present(a, 'leadership');
    expect(lead.title).toBe('Average fare per booking: no clear change for pass holders relative to other customers after the launch');
    expect(lead.caption).toBe(
      'Comparing the 12 months either side of the launch on 1 April 2023, average fare per booking for pass holders went from €33.11 to €33.98 and for other customers from €38.67 to €39.91: pass holders moved €0.37 less than other customers; a difference this size could be chance. This is an observational comparison, not proof of cause.',
    );
    expect(lead.notes.some((n) => n.startsWith('Difference in differences assumes both groups would have moved in parallel'))).toBe(true);
    expect(present(a, 'analysts').caption).toContain('Difference in differences (t, Welch–Satterthwaite df): −€0.37 (95% CI −€0.98 to +€0.24); t = −1.20, df = 54,079, p = 0.23.');
  });
});

describe('performance_by_segment captions', () => {
  const seg = (segment: string, relative: number, small = false): PerformanceFinding => ({
    type: 'performance_segment',
    metric: 'average_fare',
    dimension: 'route',
    segment,
    folded: false,
    segmentCount: 1,
    nMembers: small ? 12 : 3000,
    nOthers: 9000,
    members: 30 * (1 + relative),
    others: 30,
    difference: 30 * relative,
    relative,
    ci: [30 * relative - 1, 30 * relative + 1],
    pValue: small ? 0.3 : 1e-20,
    small,
  });
  const a = answer(sq('performance_by_segment', { lens: 'breakdown', dimension: 'route' }), [
    WINDOW,
    group('members', 34336, 33.81, 33.57, 34.04),
    group('others', 99609, 39.36, 39.2, 39.52),
    {
      type: 'performance_difference',
      metric: 'average_fare',
      comparison: 'members_vs_others',
      measure: 'mean',
      test: 'welch_t',
      first: 33.81,
      second: 39.36,
      difference: -5.55,
      relative: -0.141,
      ci: [-5.84, -5.26],
      confidence: 0.95,
      statistic: -38,
      df: 69070,
      pValue: 0,
      effectSize: -0.22,
      nFirst: 34336,
      nSecond: 99609,
    },
    { type: 'performance_verdict', metric: 'average_fare', comparison: 'members_vs_others', verdict: 'worse', direction: 'lower', basis: 'test', pValue: 0, alpha: 0.05, higherIsBetter: true, relative: -0.141 },
    seg('Mainland–Tern Holm', -0.145),
    seg('Mainland–Saltreach', -0.138),
    seg('Tern Holm–Saltreach', -0.135, true),
    { type: 'performance_consistency', metric: 'average_fare', dimension: 'route', overallDirection: 'lower', segments: 3, sameDirection: 3, oppositeDirection: 0, significantSame: 2, significantOpposite: 0 },
  ]);

  it('says how consistent the direction is, with the range, and flags the small segment', () => {
    const p = present(a, 'leadership');
    expect(p.title).toBe('Average fare per booking is lower for pass holders on all 3 routes');
    expect(p.caption).toContain('on all 3 routes, by 14% to 15%');
    expect(p.caption).toContain('the same direction in every route suggests the gap is not just a different mix of routes');
    expect(present(a, 'managers').caption).toContain('Tern Holm–Saltreach is small');
    expect(present(a, 'analysts').caption).toContain('Tern Holm–Saltreach −13.5% (n.s.) (n = 12 vs 9,000)');
  });

  it('draws the size of the gap per segment when every segment points the same way', () => {
    const chart = present(a, 'managers').chart;
    expect(chart?.kind).toBe('bars');
    if (chart?.kind !== 'bars') return;
    expect(chart.bars.map((b) => [b.label, b.text])).toEqual([
      ['Mainland–Tern Holm', '14.5%'],
      ['Mainland–Saltreach', '13.8%'],
      ['Tern Holm–Saltreach (small sample)', '13.5%'],
    ]);
    expect(chart.subtitle).toContain('% lower for pass holders than for other customers');
  });
});

// ---- fuzz ---------------------------------------------------------------------------------

const BAD = /NaN|Infinity|undefined|\d{4}-\d{2}-\d{2}/;

function textsOf(p: Presented): string[] {
  const out = [p.title, p.caption, ...p.notes, p.takeaway?.text ?? ''];
  const walk = (v: unknown, key: string): void => {
    if (typeof v === 'string' && key !== 'period') out.push(v);
    else if (Array.isArray(v)) v.forEach((x) => walk(x, key));
    else if (v && typeof v === 'object') for (const [k, x] of Object.entries(v)) walk(x, k);
  };
  walk(p.chart, '');
  return out;
}

const finiteOrNull = fc.oneof(
  fc.constant(null),
  fc.constant(0),
  fc.double({ min: -1e9, max: 1e9, noNaN: true, noDefaultInfinity: true }),
  fc.double({ min: -1e-6, max: 1e-6, noNaN: true, noDefaultInfinity: true }),
);
const count = fc.oneof(fc.constant(0), fc.constant(1), fc.integer({ min: 0, max: 50 }), fc.integer({ min: 0, max: 2_000_000 }));

const summaryRow = (member: boolean) =>
  fc.record({
    n: count,
    mean: finiteOrNull,
    variance: fc.oneof(fc.constant(null), fc.constant(0), fc.double({ min: 0, max: 1e10, noNaN: true })),
    hitsShare: fc.double({ min: 0, max: 1, noNaN: true }),
    mx: finiteOrNull,
    my: finiteOrNull,
    cov: finiteOrNull,
    value: finiteOrNull,
    median: finiteOrNull,
    p90: finiteOrNull,
    buckets: fc.tuple(count, count, count),
  }).map((r): Record<string, CellValue> => ({
    tc_member: member,
    tc_n: r.n,
    tc_mean: r.mean,
    tc_var: r.variance,
    tc_hits: Math.round(r.hitsShare * r.n),
    tc_mx: r.mx,
    tc_my: r.my,
    tc_vx: r.variance,
    tc_vy: r.variance,
    tc_cxy: r.cov,
    tc_value: r.value,
    tc_rows: r.n,
    tc_median: r.median,
    tc_p90: r.p90,
    tc_total: r.value,
    tc_bucket_0: r.buckets[0],
    tc_bucket_1: r.buckets[1],
    tc_bucket_2: r.buckets[2],
  }));

const rowsOf = fc.tuple(fc.option(summaryRow(true), { nil: undefined }), fc.option(summaryRow(false), { nil: undefined })).map(([m, o]) => [m, o].filter((r): r is Record<string, CellValue> => r !== undefined));
const MONTHS = ['2022-10-01', '2022-11-01', '2022-12-01', '2023-01-01', '2023-02-01', '2023-03-01', '2023-04-01', '2023-05-01', '2023-06-01', '2023-07-01'];
const seriesRows = fc.array(fc.tuple(fc.constantFrom(...MONTHS), summaryRow(true), summaryRow(false), fc.boolean()), { maxLength: 10 }).map((xs) =>
  xs.flatMap(([period, m, o, both]) => (both ? [{ period, ...m }, { period, ...o }] : [{ period, ...o }])),
);
const segmentRows = fc.array(fc.tuple(fc.constantFrom('A–B', 'C–D', null), fc.boolean(), summaryRow(true), summaryRow(false), count), { maxLength: 6 }).map((xs) =>
  xs.flatMap(([segment, folded, m, o, segments]) => [
    { ...m, tc_segment: segment, tc_folded: folded, tc_segments: segments },
    { ...o, tc_segment: segment, tc_folded: folded, tc_segments: segments },
  ]),
);

const table = (rows: Record<string, CellValue>[]): ResultTable => ({ columns: [], rows, truncated: false });

describe('fuzz: no NaN, Infinity, undefined or ISO date in any text, and no exception', () => {
  const cases: { template: TemplateName; lens: SubQuestion['lens']; dimension?: string }[] = [
    { template: 'performance_compare', lens: 'summary' },
    { template: 'performance_frequency', lens: 'distribution' },
    { template: 'performance_before_after', lens: 'time_pattern' },
    { template: 'performance_by_segment', lens: 'breakdown', dimension: 'route' },
  ];
  for (const c of cases) {
    it(c.template, () => {
      fc.assert(
        fc.property(
          fc.constantFrom('average_fare', 'refund_rate', 'fare_per_passenger', 'revenue', 'bookings', 'customers'),
          fc.constantFrom<Audience>('leadership', 'managers', 'analysts'),
          fc.constantFrom(
            { start: '2022-10-01', end: '2023-08-01' },
            { start: '2023-05-01', end: '2023-06-01' },
            { start: '2022-01-01', end: '2022-01-02' },
          ),
          fc.constantFrom<'month' | 'quarter'>('month', 'quarter'),
          rowsOf,
          seriesRows,
          segmentRows,
          (metric, audience, window, grain, groups, series, segments) => {
            const q = sq(c.template, { lens: c.lens, metrics: [metric], window, grain, ...(c.dimension ? { dimension: c.dimension } : {}) });
            const tables = { groups: table(groups), frequency: table(groups), series: table(series), months: table(series), segments: table(segments) };
            const reading = SUB_QUESTIONS[c.template].template.read(q, tables, { dataset: exampleDataset, coverage: { firstDate: '2022-10-01', lastDate: '2023-07-20', rows: 1000 } });
            const findings: Finding[] = reading.findings;
            const presented = SUB_QUESTIONS[c.template].present({ subQuestion: q, queries: [], tables, findings, caveats: reading.caveats }, ctxFor(audience));
            for (const text of textsOf(presented)) expect(text).not.toMatch(BAD);
            expect(presented.title.length).toBeGreaterThan(0);
            expect(presented.caption.length).toBeGreaterThan(0);
          },
        ),
        { numRuns: 150, seed: 20250618 },
      );
    });
  }
});
