// KPI presenters from findings built here: exact numbers and dates in the words, wording by
// audience, the chart each draws, and a fuzz that no text ever shows NaN, Infinity, undefined
// or a raw ISO date.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { BarsSpec, KpiCardSpec, LineSpec, ParetoSpec } from '../../../analysis/charts/spec.js';
import type {
  KpiBySegmentFinding,
  KpiContextFinding,
  KpiDelta,
  KpiMixFinding,
  KpiSegmentRow,
  KpiSnapshotFinding,
} from '../../../analysis/findings/kpi.js';
import { SUB_QUESTIONS, type TemplateName } from '../../../analysis/sub-questions/registry.js';
import type { PresentContext, Presented } from '../../../analysis/present/presenter.js';
import type { Answer, Audience, Caveat, Finding, Grain, PeriodPoint, SubQuestion } from '../../../analysis/types.js';
import { exampleDataset } from '../../helpers/example-config.js';

const ctxFor = (audience: Audience): PresentContext => ({
  dataset: exampleDataset,
  locale: 'en-IE',
  audience,
  chart: { width: 1200, height: 675, scale: 1 },
  dataAsOf: '2025-06-18',
});

function answerOf(template: TemplateName, metric: string, findings: Finding[], caveats: Caveat[] = [], extra: Partial<SubQuestion> = {}): Answer {
  const subQuestion: SubQuestion = {
    id: 'k',
    kind: 'kpi',
    lens: 'time_pattern',
    template,
    metrics: [metric],
    grain: 'month',
    window: { start: '2022-01-01', end: '2025-06-19' },
    filters: [],
    ...extra,
  };
  return { subQuestion, queries: [], tables: {}, findings, caveats };
}

function delta(period: string, base: number | null, latest: number | null, hib = true): KpiDelta {
  const absolute = base !== null && latest !== null ? latest - base : null;
  return {
    period,
    value: base,
    absolute,
    relative: base !== null && latest !== null && base > 0 ? (latest - base) / base : null,
    improved: absolute === null || absolute === 0 ? null : absolute > 0 === hib,
  };
}

const juneExcluded: Caveat = { code: 'partial_period_excluded', data: { period: '2025-06-01', grain: 'month', coveredFrom: '2025-06-01', coveredTo: '2025-06-18' } };

