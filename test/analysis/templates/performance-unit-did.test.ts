// "Are pass holders travelling more since launch?" asks about the same people before and after, so
// performance_before_after compares a group with a customer key per customer per month (the units
// of analysis-unit-did.ts), never per booking. Checked on the demo data (invented Skerrywake
// bookings) against the test's own per-customer reduction of the raw rows in plain JavaScript:
// - SkerryPass: no pass holder booked before the launch, so there is no one to follow across it
//   and the answer says so, with the counts of customers left out;
// - a group whose members did exist before (customers with a refunded booking after 2024-01-01,
//   a group made for this test on the demo's own `refunded` column): panel sizes, means, the
//   difference in differences and its relative form match the reduction exactly, and the
//   bootstrap interval agrees with the normal interval of the per-customer changes (common
//   practice: a percentile bootstrap of a mean over thousands of units is close to normal).
import { DuckDBInstance } from '@duckdb/node-api';
import { beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { PerformanceUnitDidFinding } from '../../../analysis/findings/performance.js';
import { definitionOf, SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { Answer, Finding, ResultTable, SubQuestion } from '../../../analysis/types.js';
import type { DatasetConfig } from '../../../config/schema.js';
import { presentContext } from '../../../bot/present-answer.js';
import { demoFixture, useDemoWorkspace } from '../../helpers/demo-fixture.js';

const workspace = useDemoWorkspace();
type Raw = { customer: string; day: string; pass: boolean; refunded: boolean; passengers: number };
let raw: Raw[];

beforeAll(async () => {
  const db = await DuckDBInstance.create((await demoFixture()).databasePath, { access_mode: 'READ_ONLY' });
  const con = await db.connect();
  const r = await con.runAndReadAll('SELECT customer_id, CAST(sail_date AS VARCHAR), pass_holder, refunded, passengers FROM bookings');
  raw = (r.getRows() as [string, string, boolean, boolean, number][]).map(([customer, day, pass, refunded, passengers]) => ({ customer, day, pass, refunded, passengers: Number(passengers) }));
  con.closeSync();
  db.closeSync();
}, 300_000);

function sq(extra: Partial<SubQuestion>): SubQuestion {
  return {
    id: 'ba',
    kind: 'performance',
    lens: 'time_pattern',
    template: 'performance_before_after',
    metrics: ['bookings'],
    grain: 'month',
    window: { start: '2022-01-01', end: '2025-06-19' },
    filters: [],
    comparisonGroup: 'skerrypass',
    ...extra,
  };
}

/** Per customer over [start, end): member flag (any flagged row after the launch, else any), rows and a value per side. */
function reduce(flag: (r: Raw) => boolean, value: (r: Raw) => number, start: string, launch: string, end: string) {
  const units = new Map<string, { after: boolean | null; any: boolean; nb: number; na: number; vb: number; va: number }>();
  for (const r of raw) {
    if (r.day < start || r.day >= end) continue;
    const u = units.get(r.customer) ?? { after: null, any: false, nb: 0, na: 0, vb: 0, va: 0 };
    u.any ||= flag(r);
    if (r.day >= launch) {
      u.after = (u.after ?? false) || flag(r);
      u.na++;
      u.va += value(r);
    } else {
      u.nb++;
      u.vb += value(r);
    }
    units.set(r.customer, u);
  }
  const out = { members: [] as { b: number; a: number }[], others: [] as { b: number; a: number }[], entered: { members: 0, others: 0 }, left: { members: 0, others: 0 } };
  for (const u of units.values()) {
    const role = (u.after ?? u.any) ? 'members' : 'others';
    if (u.nb > 0 && u.na > 0) out[role].push({ b: u.vb, a: u.va });
    else if (u.na > 0) out.entered[role]++;
    else out.left[role]++;
  }
  return out;
}

const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / xs.length;
const variance = (xs: number[]) => {
  const m = mean(xs);
  return xs.reduce((s, x) => s + (x - m) ** 2, 0) / (xs.length - 1);
};
const unitDid = (a: Answer) => a.findings.find((f): f is PerformanceUnitDidFinding => f.type === 'performance_unit_did')!;

describe('SkerryPass: pass holders first appear after the launch', () => {
  it('follows no pass holder across the launch, counts those left out, and says so', async () => {
    const a = await answerSubQuestion(sq({ metrics: ['passengers'] }), workspace());
    const did = unitDid(a);
    // Equal windows of 12 whole months either side of 1 April 2023 (the data starts in January 2022).
    const periods = a.findings.find((f) => f.type === 'performance_periods')!;
    expect(periods).toMatchObject({ before: { start: '2022-04-01', end: '2023-04-01' }, after: { start: '2023-04-01', end: '2024-04-01' }, months: 12 });
    const ref = reduce((r) => r.pass, (r) => r.passengers, '2022-04-01', '2023-04-01', '2024-04-01');
    expect(ref.members).toHaveLength(0);
    expect(did.groups.members).toMatchObject({ panel: 0, enteredAfter: ref.entered.members, leftBefore: ref.left.members, before: null });
    expect(did.groups.others.panel).toBe(ref.others.length);
    expect(did.groups.others.enteredAfter).toBe(ref.entered.others);
    expect(did.groups.others.leftBefore).toBe(ref.left.others);
    expect(did.groups.others.before!).toBeCloseTo(mean(ref.others.map((u) => u.b)) / 12, 10);
    expect(did.groups.others.after!).toBeCloseTo(mean(ref.others.map((u) => u.a)) / 12, 10);
    expect(did.estimate).toBeNull();
    // The chart's monthly points average over the same customers: their twelve months add up to the window's mean.
    const others = a.findings.find((f) => f.type === 'performance_group_series' && f.group === 'others') as Extract<Finding, { type: 'performance_group_series' }>;
    expect(others.quantity).toBe('per_unit_month');
    const afterPoints = others.points.filter((p) => p.period >= '2023-04-01').map((p) => p.value!);
    expect(afterPoints).toHaveLength(12);
    expect(mean(afterPoints)).toBeCloseTo(did.groups.others.after!, 10);
    const p = SUB_QUESTIONS.performance_before_after.present(a, presentContext(workspace(), 'managers'));
    expect(p.title).toBe('Passengers per customer per month: no pass holders to follow across the launch');
    expect(p.caption).toContain('no difference in differences');
    expect(p.caption).toContain(`${ref.entered.members.toLocaleString('en-IE')} pass holders and ${ref.entered.others.toLocaleString('en-IE')} other customers first seen after the launch`);
    expect(p.notes.join(' ')).toMatch(/chose to join/);
    expect(p.notes.join(' ')).toMatch(/months without a booking count as 0/);
  });
});

describe('a group whose members were customers before the launch', () => {
  const LAUNCH = '2024-01-01';
  let dataset: DatasetConfig;
  let a: Answer;
  beforeAll(async () => {
    const ws = workspace();
    dataset = {
      ...ws.dataset,
      comparison_groups: [
        ...ws.dataset.comparison_groups,
        { name: 'refund_customers', label: 'Refunds', synonyms: [], column: 'refunded', members_label: 'Refunded customers', others_label: 'Other customers', launch_date: LAUNCH, unit_column: 'customer_id' },
      ],
    };
    const q = sq({ comparisonGroup: 'refund_customers' });
    const template = definitionOf(q).template;
    const queries = template.compile(q, { ...ws.context, dataset });
    const tables: Record<string, ResultTable> = {};
    for (const query of queries) tables[query.name] = await ws.source.run(query, ws.runOptions);
    a = { subQuestion: q, queries, tables, ...template.read(q, tables, { dataset, coverage: ws.coverage }) };
  }, 120_000);

  it('compares the same customers per month, with the difference in differences of the plain reduction', () => {
    const did = unitDid(a);
    expect(a.findings.find((f) => f.type === 'performance_periods')).toMatchObject({ before: { start: '2023-01-01' }, after: { end: '2025-01-01' }, months: 12 });
    const ref = reduce((r) => r.refunded, () => 1, '2023-01-01', LAUNCH, '2025-01-01');
    expect(ref.members.length).toBeGreaterThan(100);
    expect(did.groups.members.panel).toBe(ref.members.length);
    expect(did.groups.others.panel).toBe(ref.others.length);
    expect(did.groups.members.enteredAfter).toBe(ref.entered.members);
    expect(did.groups.others.leftBefore).toBe(ref.left.others);
    const [mb, ma, ob, oa] = [mean(ref.members.map((u) => u.b)) / 12, mean(ref.members.map((u) => u.a)) / 12, mean(ref.others.map((u) => u.b)) / 12, mean(ref.others.map((u) => u.a)) / 12];
    expect(did.groups.members.before!).toBeCloseTo(mb, 12);
    expect(did.groups.members.after!).toBeCloseTo(ma, 12);
    expect(did.estimate!).toBeCloseTo(ma - mb - (oa - ob), 12);
    expect(did.relative!).toBeCloseTo((ma - mb - (oa - ob)) / (mb + oa - ob), 12);
  });

  it('gives a bootstrap interval over customers close to the normal interval of their changes', () => {
    const did = unitDid(a);
    const ref = reduce((r) => r.refunded, () => 1, '2023-01-01', LAUNCH, '2025-01-01');
    const dm = ref.members.map((u) => (u.a - u.b) / 12);
    const dOthers = ref.others.map((u) => (u.a - u.b) / 12);
    const se = Math.sqrt(variance(dm) / dm.length + variance(dOthers) / dOthers.length);
    const [lo, hi] = did.ci!;
    expect(lo).toBeLessThan(did.estimate!);
    expect(hi).toBeGreaterThan(did.estimate!);
    // Half-width within 15% of 1.96 standard errors (1,000 resamples: Monte Carlo error of a few per cent).
    expect(Math.abs((hi - lo) / 2 / (1.959964 * se) - 1)).toBeLessThan(0.15);
    expect(did.relativeCi![0]).toBeLessThan(did.relative!);
    expect(did.relativeCi![1]).toBeGreaterThan(did.relative!);
  });

  it('states it per customer, with the interval, who was left out, and the caution', () => {
    const ws = workspace();
    const did = unitDid(a);
    const p = SUB_QUESTIONS.performance_before_after.present(a, { ...presentContext(ws, 'managers'), dataset });
    expect(p.title).toMatch(/^Bookings per customer per month: refunded customers [+−]\d+\.\d% against the change among other customers since the launch$/);
    expect(p.caption).toContain(`${did.groups.members.panel.toLocaleString('en-IE')} refunded customers went from`);
    expect(p.caption).toMatch(/a month higher: [+−]\d+\.\d% on what their own before plus the others' change would give \(difference in differences; 95% interval [+−]\d+\.\d% to [+−]\d+\.\d%, bootstrap over customers\)/);
    expect(p.caption).toContain('Left out as having joined or left within the windows');
    expect(p.notes.join(' ')).toMatch(/not an experiment/);
    // Refunds are not something a customer signs up for: no "chose to join", neutral words instead.
    expect(p.notes.join(' ')).toMatch(/Refunded customers were not picked at random: they may differ from other customers/);
    expect(p.notes.join(' ')).not.toMatch(/chose/);
    expect(p.chart).not.toBeNull();
  });
});
