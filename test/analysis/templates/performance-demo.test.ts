// Performance templates on the generated Skerrywake demo (invented data, 200k rows): the planted
// SkerryPass effects are found, and every number is checked against an independent plain
// reduction over raw rows read back from the file, or against reference libraries
// (@stdlib/stats-ttest2 for Welch, jStat for proportions and Student t).
import { createHash } from 'node:crypto';
import { createRequire } from 'node:module';
import { mkdir, stat } from 'node:fs/promises';
import ttest2 from '@stdlib/stats-ttest2';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig } from '../../../config/load.js';
import type { DatasetConfig } from '../../../config/schema.js';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { renderChartToFile } from '../../../analysis/charts/render.js';
import { definitionOf, type TemplateName } from '../../../analysis/sub-questions/registry.js';
import type { Answer, Finding, ResultTable, SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { demoFixture } from '../../helpers/demo-fixture.js';
import { perfRows, plainMoments, plainQuantile, type PerfRow } from './performance-raw-rows.js';

interface JStatRef {
  (): { twoSidedDifferenceOfProportions(p1: number, n1: number, p2: number, n2: number): number };
  normalci(value: number, alpha: number, sd: number, n: number): [number, number];
  studentt: { cdf(x: number, df: number): number };
}
const jStat = createRequire(import.meta.url)('jstat') as JStatRef;

const LAUNCH = '2023-04-01';
const END = '2025-06-19';
const CHART_DIR = '/tmp/performance-charts';

let ws: Workspace;
let raw: PerfRow[];

beforeAll(async () => {
  const demo = await demoFixture();
  ws = await openWorkspace(loadConfig(demo.configPath));
  raw = await perfRows(demo.databasePath);
  await mkdir(CHART_DIR, { recursive: true });
});
afterAll(async () => {
  await ws?.source.close();
});

function sq(template: TemplateName, extra: Partial<SubQuestion> = {}): SubQuestion {
  return {
    id: template,
    kind: 'performance',
    lens: 'summary',
    template,
    metrics: ['average_fare'],
    grain: 'month',
    window: { start: '2022-01-01', end: END },
    filters: [],
    comparisonGroup: 'skerrypass',
    ...extra,
  };
}

/** Compile → run → read with a dataset variant (extra comparison groups), as answerSubQuestion does. */
async function answerWith(dataset: DatasetConfig, q: SubQuestion): Promise<Answer> {
  const template = definitionOf(q).template;
  const queries = template.compile(q, { ...ws.context, dataset });
  const tables: Record<string, ResultTable> = {};
  for (const query of queries) tables[query.name] = await ws.source.run(query, ws.runOptions);
  return { subQuestion: q, queries, tables, ...template.read(q, tables, { dataset, coverage: ws.coverage }) };
}

function find<T extends Finding['type']>(findings: Finding[], type: T, pred: (f: Extract<Finding, { type: T }>) => boolean = () => true) {
  const f = findings.find((x): x is Extract<Finding, { type: T }> => x.type === type && pred(x as Extract<Finding, { type: T }>));
  if (!f) throw new Error(`no ${type} finding`);
  return f;
}

function rel(actual: number, expected: number, tolerance: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(tolerance * Math.max(Math.abs(expected), 1e-300));
}

const inWindow = (r: PerfRow, start: string, end: string) => r.sail_date >= start && r.sail_date < end && r.pass_holder !== null;

async function renderOnce(answer: Answer, name: string): Promise<void> {
  const presented = definitionOf(answer.subQuestion).present(answer, {
    dataset: ws.dataset,
    locale: 'en-IE',
    audience: 'managers',
    chart: { width: 1200, height: 675, scale: 1 },
    dataAsOf: ws.coverage.lastDate,
  });
  expect(presented.chart).not.toBeNull();
  const path = `${CHART_DIR}/${name}.png`;
  await renderChartToFile(presented.chart!, path);
  expect((await stat(path)).size).toBeGreaterThan(10_000);
}

describe('performance_compare on the demo', () => {
  it('average fare since launch: matches a plain reduction, the ~15% discount is found, Welch matches @stdlib/stats-ttest2', async () => {
    const a = await answerSubQuestion(sq('performance_compare'), ws);
    const fares = (member: boolean) => raw.filter((r) => inWindow(r, LAUNCH, END) && r.pass_holder === member && r.fare_total !== null).map((r) => r.fare_total!);
    const m = fares(true);
    const o = fares(false);
    const pm = plainMoments(m);
    const po = plainMoments(o);
    const gm = find(a.findings, 'performance_group', (f) => f.group === 'members');
    const go = find(a.findings, 'performance_group', (f) => f.group === 'others');
    expect(gm.n).toBe(pm.n);
    expect(go.n).toBe(po.n);
    rel(gm.estimate!, pm.mean, 1e-12);
    rel(gm.sd!, Math.sqrt(pm.variance), 1e-9);
    rel(go.sd!, Math.sqrt(po.variance), 1e-9);
    expect(find(a.findings, 'performance_window')).toMatchObject({ start: LAUNCH, clippedToLaunch: true });

    const d = find(a.findings, 'performance_difference');
    // Planted fare factor 0.85 (−15%); pass-holder bookings lean to later, dearer years, so the measured lift is a little smaller.
    expect(d.relative!).toBeGreaterThan(-0.17);
    expect(d.relative!).toBeLessThan(-0.12);
    const ref = ttest2(m, o);
    rel(d.statistic, ref.statistic, 1e-8);
    rel(d.df!, ref.df, 1e-8);
    rel(d.ci[0], ref.ci[0]!, 1e-8);
    rel(d.ci[1], ref.ci[1]!, 1e-8);
    expect(d.pValue).toBeLessThan(1e-12);
    expect(ref.pValue).toBeLessThan(1e-12);
    expect(find(a.findings, 'performance_verdict')).toMatchObject({ verdict: 'worse', direction: 'lower', basis: 'test' });
    expect(a.caveats.map((c) => c.code)).toContain('observational');
    await renderOnce(a, 'compare-average-fare');
  });

  it('on a small slice where the p-value is not negligible, Welch still matches @stdlib/stats-ttest2', async () => {
    const route = 'Tern Holm–Saltreach';
    const start = '2023-04-01';
    const end = '2023-04-15';
    const a = await answerSubQuestion(sq('performance_compare', { window: { start, end }, filters: [{ dimension: 'route', values: [route] }] }), ws);
    const fares = (member: boolean) =>
      raw.filter((r) => inWindow(r, start, end) && r.route === route && r.pass_holder === member && r.fare_total !== null).map((r) => r.fare_total!);
    const ref = ttest2(fares(true), fares(false));
    const d = find(a.findings, 'performance_difference');
    expect(ref.pValue).toBeGreaterThan(1e-6);
    rel(d.pValue, ref.pValue, 1e-8);
    rel(d.statistic, ref.statistic, 1e-8);
    rel(d.ci[0], ref.ci[0]!, 1e-8);
  });

  it('refund rate ≈4% vs ≈6% with a significant two-proportion test that matches jStat', async () => {
    const a = await answerSubQuestion(sq('performance_compare', { metrics: ['refund_rate'] }), ws);
    const rows = raw.filter((r) => inWindow(r, LAUNCH, END));
    const count = (member: boolean) => {
      const g = rows.filter((r) => r.pass_holder === member);
      return { n: g.length, x: g.filter((r) => r.refunded === true).length };
    };
    const m = count(true);
    const o = count(false);
    const d = find(a.findings, 'performance_difference');
    expect(d.test).toBe('two_proportion_z');
    expect(d.first).toBeCloseTo(m.x / m.n, 12);
    expect(d.second).toBeCloseTo(o.x / o.n, 12);
    // Planted 4% and 6%; the storm week's refunds (85%) lift the others' rate a little.
    expect(d.first).toBeGreaterThan(0.035);
    expect(d.first).toBeLessThan(0.05);
    expect(d.second).toBeGreaterThan(0.055);
    expect(d.second).toBeLessThan(0.07);
    expect(d.pValue).toBeLessThan(1e-6);
    const p1 = m.x / m.n;
    const p2 = o.x / o.n;
    const pooled = (m.x + o.x) / (m.n + o.n);
    rel(d.statistic, (p1 - p2) / Math.sqrt(pooled * (1 - pooled) * (1 / m.n + 1 / o.n)), 1e-9);
    // jStat's two-sided p (1 − Φ form) underflows to 0 at |z| ≈ 12.8, so the p-value is compared on a slice below.
    const [lo, hi] = jStat.normalci(p1 - p2, 0.05, Math.sqrt((p1 * (1 - p1)) / m.n + (p2 * (1 - p2)) / o.n), 1);
    rel(d.ci[0], lo, 1e-9);
    rel(d.ci[1], hi, 1e-9);
    // refund_rate has higher_is_better false: lower is better.
    expect(find(a.findings, 'performance_verdict').verdict).toBe('better');
    await renderOnce(a, 'compare-refund-rate');
  });

  it('on a slice with a moderate p-value, the two-proportion p-value matches jStat', async () => {
    const start = '2023-04-01';
    const end = '2023-10-01';
    const a = await answerSubQuestion(sq('performance_compare', { metrics: ['refund_rate'], window: { start, end }, filters: [{ dimension: 'channel', values: ['phone'] }] }), ws);
    const rows = raw.filter((r) => inWindow(r, start, end) && r.channel === 'phone');
    const count = (member: boolean) => {
      const g = rows.filter((r) => r.pass_holder === member);
      return { n: g.length, p: g.filter((r) => r.refunded === true).length / g.length };
    };
    const m = count(true);
    const o = count(false);
    const reference = jStat().twoSidedDifferenceOfProportions(m.p, m.n, o.p, o.n);
    expect(reference).toBeGreaterThan(1e-4);
    rel(find(a.findings, 'performance_difference').pValue, reference, 1e-9);
  });

  it('fare per passenger (a ratio of sums): delta-method z matches the residual form computed from raw rows', async () => {
    const a = await answerSubQuestion(sq('performance_compare', { metrics: ['fare_per_passenger'] }), ws);
    const cell = (member: boolean) => {
      const g = raw.filter((r) => inWindow(r, LAUNCH, END) && r.pass_holder === member);
      const x = g.map((r) => r.fare_total ?? 0);
      const y = g.map((r) => r.passengers ?? 0);
      const sx = x.reduce((s, v) => s + v, 0);
      const sy = y.reduce((s, v) => s + v, 0);
      const ratio = sx / sy;
      const ybar = sy / g.length;
      const resid = x.reduce((s, v, i) => s + (v - ratio * y[i]!) ** 2, 0);
      return { ratio, variance: resid / (g.length - 1) / (g.length * ybar * ybar) };
    };
    const m = cell(true);
    const o = cell(false);
    const d = find(a.findings, 'performance_difference');
    expect(d.test).toBe('delta_ratio_z');
    rel(d.first, m.ratio, 1e-12);
    rel(d.second, o.ratio, 1e-12);
    rel(d.statistic, (m.ratio - o.ratio) / Math.sqrt(m.variance + o.variance), 1e-7);
  });

  it('the median bootstrap is deterministic, and its SQL sample is exactly the md5-ordered sample computed in JavaScript', async () => {
    const q = sq('performance_compare');
    const a1 = await answerSubQuestion(q, ws);
    const a2 = await answerSubQuestion(q, ws);
    const m1 = find(a1.findings, 'performance_median_difference');
    expect(find(a2.findings, 'performance_median_difference')).toEqual(m1);
    expect(a1.tables.sample).toEqual(a2.tables.sample);
    expect(m1.ci[0]).toBeLessThan(m1.ci[1]);
    expect(m1.ci[1]).toBeLessThan(0);

    const rows = raw.filter((r) => inWindow(r, LAUNCH, END) && r.fare_total !== null);
    for (const member of [true, false]) {
      const group = rows.filter((r) => r.pass_holder === member);
      const drawn = group
        .map((r) => ({ h: createHash('md5').update(`${r.booking_id}4021`).digest('hex'), v: r.fare_total! }))
        .sort((x, y) => (x.h < y.h ? -1 : x.h > y.h ? 1 : x.v - y.v))
        .slice(0, 4000)
        .map((d) => d.v)
        .sort((x, y) => x - y);
      const fromSql = a1.tables.sample!.rows.filter((r) => r.tc_member === member).map((r) => r.tc_x as number).sort((x, y) => x - y);
      expect(fromSql).toEqual(drawn);
      const all = group.map((r) => r.fare_total!).sort((x, y) => x - y);
      expect(member ? m1.medianMembers : m1.medianOthers).toBeCloseTo(plainQuantile(all, 0.5), 9);
    }
  });
});

describe('performance_frequency on the demo', () => {
  it('pass-holder customers book ≈2.5× as often; summaries match a per-customer reduction and Welch matches @stdlib/stats-ttest2', async () => {
    const a = await answerSubQuestion(sq('performance_frequency', { lens: 'distribution', metrics: ['bookings'] }), ws);
    const perCustomer = new Map<string, { count: number; member: boolean }>();
    for (const r of raw) {
      if (!(r.sail_date >= LAUNCH && r.sail_date < END) || r.customer_id === null) continue;
      const e = perCustomer.get(r.customer_id) ?? { count: 0, member: false };
      e.count++;
      if (r.pass_holder === true) e.member = true;
      perCustomer.set(r.customer_id, e);
    }
    const counts = (member: boolean) => [...perCustomer.values()].filter((e) => e.member === member).map((e) => e.count);
    const m = counts(true);
    const o = counts(false);
    for (const [role, values] of [['members', m], ['others', o]] as const) {
      const f = find(a.findings, 'performance_frequency_group', (g) => g.group === role);
      const pm = plainMoments(values);
      const sorted = [...values].sort((x, y) => x - y);
      expect(f.units).toBe(values.length);
      expect(f.total).toBe(values.reduce((s, v) => s + v, 0));
      rel(f.mean, pm.mean, 1e-12);
      rel(f.sd!, Math.sqrt(pm.variance), 1e-9);
      expect(f.median).toBeCloseTo(plainQuantile(sorted, 0.5), 9);
      expect(f.p90).toBeCloseTo(plainQuantile(sorted, 0.9), 9);
      expect(f.buckets.map((b) => b.units)).toEqual([
        values.filter((v) => v === 1).length,
        values.filter((v) => v >= 2 && v <= 5).length,
        values.filter((v) => v >= 6).length,
      ]);
    }
    const ratio = find(a.findings, 'performance_frequency_ratio');
    // Planted 2.5 (pool design: 4.23 vs 1.2 bookings per pool member); measured 2.498 at 200k rows. Tolerance ±0.2.
    expect(ratio.ratio).toBeGreaterThan(2.3);
    expect(ratio.ratio).toBeLessThan(2.7);
    rel(ratio.ratio, plainMoments(m).mean / plainMoments(o).mean, 1e-12);
    expect(ratio.low!).toBeLessThan(ratio.ratio);
    expect(ratio.high!).toBeGreaterThan(ratio.ratio);
    const d = find(a.findings, 'performance_difference');
    const ref = ttest2(m, o);
    rel(d.statistic, ref.statistic, 1e-8);
    rel(d.df!, ref.df, 1e-8);
    rel(d.ci[0], ref.ci[0]!, 1e-8);
    rel(d.ci[1], ref.ci[1]!, 1e-8);
    expect(find(a.findings, 'performance_verdict')).toMatchObject({ verdict: 'better', direction: 'higher' });
    await renderOnce(a, 'frequency-bookings');
  });
});

describe('performance_before_after on the demo', () => {
  it('no pass holders before launch: DiD does not apply; others before vs after and members vs others after match plain means', async () => {
    const a = await answerSubQuestion(sq('performance_before_after', { lens: 'time_pattern' }), ws);
    expect(find(a.findings, 'performance_did_not_applicable').reason).toBe('members_empty_before');
    const periods = find(a.findings, 'performance_periods');
    expect(periods).toMatchObject({ before: { start: '2022-04-01', end: '2023-04-01' }, after: { start: '2023-04-01', end: '2024-04-01' }, months: 12 });
    const fares = (member: boolean, start: string, end: string) =>
      raw.filter((r) => inWindow(r, start, end) && r.pass_holder === member && r.fare_total !== null).map((r) => r.fare_total!);
    const othersBefore = plainMoments(fares(false, '2022-04-01', '2023-04-01'));
    const othersAfter = plainMoments(fares(false, '2023-04-01', '2024-04-01'));
    const membersAfter = plainMoments(fares(true, '2023-04-01', '2024-04-01'));
    const shift = find(a.findings, 'performance_difference', (f) => f.comparison === 'others_after_vs_before');
    rel(shift.first, othersAfter.mean, 1e-12);
    rel(shift.second, othersBefore.mean, 1e-12);
    expect(shift.nSecond).toBe(othersBefore.n);
    const between = find(a.findings, 'performance_difference', (f) => f.comparison === 'members_vs_others');
    rel(between.first, membersAfter.mean, 1e-12);
    rel(between.second, othersAfter.mean, 1e-12);
    expect(between.relative!).toBeLessThan(-0.12);
    // The monthly series: no member value before launch, one per month after.
    const series = find(a.findings, 'performance_group_series', (f) => f.group === 'members');
    expect(series.points.filter((p) => p.period < LAUNCH).every((p) => p.value === null)).toBe(true);
    expect(series.points.filter((p) => p.period >= LAUNCH).every((p) => p.value !== null)).toBe(true);
    await renderOnce(a, 'before-after-average-fare');
  });

  it('with members on both sides (a group launched 2024-04-01), the DiD and its t-test match a plain computation with jStat', async () => {
    const g = ws.dataset.comparison_groups[0]!;
    const dataset: DatasetConfig = { ...ws.dataset, comparison_groups: [...ws.dataset.comparison_groups, { ...g, name: 'later_pass', label: 'Later pass', launch_date: '2024-04-01' }] };
    const a = await answerWith(dataset, sq('performance_before_after', { lens: 'time_pattern', comparisonGroup: 'later_pass' }));
    const did = find(a.findings, 'performance_did');
    expect(find(a.findings, 'performance_periods')).toMatchObject({ before: { start: '2023-04-01' }, after: { end: '2025-04-01' }, months: 12 });
    const cell = (member: boolean, start: string, end: string) => {
      const v = raw.filter((r) => inWindow(r, start, end) && r.pass_holder === member && r.fare_total !== null).map((r) => r.fare_total!);
      const pm = plainMoments(v);
      return { mean: pm.mean, v: pm.variance / pm.n, df: pm.n - 1 };
    };
    const mb = cell(true, '2023-04-01', '2024-04-01');
    const ma = cell(true, '2024-04-01', '2025-04-01');
    const ob = cell(false, '2023-04-01', '2024-04-01');
    const oa = cell(false, '2024-04-01', '2025-04-01');
    const est = ma.mean - mb.mean - (oa.mean - ob.mean);
    const se2 = mb.v + ma.v + ob.v + oa.v;
    const df = (se2 * se2) / [mb, ma, ob, oa].reduce((s, c) => s + (c.v * c.v) / c.df, 0);
    const t = est / Math.sqrt(se2);
    rel(did.estimate, est, 1e-9);
    rel(did.statistic!, t, 1e-7);
    rel(did.df!, df, 1e-7);
    rel(did.pValue!, 2 * jStat.studentt.cdf(-Math.abs(t), df), 1e-6);
    expect(did.membersBefore).toBeCloseTo(mb.mean, 9);
    expect(did.othersAfter).toBeCloseTo(oa.mean, 9);
  });
});

describe('performance_by_segment on the demo', () => {
  it('average fare by route: lower for pass holders on every route, each matching a plain reduction', async () => {
    const a = await answerSubQuestion(sq('performance_by_segment', { lens: 'breakdown', dimension: 'route' }), ws);
    const segments = a.findings.filter((f): f is Extract<Finding, { type: 'performance_segment' }> => f.type === 'performance_segment');
    expect(segments).toHaveLength(5);
    for (const s of segments) {
      const fares = (member: boolean) =>
        raw.filter((r) => inWindow(r, LAUNCH, END) && r.route === s.segment && r.pass_holder === member && r.fare_total !== null).map((r) => r.fare_total!);
      const m = plainMoments(fares(true));
      const o = plainMoments(fares(false));
      expect(s.nMembers).toBe(m.n);
      expect(s.nOthers).toBe(o.n);
      rel(s.members!, m.mean, 1e-12);
      rel(s.others!, o.mean, 1e-12);
      // The discount is planted on every route alike.
      expect(s.relative!).toBeGreaterThan(-0.17);
      expect(s.relative!).toBeLessThan(-0.12);
      expect(s.small).toBe(false);
    }
    expect(find(a.findings, 'performance_consistency')).toMatchObject({ overallDirection: 'lower', segments: 5, sameDirection: 5, significantSame: 5, oppositeDirection: 0 });
    await renderOnce(a, 'by-segment-route');
  });

  it('refund rate by channel keeps missing channels as their own segment with the right counts', async () => {
    const a = await answerSubQuestion(sq('performance_by_segment', { lens: 'breakdown', dimension: 'channel', metrics: ['refund_rate'] }), ws);
    const missing = find(a.findings, 'performance_segment', (f) => f.segment === null && !f.folded);
    const rows = raw.filter((r) => inWindow(r, LAUNCH, END) && r.channel === null);
    expect(missing.nMembers).toBe(rows.filter((r) => r.pass_holder === true).length);
    expect(missing.nOthers).toBe(rows.filter((r) => r.pass_holder === false).length);
    const kiosk = find(a.findings, 'performance_segment', (f) => f.segment === 'kiosk');
    const k = raw.filter((r) => inWindow(r, LAUNCH, END) && r.channel === 'kiosk' && r.pass_holder === true);
    rel(kiosk.members!, k.filter((r) => r.refunded === true).length / k.length, 1e-12);
  });
});
