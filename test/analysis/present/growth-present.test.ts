// Titles, captions, notes and chart specs of the growth presenters, from findings built here:
// exact wording and numbers by audience, and a fuzz that no text ever shows NaN, Infinity,
// "undefined" or a raw ISO date.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type {
  GrowthDriversFinding,
  GrowthPoint,
  GrowthRateSummaryFinding,
  GrowthSeriesFinding,
  GrowthShareShiftFinding,
} from '../../../analysis/findings/growth.js';
import { addMonths } from '../../../analysis/periods.js';
import { definitionOf, type TemplateName } from '../../../analysis/sub-questions/registry.js';
import type { PresentContext } from '../../../analysis/present/presenter.js';
import type { Answer, Audience, Caveat, Finding, Grain, SubQuestion } from '../../../analysis/types.js';
import { exampleDataset } from '../../helpers/example-config.js';

const ctx = (audience: Audience): PresentContext => ({
  dataset: exampleDataset,
  locale: 'en-IE',
  audience,
  chart: { width: 1200, height: 675, scale: 1 },
  dataAsOf: '2025-06-18',
});
const sq = (template: TemplateName, over: Partial<SubQuestion> = {}): SubQuestion => ({
  id: 't',
  kind: 'growth',
  lens: 'time_pattern',
  template,
  metrics: ['revenue'],
  grain: 'month',
  window: { start: '2022-01-01', end: '2025-07-01' },
  filters: [],
  ...over,
});
const answer = (s: SubQuestion, findings: Finding[], caveats: Caveat[] = []): Answer => ({ subQuestion: s, queries: [], tables: {}, findings, caveats });
const present = (a: Answer, audience: Audience) => definitionOf(a.subQuestion).present(a, ctx(audience));

function monthlySeries(values: (number | null)[], start = '2022-01-01'): GrowthSeriesFinding {
  const points: GrowthPoint[] = values.map((v, i) => ({
    period: addMonths(start, i),
    value: v,
    partial: false,
    pop: i > 0 && v !== null && values[i - 1] ? v / values[i - 1]! - 1 : null,
    yoy: i >= 12 && v !== null && values[i - 12] ? v / values[i - 12]! - 1 : null,
    trailing: null,
  }));
  return { type: 'growth_series', metric: 'revenue', grain: 'month', points, yoyLag: 12, trailingWindow: 12 };
}

// Year totals 100 → 108.1 → 108.53 (+8.1%, then +0.4%), and 2025 so far 5% below the same dates of 2024.
const headlineFindings: Finding[] = [
  monthlySeries(Array.from({ length: 41 }, (_, i) => 1000 + i)),
  {
    type: 'growth_years',
    metric: 'revenue',
    years: [
      { year: '2022-01-01', value: 100_000, complete: true, yoy: null },
      { year: '2023-01-01', value: 108_100, complete: true, yoy: 0.081 },
      { year: '2024-01-01', value: 108_532.4, complete: true, yoy: 0.004 },
      { year: '2025-01-01', value: 40_000, complete: false, yoy: null },
    ],
  },
  { type: 'growth_ytd', metric: 'revenue', through: '2025-06-18', current: { year: '2025-01-01', value: 38_000 }, prior: { year: '2024-01-01', value: 40_000 }, relative: -0.05, absolute: -2000 },
  { type: 'growth_cagr', metric: 'revenue', from: { year: '2022-01-01', value: 100 }, to: { year: '2024-01-01', value: 121 }, years: 2, rate: 0.1 },
];

