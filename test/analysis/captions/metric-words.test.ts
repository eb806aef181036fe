// Item 10 of issue 17: managers and leadership never read a raw column name ("sum of fare_total");
// analysts keep the catalog's own words. Checked on hand-made catalogs, then over whole plans of
// every request kind on the demo and the two fixture datasets of other trades (test/helpers/whole-plans.ts).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { managerWords, metricMeaning } from '../../../analysis/captions/metric-words.js';
import type { Audience } from '../../../analysis/types.js';
import type { DatasetConfig, Metric } from '../../../config/schema.js';
import { answerPlans, closeWorkspaces, openPlanWorkspaces, planCases, type NamedWorkspace, type PlannedAnswer } from '../../helpers/whole-plans.js';

const ds = {
  dimensions: [{ name: 'class', column: 'fare_class', label: 'Fare class' }],
  comparison_groups: [{ name: 'pass', column: 'is_pass_holder', label: 'SkerryPass holders' }],
  metrics: [
    { name: 'revenue', label: 'Revenue', definition: { type: 'sum', column: 'fare_total' } },
    { name: 'passengers', label: 'Passengers', definition: { type: 'sum', column: 'pax' } },
  ],
} as unknown as DatasetConfig;

describe('metric meanings in words', () => {
  it('keeps a column name for analysts; managers get no words that would need one (the label says it)', () => {
    const revenue = { name: 'revenue', label: 'Revenue', definition: { type: 'sum', column: 'fare_total' } } as Metric;
    expect(metricMeaning(revenue, ds, 'analysts')).toBe('sum of fare_total');
    // Not "sum of fare total": a raw name spelled out is still a raw name.
    expect(metricMeaning(revenue, ds, 'managers')).toBe('');
    expect(metricMeaning(revenue, ds, 'leadership')).toBe('');
    const described = { ...revenue, description: 'fares paid, before refunds' } as Metric;
    expect(metricMeaning(described, ds, 'managers')).toBe('fares paid, before refunds');
  });

  it("reads a breakdown's or group's column as its label and a money code in capitals; leaves any other name unsaid", () => {
    expect(managerWords('revenue where fare_class is car', ds)).toBe('revenue where fare class is car');
    expect(managerWords('share of rows where is_pass_holder is true', ds)).toBe('share of rows where SkerryPass holders is true');
    expect(managerWords('sum of revenue_eur', ds)).toBe('sum of revenue (EUR)');
    expect(managerWords('mean of waitMinutes', ds)).toBeNull();
    expect(managerWords('sum of fare_total over all bookings', ds)).toBeNull();
    // Ordinary words and hyphenated words are left alone.
    expect(managerWords('bookings sailing in the month, one-way fares', ds)).toBe('bookings sailing in the month, one-way fares');
  });

  it('words a ratio from its parts, falling back to it when the description names a column', () => {
    const fare = { name: 'fare', label: 'Average fare', definition: { type: 'ratio', numerator: 'revenue', denominator: 'passengers' } } as Metric;
    expect(metricMeaning(fare, ds, 'managers')).toBe('revenue divided by passengers');
    const described = { ...fare, description: 'fare_total over pax, both summed' } as Metric;
    expect(metricMeaning(described, ds, 'analysts')).toBe('fare_total over pax, both summed');
    expect(metricMeaning(described, ds, 'managers')).toBe('revenue divided by passengers');
  });
});

/** Column names a manager would not say: with an underscore or inner capitals. */
function rawColumns(d: DatasetConfig): string[] {
  const cols = new Set<string>();
  for (const m of d.metrics) {
    const def = m.definition as { column?: string; where?: { column: string } };
    if (def.column) cols.add(def.column);
    if (def.where) cols.add(def.where.column);
  }
  for (const dim of d.dimensions) cols.add(dim.column);
  for (const g of d.comparison_groups) cols.add(g.column);
  return [...cols].filter((c) => /_|[a-z][A-Z]/.test(c));
}

function textsOf(a: PlannedAnswer, audience: Audience): string[] {
  const p = a.presented[audience];
  return [p.title, p.caption, ...(p.chart ? [p.chart.title, p.chart.subtitle, p.chart.chip ?? ''] : [])];
}

describe('whole plans on three datasets', () => {
  let spaces: NamedWorkspace[] = [];
  const answers = new Map<string, PlannedAnswer[]>();
  beforeAll(async () => {
    spaces = await openPlanWorkspaces();
    // Monthly, whole history, every request kind: the words do not depend on the grain or window.
    for (const s of spaces) answers.set(s.name, await answerPlans(s.ws, planCases(s.ws).filter((c) => c.brief.grain === 'month' && c.label.endsWith(', all'))));
  }, 600_000);
  afterAll(async () => closeWorkspaces(spaces));

  it('no manager or leadership title, caption or chart header names a raw column; analysts still may', () => {
    let analystMentions = 0;
    for (const s of spaces) {
      const cols = rawColumns(s.ws.dataset);
      expect(cols.length, s.name).toBeGreaterThan(0);
      const found = (text: string) => cols.filter((c) => new RegExp(`\\b${c}\\b`).test(text));
      for (const a of answers.get(s.name)!) {
        for (const audience of ['managers', 'leadership'] as const) {
          for (const text of textsOf(a, audience)) expect(found(text), `${s.name} · ${a.caseLabel} · ${audience}: ${text}`).toEqual([]);
        }
        analystMentions += textsOf(a, 'analysts').filter((t) => found(t).length > 0).length;
      }
    }
    // The check can fail: the analysts' definitions do name the columns.
    expect(analystMentions).toBeGreaterThan(0);
  });

  it("every chart's chip names one of the dataset's metrics", () => {
    for (const s of spaces) {
      const labels = new Set(s.ws.dataset.metrics.map((m) => m.label));
      for (const a of answers.get(s.name)!) {
        const chart = a.presented.managers.chart;
        if (!chart || chart.kind === 'period_table') continue;
        expect(labels.has(chart.chip ?? ''), `${s.name} · ${a.answer.subQuestion.template}: ${chart.chip}`).toBe(true);
      }
    }
  });
});
