// Plans from briefs: the demo request splits into its questions and each kind gets its lenses;
// calendar phrases are read against the data's coverage; edits re-shape the plan.
import { describe, expect, it } from 'vitest';
import { readRequest } from '../../bot/intake.js';
import { applyPlanEdit, buildPlan, readPlanEdit } from '../../bot/plan.js';
import { readPeriodPhrase } from '../../bot/period-phrases.js';
import { nextPrompt } from '../../bot/prompts.js';
import { exampleDataset } from '../helpers/example-config.js';

const coverage = { firstDate: '2022-01-01', lastDate: '2025-06-18', rows: 200_000 };
const now = new Date('2026-12-01T10:00:00Z');
const DEMO_REQUEST =
  'Ops review is on the 15th. Could the data team tell us whether this summer beat last summer, which routes and booking channels drove the difference, whether SkerryPass holders really travel more often than other customers since it launched, and where average fare per passenger and the share of revenue we refunded stand for the last full month?';

describe('period phrases', () => {
  it('reads "this summer" as the latest summer the data covers in full, with last summer to compare', () => {
    const p = readPeriodPhrase('whether this summer beat last summer', coverage)!;
    // Data ends 18 June 2025, so the summer of 2025 is not covered; June-August is meteorological summer (common practice).
    expect(p.window).toEqual({ start: '2024-06-01', end: '2024-09-01' });
    expect(p.compareTo).toEqual({ start: '2023-06-01', end: '2023-09-01' });
  });
  it('reads "the last full month" as the latest complete month', () => {
    expect(readPeriodPhrase('where does it stand for the last full month', coverage)!.window).toEqual({ start: '2025-05-01', end: '2025-06-01' });
  });
  it('reads "since it launched" from the launch date', () => {
    expect(readPeriodPhrase('travel more since it launched', coverage, '2023-04-01')!.window).toEqual({ start: '2023-04-01', end: '2025-06-19' });
  });
});

describe('the demo request', () => {
  const brief = readRequest(DEMO_REQUEST, exampleDataset, { now, timeZone: 'Europe/Dublin' });

  it('splits into a growth, a performance and a KPI question', () => {
    expect(brief.questions.map((q) => q.kind)).toEqual(['growth', 'performance', 'kpi']);
    expect(brief.questions[0]!.dimensions).toEqual(['route', 'channel']);
    expect(brief.questions[1]).toMatchObject({ comparisonGroup: 'skerrypass', frequency: true, metrics: [] });
    expect(brief.questions[2]!.metrics).toEqual(['fare_per_passenger', 'refunded_revenue_share']);
  });

  it('asks which metric the summer question means, and never the window (every question names its period)', () => {
    const first = nextPrompt(brief, { dataset: exampleDataset, coverage, now, locale: 'en-IE' })!;
    expect(first.topic).toBe('metrics');
    expect(first.question).toMatch(/this summer beat last summer/);
    const answered = { ...brief, questions: brief.questions.map((q, i) => (i === 0 ? { ...q, metrics: ['revenue'] } : q)), audience: 'managers' as const, grain: 'month' as const };
    expect(nextPrompt(answered, { dataset: exampleDataset, coverage, now, locale: 'en-IE' })).toBeNull();
  });
});

describe('plans', () => {
  const base = readRequest('How has revenue moved over time, by route?', exampleDataset, { now, timeZone: 'Europe/Dublin' });
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