describe('growth_series presenter', () => {
  it('states the headline from year totals and the year so far', () => {
    const p = present(answer(sq('growth_series'), headlineFindings), 'managers');
    expect(p.title).toBe('Revenue grew 8.1% in 2023, then held flat in 2024; 2025 so far: −5.0%');
    expect(p.caption).toContain('Year to date (to 18 June 2025), revenue ran 5.0% below the same dates of 2024 (€38K against €40K).');
    expect(p.caption).toContain('2023: €108K, +8.1% on the year before; 2024: €109K, +0.4% on the year before.');
    expect(p.caption).toContain('Averaged over 2022 to 2024, it grew 10.0% a year (compound).');
    expect(p.chart?.kind).toBe('growth_grid');
  });

  it('words by audience: plain for leadership, the method names for analysts', () => {
    const lead = present(answer(sq('growth_series'), headlineFindings), 'leadership');
    expect(lead.caption).toBe('Year to date (to 18 June 2025), revenue ran 5.0% below the same dates of 2024.');
    const an = present(answer(sq('growth_series'), headlineFindings), 'analysts');
    expect(an.caption).toContain('CAGR 2022–2024: +10.0% a year ((€121 / €100)^(1/2) − 1).');
    expect(an.caption).toContain('2023 +8.1% (€108K vs €100K)');
    expect(lead.caption).not.toMatch(/CAGR|p =|trailing/);
  });

  it('hatches a partial month and leaves the months after the data blank, keeping "n/a" for missing bases', () => {
    const series = monthlySeries(Array.from({ length: 41 }, (_, i) => (i === 14 ? null : 1000 + i)));
    // May 2025, the last point, is only partly covered; March 2023 has no rows at all.
    series.points[40] = { ...series.points[40]!, partial: true, yoy: null };
    const p = present(answer(sq('growth_series'), [series, ...headlineFindings.slice(1)]), 'managers');
    if (p.chart?.kind !== 'growth_grid') throw new Error('expected a growth grid');
    const [y2023, y2024, y2025] = p.chart.rows;
    expect(y2025!.states).toEqual([...Array(4).fill('value'), 'partial', ...Array(7).fill('no_data')]);
    expect(y2025!.texts.slice(3, 7)).toEqual(['+1.2%', 'partial', '', '']);
    expect(y2023!.states[2]).toBe('no_data');
    // March 2024's base is the empty March 2023: data, but nothing to compare with.
    expect([y2024!.states[2], y2024!.texts[2]]).toEqual(['not_comparable', 'n/a']);
  });

  it('draws the grid only over months that can have a year-earlier base, and a line for quarters', () => {
    const p = present(answer(sq('growth_series'), headlineFindings), 'managers');
    if (p.chart?.kind !== 'growth_grid') throw new Error('expected a growth grid');
    expect(p.chart.rows.map((r) => r.label)).toEqual(['2023', '2024', '2025']);
    expect(p.chart.rows[0]!.texts[0]).toBe('+1.2%'); // 1012 / 1000 − 1
    const q: GrowthSeriesFinding = {
      type: 'growth_series',
      metric: 'revenue',
      grain: 'quarter',
      yoyLag: 4,
      trailingWindow: 4,
      points: ['2023-01-01', '2023-04-01', '2023-07-01', '2023-10-01', '2024-01-01'].map((period, i) => ({
        period,
        value: 100 + i,
        partial: false,
        pop: null,
        yoy: i === 4 ? 0.04 : null,
        trailing: null,
      })),
    };
    const line = present(answer(sq('growth_series', { grain: 'quarter' }), [q]), 'managers');
    expect(line.chart?.kind).toBe('line');
    expect(line.title).toBe('Revenue in Q1 2024: +4.0% on a year earlier');
  });

  it('says plainly when there is nothing to measure, with the growth family caveat wording', () => {
    const p = present(
      answer(sq('growth_series'), [], [
        { code: 'no_data', data: { start: '2030-01-01', end: '2031-01-01' } },
        { code: 'partial_period_excluded', data: { period: '2025-06-01', grain: 'month', coveredFrom: '2025-06-01', coveredTo: '2025-06-18' } },
      ]),
      'managers',
    );
    expect(p.title).toBe('Revenue: not enough complete periods to measure growth');
    expect(p.chart).toBeNull();
    expect(p.notes).toContain('June 2025 is partial (data from 1 June 2025 to 18 June 2025), so it is left out of every growth rate.');
  });
});

