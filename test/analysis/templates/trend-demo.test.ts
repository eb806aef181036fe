// The trend and segment templates on the generated Skerrywake demo (invented data, 200k rows):
// each planted effect is found, and every number is checked against a plain JS reduction over
// the raw rows read back from the file (a bare SELECT of columns, never the templates' SQL).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig } from '../../../config/load.js';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type {
  SegmentSharesFinding,
  SegmentTrendFinding,
  SegmentTrendOverviewFinding,
  TrendSeasonalityFinding,
  TrendSummaryFinding,
  TrendTestFinding,
  TrendWeekdayFinding,
} from '../../../analysis/findings/segments.js';
import type { Answer, Finding, SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { demoFixture } from '../../helpers/demo-fixture.js';
import { jStat } from '../stats/jstat.js';
import { definitionOf } from '../../../analysis/sub-questions/registry.js';

interface RawRow {
  date: string;
  route: string;
  channel: string | null;
  fare: number;
}

let ws: Workspace;
let raw: RawRow[];

beforeAll(async () => {
  const demo = await demoFixture();
  ws = await openWorkspace(loadConfig(demo.configPath));
  const t = await ws.source.run(
    { sql: 'SELECT sail_date, route, channel, fare_total FROM bookings', params: [] },
    { maxRows: 1_000_000, timeoutMs: 120_000 },
  );
  expect(t.truncated).toBe(false);
  raw = t.rows.map((r) => ({ date: String(r.sail_date), route: String(r.route), channel: r.channel === null ? null : String(r.channel), fare: Number(r.fare_total) }));
});

afterAll(async () => {
  await ws?.source.close();
});

const sq = (over: Partial<SubQuestion>): SubQuestion => ({
  id: 't',
  kind: 'trend',
  lens: 'time_pattern',
  template: 'trend_test',
  metrics: ['bookings'],
  grain: 'month',
  window: { start: '2022-01-01', end: '2025-07-01' },
  filters: [],
  ...over,
});

function find<T extends Finding['type']>(a: Answer, type: T): Extract<Finding, { type: T }> {
  const f = a.findings.find((x) => x.type === type);
  if (!f) throw new Error(`no ${type} finding`);
  return f as Extract<Finding, { type: T }>;
}

/** Plain reduction: bookings per 'YYYY-MM'. */
function monthlyCounts(rows: readonly RawRow[]): Map<string, number> {
  const m = new Map<string, number>();
  for (const r of rows) m.set(r.date.slice(0, 7), (m.get(r.date.slice(0, 7)) ?? 0) + 1);
  return m;
}

describe('trend_seasonality on the demo bookings', () => {
  it('July/August top two and January/February bottom two in every full year 2022–2024, as the raw rows show', async () => {
    const counts = monthlyCounts(raw);
    for (const year of [2022, 2023, 2024]) {
      const months = Array.from({ length: 12 }, (_, k) => ({ month: k + 1, n: counts.get(`${year}-${String(k + 1).padStart(2, '0')}`)! }));
      const order = [...months].sort((a, b) => b.n - a.n).map((m) => m.month);
      expect(order.slice(0, 2).sort((a, b) => a - b)).toEqual([7, 8]);
      expect(order.slice(-2).sort((a, b) => a - b)).toEqual([1, 2]);
    }
    const a = await answerSubQuestion(sq({ template: 'trend_seasonality' }), ws);
    const s = find(a, 'trend_seasonality') as TrendSeasonalityFinding;
    // The template's monthly series is exactly the reduction's counts.
    const series = find(a, 'series');
    for (const p of series.points) expect(p.value).toBe(counts.get(p.period.slice(0, 7)) ?? null);
    expect(s.fullYears).toEqual([2022, 2023, 2024]);
    expect([...s.busiest].sort()).toEqual([7, 8]);
    expect([...s.quietest].sort()).toEqual([1, 2]);
    for (const m of [7, 8]) expect(s.months[m - 1]!.topTwoIn).toBe(3);
    for (const m of [1, 2]) expect(s.months[m - 1]!.bottomTwoIn).toBe(3);
    expect(s.months[6]!.index).toBeGreaterThan(1.2);
    expect(s.months[7]!.index).toBeGreaterThan(1.2);
    expect(s.months[0]!.index).toBeLessThan(0.8);
    // The June 2025 partial month is not used.
    expect(s.lastPeriod).toBe('2025-05-01');
    expect(a.caveats.map((c) => c.code)).toContain('partial_period');
    console.info(`[planted] seasonal index Jul ${s.months[6]!.index.toFixed(3)}, Aug ${s.months[7]!.index.toFixed(3)}, Jan ${s.months[0]!.index.toFixed(3)}, Feb ${s.months[1]!.index.toFixed(3)}`);
  });

  it('the weekday pattern matches a reduction by calendar weekday', async () => {
    const a = await answerSubQuestion(sq({ template: 'trend_seasonality' }), ws);
    const w = find(a, 'trend_weekday') as TrendWeekdayFinding;
    const byDay = new Array<number>(7).fill(0);
    for (const r of raw) byDay[(new Date(`${r.date}T00:00:00Z`).getUTCDay() + 6) % 7]!++;
    // Days of each weekday from 2022-01-01 to 2025-06-18, counted one by one.
    const days = new Array<number>(7).fill(0);
    for (let d = new Date('2022-01-01T00:00:00Z'); d <= new Date('2025-06-18T00:00:00Z'); d.setUTCDate(d.getUTCDate() + 1)) days[(d.getUTCDay() + 6) % 7]!++;
    expect(w.days.map((d) => d.value)).toEqual(byDay);
    expect(w.days.map((d) => d.dayCount)).toEqual(days);
    const levels = byDay.map((n, i) => n / days[i]!);
    const meanLevel = levels.reduce((x, y) => x + y, 0) / 7;
    w.days.forEach((d, i) => expect(d.index).toBeCloseTo(levels[i]! / meanLevel, 12));
  });
});

describe('trend_test on monthly bookings 2022-01..2024-12', () => {
  it('finds a significant upward trend; an independent seasonal Kendall test (Hirsch, Slack & Smith 1982) with jStat agrees', async () => {
    const a = await answerSubQuestion(sq({ window: { start: '2022-01-01', end: '2025-01-01' } }), ws);
    const t = find(a, 'trend_test') as TrendTestFinding;
    expect(t.n).toBe(36);
    expect(t.direction).toBe('up');
    expect(t.pValue).toBeLessThan(0.05);
    expect(t.seasonallyAdjusted).toBe(true);
    expect(t.slopePerPeriod).toBeGreaterThan(0);

    // Seasonal Kendall: S summed over calendar months across the three years, Var(S) summed likewise
    // (no ties), normal approximation with continuity correction; p from jStat's normal CDF.
    const counts = monthlyCounts(raw);
    let s = 0;
    let varS = 0;
    for (let m = 1; m <= 12; m++) {
      const x = [2022, 2023, 2024].map((y) => counts.get(`${y}-${String(m).padStart(2, '0')}`)!);
      for (let i = 0; i < x.length; i++) for (let j = i + 1; j < x.length; j++) s += Math.sign(x[j]! - x[i]!);
      varS += (3 * 2 * 11) / 18;
    }
    const z = (s - Math.sign(s)) / Math.sqrt(varS);
    const p = 2 * (1 - jStat.normal.cdf(Math.abs(z), 0, 1));
    expect(s).toBeGreaterThan(0);
    expect(p).toBeLessThan(0.05);
    console.info(`[planted] Mann–Kendall (seasonally adjusted) p = ${t.pValue.toExponential(2)}, raw p = ${t.rawPValue.toFixed(3)}, Sen ${t.slopePerPeriod.toFixed(2)}/month; seasonal Kendall S = ${s}, p = ${p.toExponential(2)}`);

    // Change since the peak: the peak and latest complete month read straight from the reduction.
    const months = [...counts.entries()].filter(([k]) => k >= '2022-01' && k <= '2024-12');
    const peak = months.reduce((hi, x) => (x[1] > hi[1] ? x : hi));
    const change = find(a, 'change');
    expect(change.from).toEqual({ period: `${peak[0]}-01`, value: peak[1] });
    expect(change.to).toEqual({ period: '2024-12-01', value: counts.get('2024-12') });
    expect(change.relative).toBeCloseTo((counts.get('2024-12')! - peak[1]) / peak[1], 12);
  });
});

describe('trend_summary on monthly revenue', () => {
  it('min, max, mean and median of complete months match the reduction, with their periods', async () => {
    const a = await answerSubQuestion(sq({ template: 'trend_summary', lens: 'summary', metrics: ['revenue'] }), ws);
    const s = find(a, 'trend_summary') as TrendSummaryFinding;
    const byMonth = new Map<string, number>();
    for (const r of raw) if (r.date < '2025-06-01') byMonth.set(r.date.slice(0, 7), (byMonth.get(r.date.slice(0, 7)) ?? 0) + r.fare);
    const entries = [...byMonth.entries()].sort();
    const values = entries.map((e) => e[1]);
    const sorted = [...values].sort((x, y) => x - y);
    expect(s.n).toBe(41);
    expect(s.min).toBeCloseTo(sorted[0]!, 6);
    expect(s.max).toBeCloseTo(sorted[sorted.length - 1]!, 6);
    expect(s.median).toBeCloseTo(sorted[20]!, 6);
    expect(s.mean).toBeCloseTo(values.reduce((x, y) => x + y, 0) / values.length, 6);
    expect(s.maxPeriod).toBe(`${entries.find((e) => e[1] === sorted[sorted.length - 1])![0]}-01`);
    expect(s.minPeriod).toBe(`${entries.find((e) => e[1] === sorted[0])![0]}-01`);
  });
});

describe('segment_shares of revenue by route', () => {
  it('two routes carry about 70% and three over 80%; shares match the reduction to 1e-9 relative', async () => {
    const a = await answerSubQuestion(sq({ template: 'segment_shares', lens: 'distribution', dimension: 'route', metrics: ['revenue'] }), ws);
    const f = find(a, 'segment_shares') as SegmentSharesFinding;
    const byRoute = new Map<string, number>();
    for (const r of raw) byRoute.set(r.route, (byRoute.get(r.route) ?? 0) + r.fare);
    const total = [...byRoute.values()].reduce((x, y) => x + y, 0);
    const expected = [...byRoute.entries()].sort((x, y) => y[1] - x[1]);
    expect(f.additive).toBe(true);
    expect(f.folded).toBe(0);
    expect(f.rows.map((r) => r.segment)).toEqual(expected.map((e) => e[0]));
    let running = 0;
    f.rows.forEach((r, i) => {
      running += expected[i]![1];
      expect(Math.abs(r.share! - expected[i]![1] / total) / (expected[i]![1] / total)).toBeLessThan(1e-9);
      expect(Math.abs(r.cumulativeShare! - running / total) / (running / total)).toBeLessThan(1e-9);
    });
    expect(Math.abs(f.total! - total) / total).toBeLessThan(1e-9);
    const top2 = f.rows[1]!.cumulativeShare!;
    expect(top2).toBeGreaterThan(0.65);
    expect(top2).toBeLessThan(0.75);
    expect(f.rows[2]!.cumulativeShare!).toBeGreaterThan(0.8);
    expect(f.countToThreshold).toBe(3);
    // HHI by hand: Σ (100 · share)².
    const hhi = expected.reduce((acc, e) => acc + (100 * e[1] / total) ** 2, 0);
    expect(Math.abs(f.hhi! - hhi) / hhi).toBeLessThan(1e-9);
    console.info(`[planted] route revenue: top two ${(top2 * 100).toFixed(2)}%, top three ${(f.rows[2]!.cumulativeShare! * 100).toFixed(2)}%, HHI ${f.hhi!.toFixed(0)}`);
  });

  it('an average metric gets per-segment values and no shares', async () => {
    const a = await answerSubQuestion(sq({ template: 'segment_shares', lens: 'distribution', dimension: 'route', metrics: ['average_fare'] }), ws);
    const f = find(a, 'segment_shares') as SegmentSharesFinding;
    expect(f.additive).toBe(false);
    expect(f.rows.every((r) => r.share === null && r.cumulativeShare === null)).toBe(true);
    expect(f.hhi).toBeNull();
    const sums = new Map<string, { s: number; n: number }>();
    for (const r of raw) {
      const g = sums.get(r.route) ?? { s: 0, n: 0 };
      g.s += r.fare;
      g.n++;
      sums.set(r.route, g);
    }
    for (const r of f.rows) expect(r.value).toBeCloseTo(sums.get(r.segment!)!.s / sums.get(r.segment!)!.n, 9);
  });
});

describe('segment_trend', () => {
  it('flags the Mainland–Dunlin Quay gap in November–December 2023, which the raw rows confirm', async () => {
    const dunlin = raw.filter((r) => r.route === 'Mainland–Dunlin Quay');
    expect(dunlin.some((r) => r.date.startsWith('2023-11') || r.date.startsWith('2023-12'))).toBe(false);
    expect(dunlin.some((r) => r.date.startsWith('2023-10'))).toBe(true);
    expect(dunlin.some((r) => r.date.startsWith('2024-01'))).toBe(true);
    const a = await answerSubQuestion(sq({ template: 'segment_trend', lens: 'breakdown', dimension: 'route' }), ws);
    const gaps = a.caveats.filter((c) => c.code === 'segment_gap');
    expect(gaps).toEqual([{ code: 'segment_gap', data: { segment: 'Mainland–Dunlin Quay', dimension: 'route', periods: 2, firstGap: '2023-11-01', lastGap: '2023-12-01', grain: 'month' } }]);
    const t = a.findings.find((f): f is SegmentTrendFinding => f.type === 'segment_trend' && f.segment === 'Mainland–Dunlin Quay')!;
    expect(t.points.filter((p) => p.period === '2023-11-01' || p.period === '2023-12-01').map((p) => p.value)).toEqual([null, null]);
    // Each segment's monthly series is the reduction's count.
    const counts = monthlyCounts(dunlin);
    for (const p of t.points) expect(p.value).toBe(counts.get(p.period.slice(0, 7)) ?? null);
    // Growth between full years: 2023 is not full for Dunlin Quay, so it runs 2022 → 2024.
    expect(t.growth?.fromYear).toBe(2022);
    expect(t.growth?.toYear).toBe(2024);
    const y = (yr: string) => dunlin.filter((r) => r.date.startsWith(yr)).length;
    expect(t.growth?.relative).toBeCloseTo(y('2024') / y('2022') - 1, 12);
  });

  it('flags the kiosk channel as starting in June 2023, and names the fastest-growing channel', async () => {
    const kioskFirst = raw.filter((r) => r.channel === 'kiosk').reduce((min, r) => (r.date < min ? r.date : min), '9999');
    expect(kioskFirst.slice(0, 7)).toBe('2023-06');
    const a = await answerSubQuestion(sq({ template: 'segment_trend', lens: 'breakdown', dimension: 'channel' }), ws);
    const late = a.caveats.filter((c) => c.code === 'late_segment');
    expect(late).toEqual([{ code: 'late_segment', data: { segment: 'kiosk', dimension: 'channel', firstPeriod: '2023-06-01', grain: 'month' } }]);
    // The null channel (a data wart) is a segment of its own, not dropped.
    const trends = a.findings.filter((f): f is SegmentTrendFinding => f.type === 'segment_trend');
    const missing = trends.find((t) => t.segment === null && !t.other)!;
    expect(missing.total).toBe(raw.filter((r) => r.channel === null).length);
    // Fastest by compound yearly growth 2022 → 2024, recomputed from the raw rows.
    const cagrOf = (ch: string | null) => {
      const n = (yr: string) => raw.filter((r) => r.channel === ch && r.date.startsWith(yr)).length;
      return Math.sqrt(n('2024') / n('2022')) - 1;
    };
    const candidates = ['app', 'web', 'phone', null].map((ch) => ({ ch, g: cagrOf(ch) })).sort((x, y) => y.g - x.g);
    const overview = find(a, 'segment_trend_overview') as SegmentTrendOverviewFinding;
    expect(overview.fastest?.segment).toBe(candidates[0]!.ch);
    expect(overview.fastest?.value).toBeCloseTo(candidates[0]!.g, 12);
    console.info(`[planted] kiosk first period ${late[0]?.data.firstPeriod}; fastest channel ${overview.fastest?.segment} at ${(overview.fastest!.value * 100).toFixed(1)}% a year`);
  });
});

describe('charts on the demo data', () => {
  it('every presenter renders a PNG (written to /tmp/trend-charts for a look)', async () => {
    const { mkdirSync } = await import('node:fs');
    const { renderChart } = await import('../../../analysis/charts/render.js');
    const { writeFile } = await import('node:fs/promises');
    mkdirSync('/tmp/trend-charts', { recursive: true });
    const questions: SubQuestion[] = [
      sq({ template: 'trend_test' }),
      sq({ template: 'trend_seasonality' }),
      sq({ template: 'trend_summary', lens: 'summary' }),
      sq({ template: 'segment_trend', lens: 'breakdown', dimension: 'channel' }),
      sq({ template: 'segment_shares', lens: 'distribution', dimension: 'route', metrics: ['revenue'] }),
    ];
    for (const q of questions) {
      const a = await answerSubQuestion(q, ws);
      const p = definitionOf(q).present(a, { dataset: ws.dataset, locale: 'en-IE', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
      expect(p.chart).not.toBeNull();
      const png = await renderChart(p.chart!);
      // PNG signature: 0x89 'P' 'N' 'G'.
      expect([...png.subarray(0, 4)]).toEqual([0x89, 0x50, 0x4e, 0x47]);
      await writeFile(`/tmp/trend-charts/${q.template}.png`, png);
    }
  });
});