describe('kpi_snapshot presenter', () => {
  const fare: KpiSnapshotFinding = {
    type: 'kpi_snapshot',
    metric: 'fare_per_passenger',
    grain: 'month',
    period: '2025-05-01',
    value: 23.45,
    rows: 5058,
    previous: delta('2025-04-01', 23.1, 23.45),
    lastYear: delta('2024-05-01', 24, 23.45),
  };
  const present = (audience: Audience, f = fare, caveats = [juneExcluded]) =>
    SUB_QUESTIONS.kpi_snapshot.present(answerOf('kpi_snapshot', f.metric, [f], caveats), ctxFor(audience));

  it('titles the value, its month and the change on the same month a year earlier (it shares the season)', () => {
    // (23.45 − 23.10) / 23.10 = 1.515…% → "1.5%"; (23.45 − 24) / 24 = −2.29…% → "2.3%".
    expect(present('managers').title).toBe('Average fare per passenger was €23.45 in May 2025, down 2.3% on May 2024');
  });

  it('says June 2025 is left out and judges each change by higher_is_better', () => {
    const p = present('leadership');
    expect(p.caption).toBe(
      'Average fare per passenger was €23.45 in May 2025, the latest complete month (June 2025 is left out: it is only covered up to 18 June 2025): ' +
        'down 2.3% on May 2024 (€24.00) and up 1.5% on April 2025 (€23.10). That is worse than May 2024 but better than April (higher is better).',
    );
    // The caption says it, so the note does not repeat it.
    expect(p.notes).toEqual([]);
  });

  it('spells the definition out for managers and analysts, with absolute changes and rows for analysts', () => {
    expect(present('managers').caption).toContain('Average fare per passenger (revenue divided by passengers) was €23.45');
    const a = present('analysts').caption;
    expect(a).toContain('Definition: revenue divided by passengers.');
    expect(a).toContain('Absolute changes: −€0.55 vs May 2024; +€0.35 vs April 2025.');
    expect(a).toContain('Based on 5,058 rows in May 2025.');
    expect(present('leadership').caption).not.toContain('divided by');
  });

  it('draws a KPI card with arrows and colours by higher_is_better', () => {
    const card = present('managers').chart as KpiCardSpec;
    expect(card.kind).toBe('kpi_card');
    expect(card.valueText).toBe('€23.45');
    expect(card.periodText).toBe('May 2025');
    expect(card.comparisons.map((c) => [c.label, c.direction, c.sentiment])).toEqual([
      ['vs May 2024', 'down', 'bad'],
      ['vs April 2025', 'up', 'good'],
    ]);
    expect(card.chip).toBe('Average fare per passenger');
    expect(card.subtitle).toBe('revenue divided by passengers · Latest complete month, May 2025, vs May 2024 and April 2025');
  });

  it('words a rate in points, and a rise in a lower-is-better rate as worse', () => {
    const rate: KpiSnapshotFinding = {
      ...fare,
      metric: 'refund_rate',
      value: 0.052,
      previous: delta('2025-04-01', 0.048, 0.052, false),
      lastYear: delta('2024-05-01', 0.052, 0.052, false),
    };
    const p = present('managers', rate, []);
    expect(p.title).toBe('Refund rate was 5.2% in May 2025, level with May 2024');
    expect(p.caption).toContain('level with May 2024 (5.2%) and up 0.4 pts on April 2025 (4.8%). That is worse than April (lower is better).');
    const card = p.chart as KpiCardSpec;
    expect(card.comparisons.map((c) => c.sentiment)).toEqual(['neutral', 'bad']);
  });

  it('falls back to the change on the month before without a year-earlier value, and to the value alone without either', () => {
    const noYear = { ...fare, lastYear: delta('2024-05-01', null, 23.45) };
    expect(present('managers', noYear).title).toBe('Average fare per passenger was €23.45 in May 2025, up 1.5% on April');
    const none = { ...noYear, previous: delta('2025-04-01', null, 23.45) };
    const p = present('managers', none, []);
    expect(p.title).toBe('Average fare per passenger was €23.45 in May 2025');
    expect(p.caption).toContain('no figure for May 2024 to compare with and no figure for April 2025 to compare with.');
  });

  it('compares a January with "December 2024", not a bare month name', () => {
    const jan = { ...fare, period: '2025-01-01', previous: delta('2024-12-01', 23.1, 23.45), lastYear: delta('2024-01-01', null, 23.45) };
    expect(present('managers', jan, []).title).toBe('Average fare per passenger was €23.45 in January 2025, up 1.5% on December 2024');
  });

  it('says so when there is no complete period', () => {
    const p = SUB_QUESTIONS.kpi_snapshot.present(answerOf('kpi_snapshot', 'revenue', [], [{ code: 'no_data', data: { start: '2025-06-01', end: '2025-07-01' } }]), ctxFor('managers'));
    expect(p.chart).toBeNull();
    expect(p.title).toBe('Revenue: no complete month to report');
  });
});