const driversFinding: GrowthDriversFinding = {
  type: 'growth_drivers',
  metric: 'revenue',
  dimension: 'channel',
  current: { start: '2024-06-01', end: '2024-09-01' },
  prior: { start: '2023-06-01', end: '2023-09-01' },
  additive: true,
  total: { before: 200_000, after: 210_000, change: 10_000, relative: 0.05 },
  segments: [
    { segment: 'app', before: 80_000, after: 95_000, change: 15_000, relative: 0.1875, shareOfChange: 1.5, contribution: 0.075 },
    { segment: 'web', before: 90_000, after: 84_000, change: -6_000, relative: -0.0667, shareOfChange: -0.6, contribution: -0.03 },
    { segment: 'kiosk', before: 0, after: 1_000, change: 1_000, relative: null, shareOfChange: 0.1, contribution: 0.005 },
  ],
  others: { count: 2, before: 30_000, after: 30_000, change: 0, relative: 0, shareOfChange: 0, contribution: 0 },
  likeForLike: null,
};

describe('growth_drivers presenter', () => {
  it('names the biggest driver in the title and the spans in the caption', () => {
    const s = sq('growth_drivers', { lens: 'breakdown', dimension: 'channel', window: { start: '2024-06-01', end: '2024-09-01' } });
    const p = present(answer(s, [driversFinding]), 'managers');
    expect(p.title).toBe('App drove the biggest change in revenue: +€15K');
    expect(p.caption).toContain('Revenue rose 5.0%: €200K to €210K (+€10K), Jun\u2009–\u2009Aug 2024 against Jun\u2009–\u2009Aug 2023.');
    // app's +€15K is 150% of the +€10K total, offset by web's fall: no "n% of the total change" here.
    expect(p.caption).toContain('kiosk +€1K. The other 2 together: €0.');
    expect(p.caption).not.toContain('of the total change');
    // With the finding's rises and falls (templates/growth-drivers.ts offsetOf), they are said.
    const all = present(answer(s, [{ ...driversFinding, offset: { rises: 16_000, falls: -6_000 } }]), 'managers');
    expect(all.caption).toContain('Moves offset each other: the rises add up to +€16K and the falls to −€6K.');
    // Moves all one way, none over the total: each one's part of it.
    const oneWay: GrowthDriversFinding = { ...driversFinding, others: null, segments: [
      { segment: 'app', before: 80_000, after: 86_000, change: 6_000, relative: 0.075, shareOfChange: 0.6, contribution: 0.03 },
      { segment: 'web', before: 90_000, after: 94_000, change: 4_000, relative: 0.0444, shareOfChange: 0.4, contribution: 0.02 },
    ] };
    const w = present(answer(s, [oneWay]), 'managers');
    expect(w.caption).toContain('app +€6K, +7.5%, 60.0% of the total change; web +€4K, +4.4%, 40.0% of the total change.');
    expect(w.caption).not.toContain('offset');
    const an = present(answer(s, [driversFinding]), 'analysts');
    expect(an.caption).toContain('app +€15K, +18.8%, +7.5 pts of the total\'s +5.0%');
    if (p.chart?.kind !== 'bars') throw new Error('expected bars');
    expect(p.chart.bars.map((b) => [b.label, b.text, b.other])).toEqual([
      ['app', '+€15K', false],
      ['kiosk', '+€1K', false],
      ['web', '−€6K', false],
      ['All others (2)', '€0', true],
    ]);
  });

  it('calls a total change under 1% flat and still gives its numbers', () => {
    const s = sq('growth_drivers', { lens: 'breakdown', dimension: 'channel' });
    const f: GrowthDriversFinding = { ...driversFinding, total: { before: 865_000, after: 871_000, change: 6_000, relative: 6_000 / 865_000 } };
    const p = present(answer(s, [f]), 'leadership');
    expect(p.caption).toBe(
      'Revenue held flat: €865K to €871K (+0.7%, +€6K), Jun\u2009–\u2009Aug 2024 against Jun\u2009–\u2009Aug 2023. Biggest moves: app +€15K, web −€6K, kiosk +€1K.',
    );
  });

  it('says a ratio metric does not add up, and does not claim a driver', () => {
    const s = sq('growth_drivers', { lens: 'breakdown', dimension: 'channel', metrics: ['fare_per_passenger'] });
    const f: GrowthDriversFinding = { ...driversFinding, metric: 'fare_per_passenger', additive: false, others: null, segments: [{ ...driversFinding.segments[0]!, before: 20, after: 21, change: 1, relative: 0.05, shareOfChange: null, contribution: null }], total: { before: 20, after: 20.5, change: 0.5, relative: 0.025 } };
    const p = present(answer(s, [f]), 'managers');
    // "Moved most" by the segment's own change: a ratio's relative change, with the change in euro beside.
    expect(p.title).toBe('Average fare per passenger moved most for app: +5.0% (+€1.00)');
    // Said as the config's choice (a ratio), not as a fact about fares.
    expect(p.caption).toContain('Average fare per passenger is set up in the config as a ratio (revenue per passengers), so segment changes do not add up');
  });

  it('words a late segment and a pass-holder flag in plain terms', () => {
    const s = sq('growth_drivers', { lens: 'breakdown', dimension: 'pass_holder' });
    const f: GrowthDriversFinding = { ...driversFinding, dimension: 'pass_holder', others: null, segments: [{ ...driversFinding.segments[0]!, segment: 'true' }] };
    const p = present(answer(s, [f], [{ code: 'late_segment', data: { segment: 'true', firstPeriod: '2023-04-01', grain: 'day' } }]), 'leadership');
    expect(p.title).toBe('Pass holders drove the biggest change in revenue: +€15K');
    expect(p.notes).toEqual(['Pass holders has no data a year earlier; it first appears on 1 April 2023, so it counts as zero in the earlier window.']);
  });
});

