// Plans from briefs: the demo request splits into its questions and each kind gets its lenses;
// calendar phrases are read against the data's coverage; edits re-shape the plan.
import { describe, expect, it } from 'vitest';
import type { Brief, Question } from '../../bot/brief.js';
import { applyPlanEdit, buildPlan, MAX_TABLE_METRICS, readPlanEdit } from '../../bot/plan.js';
import { planText } from '../../bot/replies.js';
import { nextPrompt } from '../../bot/prompts.js';
import { briefDefaults, withDefaults } from '../../bot/brief-defaults.js';
import { readRequest as readWith } from '../../bot/reading/read-request.js';
import { exampleDataset } from '../helpers/example-config.js';
import { exampleFacts } from '../helpers/example-facts.js';

const coverage = exampleFacts.coverage;
const now = new Date('2026-12-01T10:00:00Z');
const readRequest = (text: string) => readWith(text, exampleFacts, { now });
const facts = exampleFacts;
const DEMO_REQUEST =
  'Ops review is on the 15th. Could the data team tell us whether this summer beat last summer, which routes and booking channels drove the difference, whether SkerryPass holders really travel more often than other customers since it launched, and where average fare per passenger and the share of revenue we refunded stand for the last full month?';

describe('the demo request', () => {
  const brief = readRequest(DEMO_REQUEST);

  it('splits into a growth, a performance and a KPI question', () => {
    expect(brief.questions.map((q) => q.kind)).toEqual(['growth', 'performance', 'kpi']);
    expect(brief.questions[0]!.dimensions).toEqual(['route', 'channel']);
    expect(brief.questions[1]).toMatchObject({ comparisonGroup: 'skerrypass', frequency: true, metrics: ['bookings'] });
    expect(brief.questions[2]!.metrics).toEqual(['fare_per_passenger', 'refunded_revenue_share']);
    // "since it launched" is the pass question's own period: the "it" is the launch, not a pointer
    // back to the summer asked before (which would compare the groups over 18 days of June).
    expect(brief.questions[1]!.window?.start).toBe(brief.questions[1]!.launchDate);
    expect(brief.questions[1]!.compareWindow).toBeUndefined();
  });

  it('asks nothing: the summer question takes the headline measure, said as assumed on the card; a request with no measure at all is asked', () => {
    expect(nextPrompt(brief, { dataset: exampleDataset, coverage, facts, now, locale: 'en-IE' })).toBeNull();
    const defaults = briefDefaults(brief, exampleDataset, coverage);
    expect(defaults.metric).toEqual({ value: exampleDataset.metrics[0]!.name, reason: 'the headline measure of this dataset' });
    expect(withDefaults(brief, defaults).questions[0]!.metrics).toEqual([exampleDataset.metrics[0]!.name]);
    const none = readRequest('did this summer beat last summer?');
    expect(nextPrompt(none, { dataset: exampleDataset, coverage, facts, now, locale: 'en-IE' })!.topic).toBe('metrics');
  });
});

describe('plans', () => {
  const base = readRequest('How has revenue moved over time, by route?');
  const brief = { ...base, audience: 'analysts' as const, grain: 'month' as const, window: { start: '2022-01-01', end: '2025-06-19' } };

  it('gives every sub-question a catalog metric, a window and an id in order', () => {
    const plan = buildPlan(brief, exampleDataset, coverage);
    expect(plan.items.length).toBeGreaterThan(0);
    plan.items.forEach((sq, i) => {
      expect(sq.id).toBe(`q${i + 1}`);
      expect(exampleDataset.metrics.map((m) => m.name)).toContain(sq.metrics[0]);
      expect(sq.window.start < sq.window.end).toBe(true);
    });
    expect(plan.items[0]).toMatchObject({ template: 'series', kind: 'trend', lens: 'time_pattern' });
  });

  it('plans no item twice when two questions come to the same thing (issue 17 item 11)', () => {
    // Two sentences, both read as a trend of the same measure over the same period.
    const twice = withDefaults(readRequest('How has revenue moved over time, month by month? We want to see the busiest and quietest months.'), briefDefaults(readRequest('How has revenue moved over time, month by month?'), exampleDataset, coverage));
    const plan = buildPlan(twice, exampleDataset, coverage);
    const keys = [...plan.items, ...plan.leftOut].map(({ id: _id, ...sq }) => JSON.stringify(sq, Object.keys(sq).sort()));
    expect(keys.length).toBeGreaterThan(1);
    expect(new Set(keys).size).toBe(keys.length);
    // The whole set of answers is still planned: the one question's are all there.
    const once = buildPlan(withDefaults(readRequest('How has revenue moved over time, month by month?'), briefDefaults(readRequest('How has revenue moved over time, month by month?'), exampleDataset, coverage)), exampleDataset, coverage);
    expect(plan.items.map((sq) => sq.template)).toEqual(expect.arrayContaining(once.items.map((sq) => sq.template)));
  });

  it('reads edits: drop, grain, go, cancel', () => {
    expect(readPlanEdit('drop 1 and 3')).toEqual({ type: 'drop', numbers: [1, 3] });
    expect(readPlanEdit('make it weekly')).toEqual({ type: 'grain', grain: 'week' });
    expect(readPlanEdit('Go')).toEqual({ type: 'agree' });
    expect(readPlanEdit('cancel please')).toEqual({ type: 'cancel' });
    expect(readPlanEdit('what?')).toEqual({ type: 'unknown' });
    expect(readPlanEdit('add a breakdown by channel')).toEqual({ type: 'add_breakdown', phrase: 'channel' });
    expect(readPlanEdit('can you break it down by route?')).toEqual({ type: 'add_breakdown', phrase: 'route' });
    expect(readPlanEdit('use 2024 instead')).toEqual({ type: 'window', phrase: '2024' });
    expect(readPlanEdit('since 2023-04')).toEqual({ type: 'window', phrase: 'since 2023-04' });
  });

  it('refuses to drop an item that does not exist or every item', () => {
    const plan = buildPlan(brief, exampleDataset, coverage);
    expect(applyPlanEdit(plan, { type: 'drop', numbers: [99] }).error).toMatch(/no 99/);
    const all = plan.items.map((_, i) => i + 1);
    expect(applyPlanEdit(plan, { type: 'drop', numbers: all }).error).toMatch(/drop every item/);
  });
});