describe('kpi_by_segment presenter', () => {
  const seg = (key: string | null, value: number | null, ly: number | null, rows: number, extra: Partial<KpiSegmentRow> = {}): KpiSegmentRow => ({
    key,
    other: false,
    segments: 1,
    value,
    rows,
    previous: delta('2025-04-01', value, value),
    lastYear: delta('2024-05-01', ly, value),
    ...extra,
  });
  const f: KpiBySegmentFinding = {
    type: 'kpi_by_segment',
    metric: 'revenue',
    grain: 'month',
    dimension: 'route',
    period: '2025-05-01',
    segments: [
      seg('Mainland–Tern Holm', 78_000, 82_200, 1755),
      seg('Mainland–Saltreach', 64_500, 61_300, 1594),
      seg('Tern Holm–Saltreach', 10_400, null, 436),
      seg(null, 25_000, 26_000, 900, { other: true, segments: 2 }),
    ],
    total: { value: 177_900, rows: 4685, previous: delta('2025-04-01', 170_000, 177_900), lastYear: delta('2024-05-01', 180_000, 177_900) },
    topN: 3,
  };
  const present = (audience: Audience) => SUB_QUESTIONS.kpi_by_segment.present(answerOf('kpi_by_segment', 'revenue', [f], [], { dimension: 'route', lens: 'breakdown' }), ctxFor(audience));

  it('titles the top segment with its value and year-on-year change', () => {
    // (78,000 − 82,200) / 82,200 = −5.109…% → "down 5.1%".
    expect(present('managers').title).toBe('Mainland–Tern Holm had the highest revenue in May 2025: €78K, down 5.1% on May 2024');
  });

  it('lists segments, names the biggest mover and the segment new since last year', () => {
    const c = present('managers').caption;
    // The catalog's description names a raw column (fare_total): managers get the label alone (issue 17 item 10).
    expect(c).toContain('Revenue by route in May 2025: Mainland–Tern Holm €78K, Mainland–Saltreach €64.5K, Tern Holm–Saltreach €10.4K; all routes together €178K.');
    // Saltreach: (64,500 − 61,300) / 61,300 = +5.22% beats Tern Holm's −5.11%.
    expect(c).toContain('The biggest change on May 2024 was Mainland–Saltreach, up 5.2%.');
    expect(c).toContain('No figure a year earlier for Tern Holm–Saltreach.');
    expect(c).toContain('All others (2) combines the routes past the top 3: €25K.');
    expect(present('leadership').caption).not.toContain('All others');
    expect(present('analysts').caption).toContain('Mainland–Tern Holm n = 1,755');
  });

  it('draws bars with the change in each label and the combined tail last, in the neutral colour', () => {
    const bars = (present('managers').chart as BarsSpec).bars;
    expect(bars.map((b) => b.label)).toEqual([
      'Mainland–Tern Holm (−5.1% YoY)',
      'Mainland–Saltreach (+5.2% YoY)',
      'Tern Holm–Saltreach (new)',
      'All others (2) (−3.8% YoY)',
    ]);
    expect(bars.map((b) => b.other)).toEqual([false, false, false, true]);
    expect(bars[0]!.text).toBe('€78K');
  });

  it('names booleans by the comparison group and a missing value as "Not recorded"', () => {
    const pass: KpiBySegmentFinding = { ...f, dimension: 'pass_holder', segments: [seg(true as unknown as string, 50, 40, 100), seg(false as unknown as string, 60, 61, 100), seg(null, 5, 5, 3)] };
    const p = SUB_QUESTIONS.kpi_by_segment.present(answerOf('kpi_by_segment', 'revenue', [pass], [], { dimension: 'pass_holder' }), ctxFor('managers'));
    expect(p.caption).toContain('Other customers €60, Pass holders €50, Not recorded €5');
  });
});