const summaryFinding: GrowthRateSummaryFinding = {
  type: 'growth_rate_summary',
  metric: 'revenue',
  grain: 'month',
  basis: 'yoy',
  measure: 'relative',
  rates: [
    { period: '2024-01-01', value: 0.1 },
    { period: '2024-02-01', value: -0.1 },
    { period: '2024-03-01', value: 0.2 },
    { period: '2024-04-01', value: 0 },
  ],
  n: 4,
  min: { period: '2024-02-01', value: -0.1 },
  max: { period: '2024-03-01', value: 0.2 },
  mean: 0.05,
  median: 0.05,
  sd: 0.1291,
  // Quartiles of −0.1, 0, 0.1, 0.2 by linear interpolation (numpy's default, R type 7): −0.025 and 0.125.
  quartiles: { lower: -0.025, upper: 0.125 },
};

describe('growth_summary presenter', () => {
  it('gives the range with its months, and the spread by audience', () => {
    const s = sq('growth_summary', { lens: 'summary' });
    const m = present(answer(s, [summaryFinding]), 'managers');
    expect(m.title).toBe("Revenue's growth on the same month a year earlier ranged from −10.0% (Feb 2024) to +20.0% (Mar 2024)");
    expect(m.caption).toBe('Across 4 months, growth on the same month a year earlier had a middle value of +5.0%; half of the months lay between −2.5% and +12.5%.');
    const a = present(answer(s, [summaryFinding]), 'analysts');
    expect(a.caption).toBe('4 year-over-year rates: median +5.0%, mean +5.0%, sample SD 12.9 pts; min −10.0% (Feb 2024), max +20.0% (Mar 2024).');
    const l = present(answer(s, [summaryFinding]), 'leadership');
    expect(l.caption).toBe('Across 4 months, the typical change on the same month a year earlier was +5.0%.');
    if (m.chart?.kind !== 'line') throw new Error('expected a line');
    expect(m.chart.marks.map((k) => k.role).sort()).toEqual(['high', 'low']);
  });
});

const shareFinding: GrowthShareShiftFinding = {
  type: 'growth_share_shift',
  metric: 'revenue',
  dimension: 'route',
  current: { start: '2024-06-01', end: '2024-09-01' },
  prior: { start: '2023-06-01', end: '2023-09-01' },
  threshold: 0.8,
  segments: [
    { segment: 'A', before: 30, after: 50, shareBefore: 0.3, shareAfter: 0.5, shareChange: 0.2 },
    { segment: 'B', before: 30, after: 30, shareBefore: 0.3, shareAfter: 0.3, shareChange: 0 },
    { segment: 'C', before: 20, after: 20, shareBefore: 0.2, shareAfter: 0.2, shareChange: 0 },
    { segment: 'D', before: 20, after: 0, shareBefore: 0.2, shareAfter: 0, shareChange: -0.2 },
  ],
  others: null,
  before: { total: 100, segments: 4, hhi: 2600, countToThreshold: 3 },
  after: { total: 100, segments: 3, hhi: 3800, countToThreshold: 2 },
};