describe('the period table in the plan', () => {
  // Briefs built directly, as the request reader will hand them over.
  const question = (metrics: string[], extra: Partial<Question> = {}): Question => ({ text: 'the numbers', kind: 'growth', metrics, dimensions: [], filters: [], frequency: false, ...extra });
  const brief = (questions: Question[], extra: Partial<Brief> = {}): Brief => ({
    requestText: 'revenue, bookings and average fare per booking month by month for 2023 and 2024',
    questions,
    kinds: [...new Set(questions.map((q) => q.kind))],
    metrics: [...new Set(questions.flatMap((q) => q.metrics))],
    dimensions: [],
    unknownTerms: [],
    grain: 'month',
    window: { start: '2023-01-01', end: '2025-01-01' },
    audience: 'managers',
    ...extra,
  });
  const THREE = ['revenue', 'bookings', 'average_fare'];

  it('opens the plan with one table of the metrics named, at the brief’s grain and window', () => {
    const plan = buildPlan(brief([question(THREE)]), exampleDataset, coverage);
    expect(plan.items[0]).toEqual({ id: 'q1', kind: 'trend', lens: 'time_pattern', template: 'period_table', metrics: THREE, grain: 'month', window: { start: '2023-01-01', end: '2025-01-01' }, filters: [] });
    expect(plan.items.filter((sq) => sq.template === 'period_table')).toHaveLength(1);
    // The plan says what it is in words.
    expect(planText(plan, exampleDataset, 'en-IE')).toMatch(/^1\. A table of revenue, bookings and average fare per booking month by month \(January 2023 to December 2024\)/m);
  });

  it('plans no table for one metric, or without a grain, unless the numbers period by period are asked for', () => {
    const one = buildPlan(brief([question(['revenue'])]), exampleDataset, coverage);
    expect(one.items.some((sq) => sq.template === 'period_table')).toBe(false);
    const noGrain = buildPlan(brief([question(THREE)], { grain: undefined }), exampleDataset, coverage);
    expect(noGrain.items.some((sq) => sq.template === 'period_table')).toBe(false);
    const asked = buildPlan(brief([question(['revenue'], { table: true })], { grain: 'quarter' }), exampleDataset, coverage);
    expect(asked.items[0]).toMatchObject({ template: 'period_table', metrics: ['revenue'], grain: 'quarter' });
  });

  it('stays first and kept for leadership, and splits five metrics into tables of three and two', () => {
    const lead = buildPlan(brief([question(THREE)], { audience: 'leadership' }), exampleDataset, coverage);
    expect(lead.items[0]!.template).toBe('period_table');
    const five = buildPlan(brief([question(['revenue', 'bookings', 'average_fare', 'refund_rate', 'customers'])]), exampleDataset, coverage);
    expect(five.items.slice(0, 2).map((sq) => [sq.template, sq.metrics.length])).toEqual([
      ['period_table', 3],
      ['period_table', 2],
    ]);
    expect(MAX_TABLE_METRICS).toBe(4);
  });

  it('can be dropped like any item, and takes no breakdown', () => {
    const plan = buildPlan(brief([question(THREE)]), exampleDataset, coverage);
    const dropped = applyPlanEdit(plan, { type: 'drop', numbers: [1] }).plan;
    expect(dropped.items.some((sq) => sq.template === 'period_table')).toBe(false);
    expect(dropped.items[0]!.id).toBe('q1');
    const broken = applyPlanEdit(plan, { type: 'add_breakdown', phrase: 'route', dimension: 'route' }).plan;
    expect(broken.items.filter((sq) => sq.dimension === 'route').every((sq) => sq.metrics.length === 1)).toBe(true);
  });
});