describe('kpi_context presenter', () => {
  const storm: KpiContextFinding = {
    type: 'kpi_context',
    metric: 'refund_rate',
    grain: 'month',
    period: '2024-01-01',
    value: 0.2296,
    n: 25,
    firstPeriod: '2022-01-01',
    min: 0.0504,
    max: 0.2296,
    minPeriod: '2023-02-01',
    maxPeriod: '2024-01-01',
    mean: 0.0651,
    median: 0.0593,
    sd: 0.0346,
    rank: 1,
    percentile: 1,
    robustZ: 28.48,
    outlier: true,
  };
  const points: PeriodPoint[] = Array.from({ length: 25 }, (_, i) => ({
    period: `${2022 + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, '0')}-01`,
    value: i === 24 ? 0.2296 : 0.06,
    partial: false,
  }));
  const series: Finding = { type: 'series', metric: 'refund_rate', grain: 'month', points };
  const outlier: Caveat = { code: 'outlier', data: { period: '2024-01-01', grain: 'month', value: 0.2296, score: 28.48, metric: 'refund_rate' } };
  const present = (audience: Audience, f = storm) =>
    SUB_QUESTIONS.kpi_context.present(answerOf('kpi_context', 'refund_rate', [series, f], [outlier], { lens: 'summary', window: { start: '2022-01-01', end: '2024-02-01' } }), ctxFor(audience));

  it('titles the latest value with its place in the history', () => {
    expect(present('managers').title).toBe('Refund rate in January 2024 was 23.0%, the highest of the 25 complete months');
  });

  it('words the outlier by audience: plain for leadership, the test and score for analysts', () => {
    const lead = present('leadership').caption;
    expect(lead).toBe(
      'Refund rate was 23.0% in January 2024, the highest of the 25 complete months since January 2022. A typical month is about 5.9%. ' +
        'That is far above its usual level: treat it as exceptional, not as the new normal.',
    );
    expect(lead).not.toMatch(/z-score|percentile|deviation/);
    expect(present('managers').caption).toContain('the history runs from 5.0% in February 2023 to 23.0% in January 2024. That is far above the usual range, an outlier');
    const an = present('analysts').caption;
    expect(an).toContain('modified z-score 28.5 (Iglewicz–Hoaglin; |z| above 3.5 flags an outlier)');
    expect(an).toContain('Mean 6.5%, standard deviation 3.5%; percentile 100%');
    // The caption states the outlier, so the note does not repeat it.
    expect(present('managers').notes).toEqual([]);
  });

  it('uses an ordinal rank in the middle of the history and the lowest at the bottom', () => {
    const mid = { ...storm, rank: 12, value: 0.06, outlier: false, robustZ: 0.2 };
    expect(present('managers', mid).title).toBe('Refund rate in January 2024 was 6.0%, the 12th highest of the 25 complete months');
    const low = { ...storm, rank: 25, value: 0.0504, outlier: false, robustZ: -1 };
    expect(present('managers', low).title).toBe('Refund rate in January 2024 was 5.0%, the lowest of the 25 complete months');
  });

  it('draws the history as a line with its high and low marked', () => {
    const line = present('managers').chart as LineSpec;
    expect(line.kind).toBe('line');
    expect(line.points).toHaveLength(25);
    expect(line.marks.map((m) => [m.role, m.index])).toEqual([
      ['high', 24],
      ['low', 0],
    ]);
  });
});

describe('kpi_mix presenter', () => {
  const row = (key: string, value: number, share: number, lyShare: number | null, metricValue: number) => ({
    key,
    value,
    share,
    lastYearValue: lyShare === null ? null : lyShare * 1000,
    lastYearShare: lyShare,
    shareChange: lyShare === null ? null : share - lyShare,
    metricValue,
  });
  const f: KpiMixFinding = {
    type: 'kpi_mix',
    metric: 'fare_per_passenger',
    shareOf: 'passengers',
    grain: 'month',
    dimension: 'route',
    period: '2025-05-01',
    lastYearPeriod: '2024-05-01',
    segments: [
      row('Mainland–Tern Holm', 3269, 0.3463, 0.3573, 23.86),
      row('Mainland–Saltreach', 2962, 0.3137, 0.295, 21.79),
      row('Mainland–Kelpie Sound', 1356, 0.1436, 0.1443, 18.78),
      row('Mainland–Dunlin Quay', 1066, 0.1129, 0.1117, 18.0),
      row('Tern Holm–Saltreach', 789, 0.0836, 0.0917, 13.24),
    ],
    total: 9442,
    lastYearTotal: 9803,
    countToThreshold: 3,
    threshold: 0.8,
    hhi: 2586.3,
    lastYearHhi: 2564.3,
  };
  const present = (audience: Audience) => SUB_QUESTIONS.kpi_mix.present(answerOf('kpi_mix', 'fare_per_passenger', [f], [], { dimension: 'route', lens: 'distribution' }), ctxFor(audience));

  it('titles the largest share and its change in points', () => {
    // 0.3463 − 0.3573 = −0.0110 → "down 1.1 points".
    expect(present('managers').title).toBe('Mainland–Tern Holm had the largest share of passengers in May 2025: 34.6%, down 1.1 pts on May 2024');
  });

  it('counts segments to 80%, explains the base for a ratio, gives HHI only to analysts', () => {
    const m = present('managers').caption;
    // 0.3463 + 0.3137 + 0.1436 = 0.8036 → "80.4%".
    expect(m).toContain('In May 2025 the top 3 of 5 routes carried 80.4% of passengers.');
    expect(m).toContain('Shares are of passengers, the base average fare per passenger is computed over');
    expect(m).toContain('Biggest share changes since May 2024: Mainland–Saltreach +1.9 pts, Mainland–Tern Holm −1.1 pts, Tern Holm–Saltreach −0.8 pts.');
    expect(m).not.toContain('HHI');
    expect(present('analysts').caption).toContain('HHI 2,586 (highly concentrated by the 2010 DoJ/FTC bands), 2,564 in May 2024.');
    expect(present('leadership').caption).not.toMatch(/HHI|Shares are of/);
  });

  it('draws a Pareto chart of the shares with the 80% line', () => {
    const chart = present('managers').chart as ParetoSpec;
    expect(chart.kind).toBe('pareto');
    expect(chart.threshold).toBe(0.8);
    expect(chart.thresholdIndex).toBe(2);
    expect(chart.bars[0]!.label).toBe('Mainland–Tern Holm (−1.1 pts)');
    expect(chart.subtitle).toContain('in brackets, the change in share on May 2024 in points');
    expect(chart.valueLabel).toBe('Passengers');
  });
});