describe('growth_share_shift presenter', () => {
  it('names the largest share move and the concentration change', () => {
    const s = sq('growth_share_shift', { lens: 'distribution', dimension: 'route' });
    const m = present(answer(s, [shareFinding]), 'managers');
    expect(m.title).toBe("A's share of revenue rose 20.0 pts to 50.0%");
    expect(m.caption).toContain('2 routes reach 80% of revenue now, against 3 a year earlier; overall it is more concentrated than before.');
    const a = present(answer(s, [shareFinding]), 'analysts');
    expect(a.caption).toContain('HHI 2,600 → 3,800 (0–10,000 scale).');
    if (m.chart?.kind !== 'pareto') throw new Error('expected a pareto');
    // A no-break space inside the bracket, so a wrapped axis label never splits "(+20.0" from "pts)".
    expect(m.chart.bars[0]!.label).toBe('A (+20.0\u00A0pts)');
    expect(m.chart.thresholdIndex).toBe(1);
  });

  it('keeps the finding\'s folded tail last and neutral, the running share reaching 100% there', () => {
    const s = sq('growth_share_shift', { lens: 'distribution', dimension: 'route' });
    // The fold (30) is larger than B (20) and C (10): a plain sort would put it second.
    const f: GrowthShareShiftFinding = {
      ...shareFinding,
      segments: shareFinding.segments.slice(0, 3).map((x, i) => ({ ...x, after: [40, 20, 10][i]! })),
      others: { count: 4, before: 20, after: 30, shareBefore: 0.2, shareAfter: 0.3, shareChange: 0.1 },
    };
    const m = present(answer(s, [f]), 'managers');
    if (m.chart?.kind !== 'pareto') throw new Error('expected a pareto');
    expect(m.chart.bars.map((b) => [b.value, b.other])).toEqual([
      [40, false],
      [20, false],
      [10, false],
      [30, true],
    ]);
    expect(m.chart.bars[3]!.label).toBe('All others (4) (+10.0\u00A0pts)');
    // Running shares of 100: 40, 60, 70, 100.
    expect(m.chart.bars.map((b) => b.cumulativeText)).toEqual(['40%', '60%', '70%', '100%']);
    expect(m.chart.thresholdIndex).toBe(3);
  });

  it('explains why a ratio metric has no shares', () => {
    const p = present(answer(sq('growth_share_shift', { metrics: ['fare_per_passenger'], dimension: 'route' }), []), 'managers');
    expect(p.caption).toBe('Average fare per passenger is set up in the config as a ratio (revenue per passengers), not a sum or a count, so it has no shares of a total; compare segments with a breakdown instead.');
    expect(p.chart).toBeNull();
  });
});

// ---- fuzz -----------------------------------------------------------------------------------

const BAD = /NaN|Infinity|undefined|\d{4}-\d{2}-\d{2}|T\d{2}:\d{2}/;
const num = fc.oneof(
  fc.constant(null),
  fc.constant(0),
  fc.double({ min: -1e12, max: 1e12, noNaN: true }),
  fc.constantFrom(Number.NaN, Number.POSITIVE_INFINITY, -0, 1e-300),
);
const rate = fc.oneof(fc.constant(null), fc.double({ min: -1.5, max: 20, noNaN: true }), fc.constant(Number.NaN));
const month = fc.integer({ min: 0, max: 60 }).map((i) => addMonths('2020-01-01', i));
const audience = fc.constantFrom<Audience>('leadership', 'managers', 'analysts');
const grain = fc.constantFrom<Grain>('day', 'week', 'month', 'quarter', 'year');
const caveats = fc.array(
  fc.record({
    code: fc.constantFrom<Caveat['code']>('partial_period_excluded', 'partial_period', 'base_zero', 'late_segment', 'segment_gap', 'no_data', 'all_null', 'single_period', 'small_sample', 'segments_folded'),
    data: fc.record({ period: month, grain, coveredFrom: month, coveredTo: month, segment: fc.constantFrom('app', null), firstPeriod: month, window: fc.constantFrom('current', 'prior'), start: month, end: month, n: fc.nat(9), count: fc.nat(9), rates: fc.nat(1) }),
  }),
  { maxLength: 4 },
);