describe('two values set against each other (issue 16)', () => {
  it('plans value_compare first for each metric when the request sets two values against each other', () => {
    const read = readRequest('Did phone bookings grow faster than kiosk bookings in 2024?');
    // The reader leaves the measure to a prompt here; the brief is as it stands after "bookings" is answered.
    const brief: Brief = { ...read, metrics: ['bookings', 'revenue'], questions: read.questions.map((x) => ({ ...x, metrics: ['bookings', 'revenue'] })) };
    const q = brief.questions.find((x) => x.contrast);
    expect(q?.contrast).toEqual({ dimension: 'channel', values: ['phone', 'kiosk'] });
    const plan = buildPlan(brief, exampleDataset, coverage);
    const head = plan.items.find((sq) => sq.template !== 'period_table')!;
    expect(head).toMatchObject({ template: 'value_compare', dimension: 'channel', contrast: { dimension: 'channel', values: ['phone', 'kiosk'] } });
    expect(plan.items.filter((sq) => sq.template === 'value_compare').map((sq) => sq.metrics[0])).toEqual(['bookings', 'revenue']);
    expect(plan.items.slice(0, 2).map((sq) => sq.template)).toEqual(['value_compare', 'value_compare']);
    expect(planText(plan, exampleDataset, 'en-IE')).toMatch(/phone against kiosk/);
  });

  it('plans no value_compare without a contrast', () => {
    const read = readRequest('How did bookings grow in 2024 by channel?');
    const plan = buildPlan({ ...read, metrics: ['bookings'], questions: read.questions.map((x) => ({ ...x, metrics: ['bookings'] })) }, exampleDataset, coverage);
    expect(plan.items.length).toBeGreaterThan(0);
    expect(plan.items.some((sq) => sq.template === 'value_compare')).toBe(false);
  });
});

describe('a grain finer than the data is stamped', () => {
  it('is read at the finest grain there is, and the card says why (data stamped once a month has no daily figures)', () => {
    const monthly = { ...coverage, stamps: 'monthly' as const };
    const brief = readRequest('What was daily revenue in 2024?');
    expect(brief.grain).toBe('day');
    const defaults = briefDefaults(brief, exampleDataset, monthly);
    expect(defaults.grainCapped).toMatchObject({ asked: 'day', value: 'month' });
    expect(defaults.grainCapped!.reason).toMatch(/stamped monthly, so monthly is the finest there is/);
    expect(withDefaults(brief, defaults).grain).toBe('month');
    // A grain the stamps allow is kept as read.
    expect(briefDefaults(readRequest('What was quarterly revenue in 2024?'), exampleDataset, monthly).grainCapped).toBeUndefined();
    // With nothing asked, the recommendation is never finer than the stamps either.
    expect(briefDefaults(readRequest('How has revenue moved?'), exampleDataset, { ...coverage, stamps: 'quarterly' as const, firstDate: '2024-01-01', lastDate: '2024-03-01' }).grain.value).toBe('quarter');
  });
});