// ---- fuzz: no caption, title, note or chart text shows NaN, Infinity, undefined or an ISO date ----

const BAD = /NaN|Infinity|undefined|\d{4}-\d{2}-\d{2}|T\d{2}:\d{2}/;

function texts(p: Presented): string[] {
  const out = [p.title, p.caption, ...p.notes];
  if (p.takeaway) out.push(p.takeaway.text);
  const walk = (v: unknown, key: string) => {
    // A line point's `period` is data for the renderer (an ISO date by design), not text.
    if (typeof v === 'string' && key !== 'period' && key !== 'kind') out.push(v);
    else if (Array.isArray(v)) v.forEach((x) => walk(x, key));
    else if (v && typeof v === 'object') for (const [k, x] of Object.entries(v)) walk(x, k);
  };
  walk(p.chart, '');
  return out;
}

const grainArb = fc.constantFrom<Grain>('day', 'week', 'month', 'quarter', 'year');
const periodArb = fc.date({ min: new Date('2000-01-01T00:00:00Z'), max: new Date('2040-12-31T00:00:00Z'), noInvalidDate: true }).map((d) => d.toISOString().slice(0, 10));
const num = fc.oneof(fc.constant(0), fc.double({ min: -1e12, max: 1e12, noNaN: true, noDefaultInfinity: true }), fc.double({ min: -1, max: 1, noNaN: true }));
const maybe = fc.option(num, { nil: null });
const audienceArb = fc.constantFrom<Audience>('leadership', 'managers', 'analysts');
const metricArb = fc.constantFrom('revenue', 'fare_per_passenger', 'refund_rate', 'bookings', 'refunded_revenue_share', 'customers');
const keyArb = fc.oneof(fc.constantFrom('app', 'web', 'Mainland–Tern Holm', 'kiosk', ''), fc.boolean(), fc.constant(null), fc.integer({ min: -5, max: 500 }));
const deltaArb = fc.record({ period: periodArb, value: maybe, absolute: maybe, relative: maybe, improved: fc.option(fc.boolean(), { nil: null }) });
const caveatArb = fc.constantFrom<Caveat[]>([], [juneExcluded], [{ code: 'no_data', data: { start: '2025-06-01', end: '2025-07-01' } }], [{ code: 'segments_folded', data: { count: 3 } }]);

