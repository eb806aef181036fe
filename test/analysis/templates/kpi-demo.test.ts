// The KPI templates on the generated Skerrywake demo (invented data), checked against an
// independent reduction in plain JavaScript over raw rows read back from the same file.
import { mkdirSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { renderChartWithGeometry } from '../../../analysis/charts/render.js';
import type { KpiBySegmentFinding, KpiContextFinding, KpiMixFinding, KpiSnapshotFinding } from '../../../analysis/findings/kpi.js';
import { definitionOf, SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { KpiCompileContext } from '../../../analysis/templates/kpi-periods.js';
import type { Answer, Finding, ResultTable, SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { loadConfig } from '../../../config/load.js';
import { demoFixture } from '../../helpers/demo-fixture.js';
import { monthOf, monthTotals, rawBookings, type RawBooking } from './kpi-raw-rows.js';

let ws: Workspace;
let raw: RawBooking[];

beforeAll(async () => {
  const demo = await demoFixture();
  ws = await openWorkspace(loadConfig(demo.configPath));
  raw = await rawBookings(demo.databasePath);
});
afterAll(async () => {
  await ws?.source.close();
});

const FULL = { start: '2022-01-01', end: '2025-06-19' };
const base: SubQuestion = { id: 'k', kind: 'kpi', lens: 'time_pattern', template: 'kpi_snapshot', metrics: ['revenue'], grain: 'month', window: FULL, filters: [] };

async function answer(sq: SubQuestion, withCoverage = true): Promise<Answer> {
  const t = definitionOf(sq).template;
  const ctx: KpiCompileContext = withCoverage ? { ...ws.context, coverage: ws.coverage } : ws.context;
  const queries = t.compile(sq, ctx);
  const tables: Record<string, ResultTable> = {};
  for (const q of queries) tables[q.name] = await ws.source.run(q, ws.runOptions);
  return { subQuestion: sq, queries, tables, ...t.read(sq, tables, { dataset: ws.dataset, coverage: ws.coverage }) };
}

function only<T extends Finding>(a: Answer, type: string, metric: string): T {
  const f = a.findings.filter((x) => x.type === type && 'metric' in x && x.metric === metric);
  expect(f).toHaveLength(1);
  return f[0] as T;
}

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('kpi_snapshot on the demo', () => {
  it('takes May 2025 as the latest complete month and reports June 2025 as partial', async () => {
    const a = await answer({ ...base, metrics: ['revenue', 'fare_per_passenger', 'refunded_revenue_share'] });
    // Demo scenario: data runs to 2025-06-18, so June 2025 is partial.
    expect(ws.coverage.lastDate).toBe('2025-06-18');
    const f = only<KpiSnapshotFinding>(a, 'kpi_snapshot', 'revenue');
    expect(f.period).toBe('2025-05-01');
    expect(f.previous.period).toBe('2025-04-01');
    expect(f.lastYear?.period).toBe('2024-05-01');
    expect(a.caveats).toContainEqual({
      code: 'partial_period_excluded',
      data: { period: '2025-06-01', grain: 'month', coveredFrom: '2025-06-01', coveredTo: '2025-06-18' },
    });
    // Exactly the three periods, bound as date ranges (May 2024; April and May 2025 as one), all before June's rows.
    expect(a.queries[0]!.params).toEqual(['2024-05-01', '2024-06-01', '2025-04-01', '2025-06-01']);
    expect(a.tables.snapshot!.rows.map((r) => r.period)).toEqual(['2024-05-01', '2025-04-01', '2025-05-01']);
  });

  it('matches a plain JavaScript reduction of the raw rows (1e-9 relative)', async () => {
    const a = await answer({ ...base, metrics: ['revenue', 'fare_per_passenger', 'refunded_revenue_share'] });
    const months = { latest: '2025-05-01', previous: '2025-04-01', lastYear: '2024-05-01' } as const;
    const t = Object.fromEntries(Object.entries(months).map(([k, m]) => [k, monthTotals(raw, m)])) as Record<keyof typeof months, ReturnType<typeof monthTotals>>;
    const expected = {
      revenue: (x: ReturnType<typeof monthTotals>) => x.revenue,
      fare_per_passenger: (x: ReturnType<typeof monthTotals>) => x.revenue / x.passengers,
      refunded_revenue_share: (x: ReturnType<typeof monthTotals>) => x.refunded / x.revenue,
    };
    for (const [metric, fn] of Object.entries(expected)) {
      const f = only<KpiSnapshotFinding>(a, 'kpi_snapshot', metric);
      expect(rel(f.value!, fn(t.latest))).toBeLessThan(1e-9);
      expect(rel(f.previous.value!, fn(t.previous))).toBeLessThan(1e-9);
      expect(rel(f.lastYear!.value!, fn(t.lastYear))).toBeLessThan(1e-9);
      expect(rel(f.previous.relative!, fn(t.latest) / fn(t.previous) - 1)).toBeLessThan(1e-6);
      expect(f.rows).toBe(t.latest.n);
    }
  });

  it('computes fare per passenger as a ratio of sums, not the mean of per-row ratios', async () => {
    const a = await answer({ ...base, metrics: ['fare_per_passenger'] });
    const f = only<KpiSnapshotFinding>(a, 'kpi_snapshot', 'fare_per_passenger');
    const may = raw.filter((r) => monthOf(r.sail_date) === '2025-05-01' && r.fare_total !== null && r.passengers);
    const meanOfRatios = may.reduce((s, r) => s + r.fare_total! / r.passengers!, 0) / may.length;
    // The two differ on this data (bigger parties pay less per head), so the check can fail.
    expect(rel(f.value!, meanOfRatios)).toBeGreaterThan(1e-3);
  });

  it('says whether each change is good by higher_is_better', async () => {
    const a = await answer({ ...base, metrics: ['revenue', 'refunded_revenue_share'] });
    for (const metric of ['revenue', 'refunded_revenue_share']) {
      const f = only<KpiSnapshotFinding>(a, 'kpi_snapshot', metric);
      const hib = ws.dataset.metrics.find((m) => m.name === metric)!.higher_is_better;
      for (const d of [f.previous, f.lastYear!]) expect(d.improved).toBe(d.absolute! > 0 === hib);
    }
  });

  it('reads the same periods when compiled without the coverage, and when the window runs past the data', async () => {
    const withCov = await answer({ ...base, metrics: ['fare_per_passenger'] });
    const without = await answer({ ...base, metrics: ['fare_per_passenger'] }, false);
    expect(without.findings).toEqual(withCov.findings);
    // "2025" as a window: ends 2026-01-01, past the data; the coverage brings it back to May 2025.
    const year = await answer({ ...base, metrics: ['fare_per_passenger'], window: { start: '2025-01-01', end: '2026-01-01' } });
    expect(only<KpiSnapshotFinding>(year, 'kpi_snapshot', 'fare_per_passenger').period).toBe('2025-05-01');
  });

  it('a window that is one whole month reports that month, with no partial caveat', async () => {
    const a = await answer({ ...base, window: { start: '2024-03-01', end: '2024-04-01' } });
    const f = only<KpiSnapshotFinding>(a, 'kpi_snapshot', 'revenue');
    expect(f.period).toBe('2024-03-01');
    expect(f.previous.period).toBe('2024-02-01');
    expect(rel(f.value!, monthTotals(raw, '2024-03-01').revenue)).toBeLessThan(1e-9);
    expect(a.caveats.filter((c) => c.code === 'partial_period_excluded')).toEqual([]);
  });

  it('leaves out a year-ago month the data does not cover', async () => {
    const a = await answer({ ...base, window: { start: '2022-01-01', end: '2022-07-01' } });
    const f = only<KpiSnapshotFinding>(a, 'kpi_snapshot', 'revenue');
    expect(f.period).toBe('2022-06-01');
    expect(f.lastYear).toEqual({ period: '2021-06-01', value: null, absolute: null, relative: null, improved: null });
  });
});

describe('kpi_by_segment on the demo', () => {
  it('gives each channel the three points, equal to the raw reduction', async () => {
    const a = await answer({ ...base, template: 'kpi_by_segment', lens: 'breakdown', dimension: 'channel', metrics: ['fare_per_passenger'] });
    const f = only<KpiBySegmentFinding>(a, 'kpi_by_segment', 'fare_per_passenger');
    expect(f.period).toBe('2025-05-01');
    const keys = f.segments.map((s) => s.key);
    expect(new Set(keys)).toEqual(new Set(['app', 'web', 'phone', 'kiosk', null]));
    for (const s of f.segments) {
      const keep = (r: RawBooking) => r.channel === s.key;
      const now = monthTotals(raw, '2025-05-01', keep);
      const prev = monthTotals(raw, '2025-04-01', keep);
      const ly = monthTotals(raw, '2024-05-01', keep);
      expect(rel(s.value!, now.revenue / now.passengers)).toBeLessThan(1e-9);
      expect(rel(s.previous.value!, prev.revenue / prev.passengers)).toBeLessThan(1e-9);
      expect(rel(s.lastYear!.value!, ly.revenue / ly.passengers)).toBeLessThan(1e-9);
      expect(s.rows).toBe(now.n);
    }
    // The total row is the snapshot's figure.
    const all = monthTotals(raw, '2025-05-01');
    expect(rel(f.total.value!, all.revenue / all.passengers)).toBeLessThan(1e-9);
  });

  it('folds segments past the top N into "All others" in the database (ratio of sums, not a sum of ratios)', async () => {
    const sq: SubQuestion = { ...base, template: 'kpi_by_segment', lens: 'breakdown', dimension: 'route', metrics: ['fare_per_passenger'] };
    const { compileKpiBySegment, readKpiBySegment } = await import('../../../analysis/templates/kpi-by-segment.js');
    const q = compileKpiBySegment(sq, { ...ws.context, coverage: ws.coverage }, 2);
    const table = await ws.source.run(q, ws.runOptions);
    const r = readKpiBySegment(sq, table, ws.dataset, ws.coverage, 2);
    const f = r.findings[0] as KpiBySegmentFinding;
    const named = f.segments.filter((s) => !s.other).map((s) => s.key as string);
    expect(named).toHaveLength(2);
    const other = f.segments.find((s) => s.other)!;
    expect(other.segments).toBe(3);
    const rest = monthTotals(raw, '2025-05-01', (x) => !named.includes(x.route!));
    expect(rel(other.value!, rest.revenue / rest.passengers)).toBeLessThan(1e-9);
    expect(r.caveats).toContainEqual({ code: 'segments_folded', data: { count: 3, folded: 'lower' } });
    // The two named routes are the two with the highest fare per passenger in May 2025 (raw
    // reduction), among routes with at least the row floor there (RANK_FLOOR, written out).
    const counts = new Map<string, number>();
    for (const x of raw) if (monthOf(x.sail_date) === '2025-05-01') counts.set(x.route!, (counts.get(x.route!) ?? 0) + 1);
    const rows = [...counts.values()];
    const floor = Math.min(Math.ceil(0.5 * Math.max(...rows)), Math.max(30, Math.min(100, Math.ceil(0.01 * rows.reduce((a, b) => a + b, 0)))));
    const fare = (route: string) => {
      const t = monthTotals(raw, '2025-05-01', (x) => x.route === route);
      return t.revenue / t.passengers;
    };
    const top2 = [...counts.keys()].filter((k) => counts.get(k)! >= floor).sort((a, b) => fare(b) - fare(a) || a.localeCompare(b)).slice(0, 2);
    expect(named).toEqual(top2);
  });

  it('keeps a route that has no data in the latest month (the Dunlin Quay maintenance gap) by name', async () => {
    const a = await answer({ ...base, template: 'kpi_by_segment', lens: 'breakdown', dimension: 'route', window: { start: '2023-01-01', end: '2024-01-01' } });
    const f = only<KpiBySegmentFinding>(a, 'kpi_by_segment', 'revenue');
    expect(f.period).toBe('2023-12-01');
    const dunlin = f.segments.find((s) => s.key === 'Mainland–Dunlin Quay')!;
    expect(dunlin.other).toBe(false);
    expect(dunlin.rows).toBe(0);
    expect(dunlin.value).toBeNull();
    expect(rel(dunlin.lastYear!.value!, monthTotals(raw, '2022-12-01', (r) => r.route === 'Mainland–Dunlin Quay').revenue)).toBeLessThan(1e-9);
  });
});

describe('kpi_context on the demo', () => {
  it('flags the storm month: January 2024 refund rate is far above every other month', async () => {
    const a = await answer({ ...base, template: 'kpi_context', lens: 'summary', metrics: ['refund_rate'], window: { start: '2022-01-01', end: '2024-02-01' } });
    const f = only<KpiContextFinding>(a, 'kpi_context', 'refund_rate');
    expect(f.period).toBe('2024-01-01');
    expect(f.rank).toBe(1);
    expect(f.outlier).toBe(true);
    expect(f.robustZ!).toBeGreaterThan(3.5);
    expect(a.caveats).toContainEqual(expect.objectContaining({ code: 'outlier', data: expect.objectContaining({ period: '2024-01-01' }) }));
    // Independent: monthly refund rates from raw rows; January 2024 above every other month's.
    const months = [...new Set(raw.map((r) => monthOf(r.sail_date)))].filter((m) => m < '2024-02-01').sort();
    const rates = months.map((m) => {
      const t = monthTotals(raw, m);
      return t.refundedRows / t.n;
    });
    const jan = rates[months.indexOf('2024-01-01')]!;
    expect(Math.max(...rates.filter((_, i) => months[i] !== '2024-01-01'))).toBeLessThan(jan / 2);
    expect(rel(f.value, jan)).toBeLessThan(1e-9);
    expect(f.n).toBe(months.length);
    // Summary statistics against the same raw series: max, min, mean.
    expect(rel(f.max, Math.max(...rates))).toBeLessThan(1e-9);
    expect(rel(f.min, Math.min(...rates))).toBeLessThan(1e-9);
    expect(rel(f.mean, rates.reduce((s, v) => s + v, 0) / rates.length)).toBeLessThan(1e-9);
    expect(f.minPeriod).toBe(months[rates.indexOf(Math.min(...rates))]);
  });

  it('leaves the partial June 2025 out of the history', async () => {
    const a = await answer({ ...base, template: 'kpi_context', lens: 'summary', metrics: ['fare_per_passenger'] });
    const f = only<KpiContextFinding>(a, 'kpi_context', 'fare_per_passenger');
    expect(f.period).toBe('2025-05-01');
    expect(f.n).toBe(41);
    expect(f.outlier).toBe(false);
  });
});

describe('kpi_mix on the demo', () => {
  it('gives route shares of passengers for fare per passenger, equal to the raw reduction, with HHI and count to 80%', async () => {
    const a = await answer({ ...base, template: 'kpi_mix', lens: 'distribution', dimension: 'route', metrics: ['fare_per_passenger'] });
    const f = only<KpiMixFinding>(a, 'kpi_mix', 'fare_per_passenger');
    expect(f.shareOf).toBe('passengers');
    expect(f.period).toBe('2025-05-01');
    expect(f.lastYearPeriod).toBe('2024-05-01');
    const sumBy = (month: string) => {
      const m = new Map<string, number>();
      for (const r of raw) if (monthOf(r.sail_date) === month) m.set(r.route!, (m.get(r.route!) ?? 0) + (r.passengers ?? 0));
      return m;
    };
    const now = sumBy('2025-05-01');
    const then = sumBy('2024-05-01');
    const total = [...now.values()].reduce((s, v) => s + v, 0);
    const totalThen = [...then.values()].reduce((s, v) => s + v, 0);
    for (const s of f.segments) {
      expect(s.share).toBeCloseTo(now.get(s.key as string)! / total, 12);
      expect(s.shareChange).toBeCloseTo(now.get(s.key as string)! / total - then.get(s.key as string)! / totalThen, 12);
    }
    // HHI by its definition (sum of squared percentage shares), and the fewest routes reaching 80%.
    const shares = [...now.values()].map((v) => (100 * v) / total);
    expect(f.hhi!).toBeCloseTo(shares.reduce((s, x) => s + x * x, 0), 6);
    const sorted = [...now.values()].sort((x, y) => y - x);
    let run = 0;
    const k = sorted.findIndex((v) => (run += v) / total >= 0.8) + 1;
    expect(f.countToThreshold).toBe(k);
  });

  it('demo concentration effect: two routes carry about 70% of revenue, three over 80%', async () => {
    const a = await answer({ ...base, template: 'kpi_mix', lens: 'distribution', dimension: 'route', metrics: ['revenue'] });
    const f = only<KpiMixFinding>(a, 'kpi_mix', 'revenue');
    const top2 = f.segments[0]!.share! + f.segments[1]!.share!;
    expect(top2).toBeGreaterThan(0.6);
    expect(top2).toBeLessThan(0.8);
    expect(f.countToThreshold).toBe(3);
  });
});

describe('KPI charts on the demo', () => {
  it('renders one chart per presenter to /tmp/kpi-charts', async () => {
    mkdirSync('/tmp/kpi-charts', { recursive: true });
    const sqs: SubQuestion[] = [
      { ...base, template: 'kpi_snapshot', metrics: ['fare_per_passenger'] },
      { ...base, template: 'kpi_by_segment', lens: 'breakdown', dimension: 'route', metrics: ['revenue'] },
      { ...base, template: 'kpi_context', lens: 'summary', metrics: ['refund_rate'], window: { start: '2022-01-01', end: '2024-02-01' } },
      { ...base, template: 'kpi_mix', lens: 'distribution', dimension: 'route', metrics: ['fare_per_passenger'] },
    ];
    for (const sq of sqs) {
      const p = SUB_QUESTIONS[sq.template].present(await answer(sq), {
        dataset: ws.dataset,
        locale: 'en-IE',
        audience: 'managers',
        chart: { width: 1200, height: 675, scale: 1 },
        dataAsOf: ws.coverage.lastDate,
      });
      expect(p.chart).not.toBeNull();
      const { png } = await renderChartWithGeometry(p.chart!);
      expect(png.length).toBeGreaterThan(10_000);
      const { writeFile } = await import('node:fs/promises');
      await writeFile(`/tmp/kpi-charts/${sq.template}.png`, png);
    }
  });
});