describe('the size cap keeps what was asked (issue 17 item 13)', () => {
  const trend = (metrics: string[], dimensions: string[]): Question => ({ text: 'how have they moved', kind: 'trend', metrics, dimensions, filters: [], frequency: false });
  const brief = (questions: Question[], audience: Brief['audience']): Brief => ({
    requestText: 'how have they moved, by route and channel',
    questions,
    kinds: [...new Set(questions.map((q) => q.kind))],
    metrics: [...new Set(questions.flatMap((q) => q.metrics))],
    dimensions: [...new Set(questions.flatMap((q) => q.dimensions))],
    unknownTerms: [],
    grain: 'quarter',
    window: { start: '2022-01-01', end: '2025-06-19' },
    audience,
  });
  const nearDuplicates = ['trend_test', 'trend_summary'];

  it('for leadership: every named metric and breakdown before a second line of the same series', () => {
    const plan = buildPlan(brief([trend(['revenue', 'bookings'], ['route'])], 'leadership'), exampleDataset, coverage);
    expect(plan.items).toHaveLength(6);
    const kept = plan.items.map((sq) => `${sq.template}:${sq.metrics[0]}${sq.dimension ? `:${sq.dimension}` : ''}`);
    // Each metric's headline and its breakdowns by the route asked for.
    expect(kept).toEqual(expect.arrayContaining(['series:revenue', 'series:bookings', 'segment_trend:revenue:route', 'segment_trend:bookings:route']));
    // The lines that repeat the series (its trend line, its mean) are the first to go.
    expect(plan.items.some((sq) => nearDuplicates.includes(sq.template))).toBe(false);
    expect(plan.leftOut.filter((sq) => nearDuplicates.includes(sq.template))).toHaveLength(4);
  });

  it('for managers: no named metric is dropped whole when a long plan is cut', () => {
    const metrics = ['revenue', 'bookings', 'passengers', 'customers', 'average_fare'];
    const plan = buildPlan(brief([trend(metrics, ['route', 'channel'])], 'managers'), exampleDataset, coverage);
    expect(plan.leftOut.length).toBeGreaterThan(0);
    for (const m of metrics) expect(plan.items.some((sq) => sq.metrics.includes(m) && sq.template === 'series'), m).toBe(true);
    // Every named breakdown is kept for the first metric at least, and no near-duplicate line is kept while a breakdown is left out.
    for (const d of ['route', 'channel']) expect(plan.items.some((sq) => sq.dimension === d), d).toBe(true);
    if (plan.leftOut.some((sq) => sq.dimension !== undefined)) expect(plan.items.some((sq) => nearDuplicates.includes(sq.template))).toBe(false);
  });

  it('drops a breakdown the plan chose itself before one the request named', () => {
    const perf = (dimensions: string[]): Question => ({ text: 'do pass holders spend more', kind: 'performance', metrics: ['revenue', 'bookings', 'average_fare'], dimensions, filters: [], frequency: false, comparisonGroup: 'skerrypass' });
    const b = { ...brief([perf([]), trend(['refund_rate'], ['channel'])], 'leadership'), comparisonGroup: 'skerrypass' };
    const plan = buildPlan(b, exampleDataset, coverage);
    // The channel breakdown asked for is kept; the performance breakdown by the catalog's first dimension, not asked for, goes.
    expect(plan.items.some((sq) => sq.template === 'segment_trend' && sq.dimension === 'channel')).toBe(true);
    expect(plan.leftOut.some((sq) => sq.template === 'performance_by_segment')).toBe(true);
  });
});

describe('two questions about one measure', () => {
  it('"How fast has revenue grown per year, and when in the year is it highest?": a growth and a season question, no item twice', () => {
    const brief = readRequest('How fast has revenue grown per year, and when in the year is it highest?');
    // "it" points back for the measure; "when in the year" asks its own thing (found on NOAA CO2: both read as growth, every item planned twice).
    expect(brief.questions.map((q) => q.kind)).toEqual(['growth', 'trend']);
    const plan = buildPlan(withDefaults(brief, briefDefaults(brief, exampleDataset, coverage)), exampleDataset, coverage);
    expect(plan.items.map((sq) => sq.template)).toContain('trend_seasonality');
    const described = plan.items.map((sq) => JSON.stringify({ ...sq, id: '' }));
    expect(new Set(described).size).toBe(described.length);
    // The shared line keeps the rate unit the growth question asked for.
    expect(plan.items.filter((sq) => sq.template === 'series')).toHaveLength(1);
  });
});

describe('a ranking asked by value ("worst 5", "lowest 3") carries its direction to a ranking answer', () => {
  it('"average fare per passenger by route, lowest 5": the direction is read and a ranking heads the plan', () => {
    const brief = readRequest('Average fare per passenger by route, lowest 5');
    expect(brief.questions[0]).toMatchObject({ rankLimit: 5, rankOrder: 'lowest', dimensions: ['route'] });
    const plan = buildPlan(brief, exampleDataset, coverage);
    const ranking = plan.items.find((i) => i.template === 'segment_shares');
    expect(ranking).toMatchObject({ rankLimit: 5, rankOrder: 'lowest', dimension: 'route', metrics: ['fare_per_passenger'] });
    // Every answer of the question is told the direction (the route trends name the same five).
    expect(plan.items.find((i) => i.template === 'segment_trend')).toMatchObject({ rankOrder: 'lowest' });
  });

  it('"top 5 routes" keeps ranking by size: no direction is read', () => {
    const brief = readRequest('Average fare per passenger, top 5 routes');
    expect(brief.questions[0]!.rankLimit).toBe(5);
    expect(brief.questions[0]!.rankOrder).toBeUndefined();
  });
});