describe('KPI presenter fuzz', () => {
  it('kpi_snapshot', () => {
    fc.assert(
      fc.property(metricArb, grainArb, periodArb, maybe, fc.nat(), deltaArb, fc.option(deltaArb, { nil: null }), audienceArb, caveatArb, (metric, grain, period, value, rows, previous, lastYear, audience, caveats) => {
        const f: KpiSnapshotFinding = { type: 'kpi_snapshot', metric, grain, period, value, rows, previous, lastYear };
        const p = SUB_QUESTIONS.kpi_snapshot.present(answerOf('kpi_snapshot', metric, [f], caveats, { grain }), ctxFor(audience));
        for (const t of texts(p)) expect(t).not.toMatch(BAD);
      }),
      { numRuns: 300 },
    );
  });

  it('kpi_by_segment', () => {
    const rowArb = fc.record({ key: keyArb, other: fc.boolean(), segments: fc.nat({ max: 50 }), value: maybe, rows: fc.nat(), previous: deltaArb, lastYear: fc.option(deltaArb, { nil: null }) });
    fc.assert(
      fc.property(metricArb, grainArb, periodArb, fc.array(rowArb, { maxLength: 10 }), rowArb, fc.constantFrom('route', 'channel', 'pass_holder'), audienceArb, (metric, grain, period, segments, total, dimension, audience) => {
        const f: KpiBySegmentFinding = { type: 'kpi_by_segment', metric, grain, dimension, period, segments, total, topN: 8 };
        const p = SUB_QUESTIONS.kpi_by_segment.present(answerOf('kpi_by_segment', metric, [f], [], { grain, dimension }), ctxFor(audience));
        for (const t of texts(p)) expect(t).not.toMatch(BAD);
      }),
      { numRuns: 300 },
    );
  });

  it('kpi_context', () => {
    fc.assert(
      fc.property(metricArb, grainArb, periodArb, periodArb, fc.array(fc.record({ period: periodArb, value: maybe, partial: fc.boolean() }), { maxLength: 30 }), num, num, num, fc.integer({ min: 1, max: 200 }), fc.option(num, { nil: null }), fc.boolean(), audienceArb, (metric, grain, period, first, points, value, lo, hi, n, z, outlier, audience) => {
        const f: KpiContextFinding = {
          type: 'kpi_context', metric, grain, period, value, n, firstPeriod: first, min: Math.min(lo, hi), max: Math.max(lo, hi), minPeriod: first, maxPeriod: period,
          mean: (lo + hi) / 2, median: lo, sd: n > 1 ? Math.abs(hi - lo) : null, rank: Math.max(1, Math.min(n, Math.round(Math.abs(z ?? 1)))), percentile: 0.5, robustZ: z, outlier,
        };
        const series: Finding = { type: 'series', metric, grain, points };
        const p = SUB_QUESTIONS.kpi_context.present(answerOf('kpi_context', metric, [series, f], [], { grain }), ctxFor(audience));
        for (const t of texts(p)) expect(t).not.toMatch(BAD);
      }),
      { numRuns: 300 },
    );
  });

  it('kpi_mix', () => {
    const rowArb = fc.record({ key: keyArb, value: fc.double({ min: 0, max: 1e9, noNaN: true }), share: fc.option(fc.double({ min: 0, max: 1, noNaN: true }), { nil: null }), lastYearValue: maybe, lastYearShare: fc.option(fc.double({ min: 0, max: 1, noNaN: true }), { nil: null }), shareChange: maybe, metricValue: maybe });
    fc.assert(
      fc.property(metricArb, grainArb, periodArb, fc.option(periodArb, { nil: null }), fc.array(rowArb, { maxLength: 12 }), fc.option(fc.integer({ min: 1, max: 12 }), { nil: null }), maybe, maybe, fc.constantFrom<string | null>('passengers', 'revenue', null, 'bookings'), audienceArb, (metric, grain, period, ly, segments, count, hhi, lyHhi, shareOf, audience) => {
        const f: KpiMixFinding = {
          type: 'kpi_mix', metric, shareOf, grain, dimension: 'route', period, lastYearPeriod: ly, segments, total: segments.reduce((s, r) => s + r.value, 0), lastYearTotal: null,
          countToThreshold: count, threshold: 0.8, hhi: hhi === null ? null : Math.abs(hhi) % 10_000, lastYearHhi: lyHhi === null ? null : Math.abs(lyHhi) % 10_000,
        };
        const p = SUB_QUESTIONS.kpi_mix.present(answerOf('kpi_mix', metric, [f], [], { grain, dimension: 'route' }), ctxFor(audience));
        for (const t of texts(p)) expect(t).not.toMatch(BAD);
      }),
      { numRuns: 300 },
    );
  });
});