function texts(p: ReturnType<typeof present>): string {
  return [p.title, p.caption, ...p.notes, p.takeaway?.text ?? '', p.chart?.title ?? ''].join('\n');
}

describe('no growth caption shows NaN, Infinity, undefined or an ISO date (fast-check)', () => {
  it('growth_series', () => {
    fc.assert(
      fc.property(fc.array(num, { minLength: 0, maxLength: 30 }), rate, rate, rate, audience, caveats, (values, y1, ytd, c, aud, cav) => {
        const series = monthlySeries(values.map((v) => (v === null ? null : v)));
        const findings: Finding[] = [
          series,
          { type: 'growth_years', metric: 'revenue', years: [{ year: '2023-01-01', value: values[0] ?? null, complete: true, yoy: null }, { year: '2024-01-01', value: values[1] ?? null, complete: true, yoy: y1 }] },
          { type: 'growth_ytd', metric: 'revenue', through: '2025-02-28', current: { year: '2025-01-01', value: values[2] ?? null }, prior: { year: '2024-01-01', value: values[3] ?? null }, relative: ytd, absolute: null },
          { type: 'growth_cagr', metric: 'revenue', from: { year: '2023-01-01', value: 1 }, to: { year: '2024-01-01', value: 2 }, years: 1, rate: c },
        ];
        const text = texts(present(answer(sq('growth_series'), findings, cav as Caveat[]), aud));
        expect(text).not.toMatch(BAD);
      }),
      { numRuns: 300 },
    );
  });

  it('growth_drivers, growth_summary and growth_share_shift', () => {
    const seg = fc.record({ segment: fc.constantFrom('app', 'web', null, 'true'), before: num, after: num, change: num, relative: rate, shareOfChange: rate, contribution: rate });
    fc.assert(
      fc.property(fc.array(seg, { maxLength: 6 }), num, num, rate, fc.boolean(), audience, caveats, grain, (segs, b, a, r, additive, aud, cav, g) => {
        const d: GrowthDriversFinding = { ...driversFinding, additive, segments: segs, total: { before: b, after: a, change: null, relative: r }, others: segs.length > 3 ? { ...segs[0]!, count: 2 } : null };
        const ds = sq('growth_drivers', { dimension: 'channel' });
        expect(texts(present(answer(ds, [d], cav as Caveat[]), aud))).not.toMatch(BAD);
        const rates = segs.map((s, i) => ({ period: addMonths('2024-01-01', i), value: s.relative }));
        const finite = rates.filter((x) => x.value !== null && Number.isFinite(x.value));
        const sm: GrowthRateSummaryFinding = {
          ...summaryFinding,
          grain: g,
          rates,
          n: finite.length,
          min: finite[0] ? { period: finite[0].period, value: finite[0].value! } : null,
          max: finite[0] ? { period: finite[0].period, value: finite[0].value! } : null,
          mean: r,
          median: r,
          sd: r,
        };
        expect(texts(present(answer(sq('growth_summary', { grain: g }), [sm], cav as Caveat[]), aud))).not.toMatch(BAD);
        const sh: GrowthShareShiftFinding = {
          ...shareFinding,
          segments: segs.map((s) => ({ segment: s.segment, before: s.before, after: s.after, shareBefore: s.relative, shareAfter: s.shareOfChange, shareChange: s.contribution })),
          before: { total: b, segments: segs.length, hhi: a, countToThreshold: segs.length ? 1 : null },
          after: { total: a, segments: segs.length, hhi: b, countToThreshold: null },
        };
        expect(texts(present(answer(sq('growth_share_shift', { dimension: 'route' }), [sh], cav as Caveat[]), aud))).not.toMatch(BAD);
      }),
      { numRuns: 300 },
    );
  });
});
