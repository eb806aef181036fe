// Edge cases through real SQL: a tiny CSV dataset (written here) where one route has a pass-holder
// group of one booking, one has identical fares in both groups, and one has no pass holders at
// all. Every template must give a clear finding or caveat and its captions no NaN, never throw.
import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseConfigText } from '../../../config/load.js';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { definitionOf, SUB_QUESTIONS, type TemplateName } from '../../../analysis/sub-questions/registry.js';
import type { Answer, Finding, SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';

const CONFIG = `version: 1
datasets:
  - name: trips
    label: Edge trips
    source: { kind: csv, paths: [trips.csv] }
    table: trips
    time_column: sail_date
    timezone: Europe/Dublin
    key_column: booking_id
    metrics:
      - { name: bookings, label: Bookings, definition: { type: count }, unit: count, higher_is_better: true }
      - { name: customers, label: Customers, definition: { type: distinct_count, column: customer_id }, unit: count, higher_is_better: true }
      - { name: average_fare, label: Average fare, definition: { type: average, column: fare_total }, unit: currency, currency: EUR, higher_is_better: true }
      - { name: refund_rate, label: Refund rate, definition: { type: rate, where: { column: refunded, op: is_true } }, unit: percent, higher_is_better: false }
    dimensions:
      - { name: route, column: route, label: Route }
    comparison_groups:
      - { name: pass, label: Pass, column: pass_holder, members_label: Pass holders, others_label: Other customers, launch_date: "2024-02-01", unit_column: customer_id }
`;

function csv(): string {
  const lines = ['booking_id,sail_date,route,fare_total,refunded,customer_id,pass_holder'];
  let id = 0;
  const add = (route: string, day: number, fare: number, refunded: boolean, customer: string, pass: boolean) => {
    // Day 0 is 1 January 2024; 60 days cover January and February (a leap year) exactly.
    const date = new Date(Date.UTC(2024, 0, 1 + (day % 60))).toISOString().slice(0, 10);
    lines.push(`B${id++},${date},${route},${fare.toFixed(2)},${refunded},${customer},${pass}`);
  };
  // Route A: one pass-holder booking after the launch, forty others on both sides.
  add('A', 45, 18, false, 'CA0', true);
  for (let i = 0; i < 40; i++) add('A', Math.floor(i * 1.5), 20 + (i % 7), i % 9 === 0, `CA${(i % 13) + 1}`, false);
  // Route B: identical fares in both groups (sd 0), on both sides of the launch.
  for (let i = 0; i < 35; i++) add('B', i + 25, 20, false, `CBP${i % 5}`, true);
  for (let i = 0; i < 35; i++) add('B', i + 25, 20, false, `CBO${i % 11}`, false);
  add('B', 59, 20, false, 'CBO0', false);
  // Route C: no pass holders at all.
  for (let i = 0; i < 45; i++) add('C', i + 10, 15 + (i % 5), i % 6 === 0, `CC${i % 17}`, false);
  // Routes R0–R9: small routes on their own, so a breakdown by route has more segments than the top 8.
  for (let r = 0; r < 10; r++) {
    for (let i = 0; i < 3 + r; i++) add(`R${r}`, 31 + i, 10 + r + i, false, `CR${r}P${i}`, true);
    for (let i = 0; i < 4 + r; i++) add(`R${r}`, 31 + i, 12 + r + i, false, `CR${r}O${i}`, false);
  }
  return `${lines.join('\n')}\n`;
}

let ws: Workspace;
beforeAll(async () => {
  const dir = await mkdtemp(join(tmpdir(), 'threadcount-perf-edge-'));
  await writeFile(join(dir, 'trips.csv'), csv());
  await writeFile(join(dir, 'threadcount.yaml'), CONFIG);
  ws = await openWorkspace(parseConfigText(CONFIG, join(dir, 'threadcount.yaml')));
});
afterAll(async () => {
  await ws?.source.close();
});

const TEMPLATES: { template: TemplateName; lens: SubQuestion['lens']; metrics: string[]; dimension?: string }[] = [
  { template: 'performance_compare', lens: 'summary', metrics: ['average_fare'] },
  { template: 'performance_compare', lens: 'summary', metrics: ['refund_rate'] },
  { template: 'performance_frequency', lens: 'distribution', metrics: ['bookings'] },
  { template: 'performance_before_after', lens: 'time_pattern', metrics: ['average_fare'] },
  { template: 'performance_by_segment', lens: 'breakdown', metrics: ['average_fare'], dimension: 'route' },
];

function question(t: (typeof TEMPLATES)[number], route: string): SubQuestion {
  return {
    id: `${t.template}-${route}`,
    kind: 'performance',
    lens: t.lens,
    template: t.template,
    metrics: t.metrics,
    ...(t.dimension ? { dimension: t.dimension } : {}),
    grain: 'month',
    window: { start: '2024-01-01', end: '2024-03-01' },
    filters: [{ dimension: 'route', values: [route] }],
    comparisonGroup: 'pass',
  };
}

function allFinite(value: unknown): boolean {
  if (typeof value === 'number') return Number.isFinite(value);
  if (Array.isArray(value)) return value.every(allFinite);
  if (value && typeof value === 'object') return Object.values(value).every(allFinite);
  return true;
}

function texts(answer: Answer): string[] {
  const out: string[] = [];
  for (const audience of ['leadership', 'managers', 'analysts'] as const) {
    const p = definitionOf(answer.subQuestion).present(answer, {
      dataset: ws.dataset,
      locale: 'en-IE',
      audience,
      chart: { width: 800, height: 450, scale: 1 },
      dataAsOf: ws.coverage.lastDate,
    });
    out.push(p.title, p.caption, ...p.notes, p.takeaway?.text ?? '');
    if (p.chart) out.push(p.chart.title, p.chart.subtitle, ...p.chart.footer);
  }
  return out;
}

const typeOf = <T extends Finding['type']>(a: Answer, type: T) => a.findings.filter((f): f is Extract<Finding, { type: T }> => f.type === type);

describe('edge cases through real SQL', () => {
  for (const t of TEMPLATES) {
    for (const route of ['A', 'B', 'C']) {
      it(`${t.template} (${t.metrics[0]}) on route ${route}: findings are finite and texts are clean`, async () => {
        const a = await answerSubQuestion(question(t, route), ws);
        expect(allFinite(a.findings)).toBe(true);
        for (const text of texts(a)) expect(text).not.toMatch(/NaN|Infinity|undefined|\d{4}-\d{2}-\d{2}/);
      });
    }
  }

  it('a pass-holder group of one booking: no test, a small-sample caveat, and the caption says why', async () => {
    const a = await answerSubQuestion(question(TEMPLATES[0]!, 'A'), ws);
    expect(typeOf(a, 'performance_no_test')[0]).toMatchObject({ reason: 'too_few', nFirst: 1 });
    expect(a.caveats).toContainEqual({ code: 'small_sample', data: expect.objectContaining({ n: 1, group: 'members' }) });
    expect(texts(a).join(' ')).toContain('only 1 booking: too few to test');
  });

  it('identical values in both groups: no spread to test, verdict "no clear difference"', async () => {
    const a = await answerSubQuestion(question(TEMPLATES[0]!, 'B'), ws);
    expect(typeOf(a, 'performance_no_test')[0]?.reason).toBe('no_variation');
    expect(typeOf(a, 'performance_verdict')[0]).toMatchObject({ verdict: 'no_clear_difference', direction: 'equal' });
    expect(typeOf(a, 'performance_group').map((g) => g.sd)).toEqual([0, 0]);
    expect(texts(a).join(' ')).toContain('no spread to test against');
  });

  it('no pass holders at all: an empty group is stated plainly', async () => {
    const a = await answerSubQuestion(question(TEMPLATES[0]!, 'C'), ws);
    expect(typeOf(a, 'performance_no_test')[0]).toMatchObject({ reason: 'empty_group', nFirst: 0 });
    expect(texts(a).join(' ')).toContain('There are no bookings for pass holders in this period');
  });

  it('frequency with a one-customer group and before/after with a one-row group stay finite', async () => {
    const f = await answerSubQuestion(question(TEMPLATES[2]!, 'A'), ws);
    expect(typeOf(f, 'performance_frequency_group').find((g) => g.group === 'members')).toMatchObject({ units: 1, sd: null, low: null });
    expect(typeOf(f, 'performance_no_test')[0]?.reason).toBe('too_few');
    const b = await answerSubQuestion(question(TEMPLATES[3]!, 'B'), ws);
    // Route B has members before and after the launch, all at the same fare: the DiD is exactly 0 with no interval.
    expect(typeOf(b, 'performance_did')[0]).toMatchObject({ estimate: 0, ci: null, pValue: null });
  });

  it('a breakdown with more segments than the top 8 folds the rest into one "All others" row in SQL', async () => {
    const q = { ...question(TEMPLATES[4]!, 'A'), filters: [], window: { start: '2024-02-01', end: '2024-03-01' } };
    const a = await answerSubQuestion(q, ws);
    const segments = typeOf(a, 'performance_segment');
    const folded = segments.filter((s) => s.folded);
    expect(folded).toHaveLength(1);
    // 13 routes have rows in February (A, B, C and R0–R9); the 8 kept by name are the first by the
    // metric asked (average fare), among routes with at least the rank floor's rows (segments-fold-sql.ts:
    // min(⌈½ × largest route's rows⌉, max(30, min(100, ⌈1% of all rows⌉)))), those under it after, by fare.
    const feb = csv()
      .trim()
      .split('\n')
      .slice(1)
      .map((l) => l.split(','))
      .filter((c) => c[1]! >= '2024-02-01' && c[1]! < '2024-03-01');
    const byRoute = new Map<string, { rows: number; fare: number; members: number; others: number }>();
    for (const c of feb) {
      const r = byRoute.get(c[2]!) ?? { rows: 0, fare: 0, members: 0, others: 0 };
      r.rows++;
      r.fare += Number(c[3]);
      if (c[6] === 'true') r.members++;
      else r.others++;
      byRoute.set(c[2]!, r);
    }
    expect(byRoute.size).toBe(13);
    const rows = [...byRoute.values()].map((r) => r.rows);
    const floor = Math.min(Math.ceil(0.5 * Math.max(...rows)), Math.max(30, Math.min(100, Math.ceil(0.01 * feb.length))));
    const ranked = [...byRoute.entries()].sort(([ka, a], [kb, b]) => Number(b.rows >= floor) - Number(a.rows >= floor) || b.fare / b.rows - a.fare / a.rows || b.rows - a.rows || ka.localeCompare(kb));
    expect(segments.filter((s) => !s.folded).map((s) => s.segment)).toEqual(ranked.slice(0, 8).map(([k]) => k));
    expect(folded[0]!.segmentCount).toBe(5);
    expect(folded[0]!.segment).toBeNull();
    const rest = ranked.slice(8).map(([, r]) => r);
    expect(folded[0]!.nMembers).toBe(rest.reduce((s, r) => s + r.members, 0));
    expect(folded[0]!.nOthers).toBe(rest.reduce((s, r) => s + r.others, 0));
    const consistency = typeOf(a, 'performance_consistency')[0]!;
    expect(consistency.pick).toEqual({ rule: 'ranked', shown: 8, folded: 5, order: 'highest', floorRows: floor });
    const chart = SUB_QUESTIONS['performance_by_segment'].present(a, {
      dataset: ws.dataset,
      locale: 'en-IE',
      audience: 'managers',
      chart: { width: 800, height: 450, scale: 1 },
      dataAsOf: ws.coverage.lastDate,
    }).chart;
    expect(chart?.kind === 'bars' && chart.bars.some((b) => b.label.startsWith('All others (5)'))).toBe(true);
  });
});
