// The growth family on the generated Skerrywake demo (invented data) in a real DuckDB: the planted
// growth effects are found, and every number matches an independent plain-JS reduction over the raw
// rows read back from the file (never the templates' SQL).
import { DuckDBInstance } from '@duckdb/node-api';
import { jStat } from '../stats/jstat.js';
import { mkdirSync, writeFileSync } from 'node:fs';
import { mkdtemp, readFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { renderChart } from '../../../analysis/charts/render.js';
import type {
  GrowthCagrFinding,
  GrowthDriversFinding,
  GrowthRateSummaryFinding,
  GrowthSeriesFinding,
  GrowthShareShiftFinding,
  GrowthYearsFinding,
  GrowthYtdFinding,
} from '../../../analysis/findings/growth.js';
import { addMonths } from '../../../analysis/periods.js';
import { definitionOf, SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { Answer, Finding, SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { loadConfig, parseConfigText } from '../../../config/load.js';
import { demoFixture } from '../../helpers/demo-fixture.js';

interface RawRow {
  day: string;
  /** fare_total in cents: DECIMAL(10,2) summed as integers is exact, like the database's decimal sum. */
  cents: number;
  channel: string | null;
  route: string;
}

let ws: Workspace;
let raw: RawRow[];

beforeAll(async () => {
  const demo = await demoFixture();
  ws = await openWorkspace(loadConfig(demo.configPath));
  const inst = await DuckDBInstance.create(demo.databasePath, { access_mode: 'READ_ONLY' });
  const con = await inst.connect();
  const reader = await con.runAndReadAll('SELECT sail_date, fare_total, channel, route FROM bookings');
  raw = reader.getRowsJson().map((r) => ({
    day: String(r[0]).slice(0, 10),
    cents: Math.round(Number(r[1]) * 100),
    channel: r[2] === null ? null : String(r[2]),
    route: String(r[3]),
  }));
  con.closeSync();
  inst.closeSync();
});

afterAll(async () => {
  await ws?.source.close();
});

// ---- the independent reduction ----------------------------------------------------------------
const inSpan = (r: RawRow, start: string, end: string) => r.day >= start && r.day < end;
const count = (start: string, end: string) => raw.filter((r) => inSpan(r, start, end)).length;
const revenue = (start: string, end: string, pick: (r: RawRow) => boolean = () => true) =>
  raw.filter((r) => inSpan(r, start, end) && pick(r)).reduce((a, r) => a + r.cents, 0) / 100;
const rel = (before: number, after: number) => after / before - 1;

const SERIES: SubQuestion = {
  id: 'growth-demo',
  kind: 'growth',
  lens: 'time_pattern',
  template: 'growth_series',
  metrics: ['bookings', 'revenue'],
  grain: 'month',
  window: { start: '2022-01-01', end: '2025-07-01' },
  filters: [],
};
const SUMMER_2024 = { start: '2024-06-01', end: '2024-09-01' };

const pick = <T extends Finding['type']>(a: Answer, type: T, metric: string) =>
  a.findings.find((f) => f.type === type && 'metric' in f && f.metric === metric) as Extract<Finding, { type: T }>;
const closeRel = (actual: number | null, expected: number) => {
  expect(actual).not.toBeNull();
  expect(Math.abs(actual! - expected)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(expected)));
};

describe('growth_series on the demo data (planted trend, demo-scenario.md effect 2)', () => {
  let answer: Answer;
  beforeAll(async () => {
    answer = await answerSubQuestion(SERIES, ws);
  });

  it('finds about +8% in 2023, flat 2024 and about −5% in the first half of 2025, matching the raw rows', () => {
    const years = pick(answer, 'growth_years', 'bookings') as GrowthYearsFinding;
    const y = (iso: string) => years.years.find((x) => x.year === iso)!;
    const b22 = count('2022-01-01', '2023-01-01');
    const b23 = count('2023-01-01', '2024-01-01');
    const b24 = count('2024-01-01', '2025-01-01');
    expect(y('2022-01-01').value).toBe(b22);
    expect(y('2023-01-01').value).toBe(b23);
    expect(y('2024-01-01').value).toBe(b24);
    closeRel(y('2023-01-01').yoy, rel(b22, b23));
    closeRel(y('2024-01-01').yoy, rel(b23, b24));
    expect(rel(b22, b23)).toBeGreaterThan(0.05);
    expect(rel(b22, b23)).toBeLessThan(0.11);
    expect(Math.abs(rel(b23, b24))).toBeLessThan(0.03);
    expect(y('2025-01-01')).toMatchObject({ complete: false, yoy: null });

    const ytd = pick(answer, 'growth_ytd', 'bookings') as GrowthYtdFinding;
    expect(ytd.through).toBe('2025-06-18');
    const cur = count('2025-01-01', '2025-06-19');
    const prior = count('2024-01-01', '2024-06-19');
    expect(ytd.current.value).toBe(cur);
    expect(ytd.prior.value).toBe(prior);
    closeRel(ytd.relative, rel(prior, cur));
    expect(rel(prior, cur)).toBeGreaterThan(-0.08);
    expect(rel(prior, cur)).toBeLessThan(-0.02);
  });

  it('matches every monthly rate and the revenue totals to 1e-9', () => {
    const s = pick(answer, 'growth_series', 'revenue') as GrowthSeriesFinding;
    const monthly = s.points.map((p) => revenue(p.period, addMonths(p.period, 1)));
    s.points.forEach((p, i) => {
      if (p.partial) return;
      closeRel(p.value, monthly[i]!);
      if (i >= 12) closeRel(p.yoy, rel(monthly[i - 12]!, monthly[i]!));
      if (i >= 1) closeRel(p.pop, rel(monthly[i - 1]!, monthly[i]!));
    });
    // Trailing 12 months to May 2025 against the 12 months before.
    const may = s.points.findIndex((p) => p.period === '2025-05-01');
    closeRel(s.points[may]!.trailing, rel(revenue('2023-06-01', '2024-06-01'), revenue('2024-06-01', '2025-06-01')));
    const years = pick(answer, 'growth_years', 'revenue') as GrowthYearsFinding;
    closeRel(years.years[1]!.value, revenue('2023-01-01', '2024-01-01'));
    const c = pick(answer, 'growth_cagr', 'revenue') as GrowthCagrFinding;
    expect(c).toMatchObject({ from: { year: '2022-01-01' }, to: { year: '2024-01-01' }, years: 2 });
    closeRel(c.rate, Math.sqrt(revenue('2024-01-01', '2025-01-01') / revenue('2022-01-01', '2023-01-01')) - 1);
  });

  it('marks June 2025 partial (data ends 18 June), leaves it out of every rate and says so', () => {
    const s = pick(answer, 'growth_series', 'bookings') as GrowthSeriesFinding;
    const june = s.points[s.points.length - 1]!;
    expect(june).toMatchObject({ period: '2025-06-01', partial: true, pop: null, yoy: null, trailing: null });
    expect(june.value).toBe(count('2025-06-01', '2025-06-19'));
    expect(s.points.filter((p) => p.partial)).toHaveLength(1);
    expect(answer.caveats).toContainEqual({
      code: 'partial_period_excluded',
      data: { period: '2025-06-01', grain: 'month', coveredFrom: '2025-06-01', coveredTo: '2025-06-18' },
    });
  });

  it('titles the chart with the headline, from the findings', () => {
    const p = SUB_QUESTIONS['growth_series'].present(answer, presentCtx('managers'));
    expect(p.title).toMatch(/^Bookings grew \d\.\d% in 2023, then held flat in 2024; 2025 so far: −\d\.\d%$/);
    expect(p.chart?.kind).toBe('growth_grid');
  });
});

describe('growth_series on a segment with a planted gap (effect 6: Dunlin Quay closed Nov–Dec 2023)', () => {
  it('counts the closed months as 0 (the route had no bookings, the data no hole), and the year-later months have no base', async () => {
    const sq: SubQuestion = { ...SERIES, metrics: ['bookings'], filters: [{ dimension: 'route', values: ['Mainland–Dunlin Quay'] }] };
    const answer = await answerSubQuestion(sq, ws);
    const dunlin = (start: string, end: string) => raw.filter((r) => r.route === 'Mainland–Dunlin Quay' && inSpan(r, start, end)).length;
    expect(dunlin('2023-11-01', '2024-01-01')).toBe(0);
    const s = pick(answer, 'growth_series', 'bookings') as GrowthSeriesFinding;
    for (const closed of ['2023-11-01', '2023-12-01']) expect(s.points.find((p) => p.period === closed)!.value).toBe(0);
    expect(answer.caveats.map((c) => c.code)).not.toContain('series_gap');
    const nov24 = s.points.find((p) => p.period === '2024-11-01')!;
    expect(nov24.value).toBe(dunlin('2024-11-01', '2024-12-01'));
    expect(nov24.yoy).toBeNull();
    expect(answer.caveats.map((c) => c.code)).toContain('base_zero');
    const notes = SUB_QUESTIONS['growth_series'].present(answer, presentCtx('managers')).notes;
    expect(notes.join(' ')).toMatch(/earlier value is zero/);
  });
});

describe('growth_drivers on the demo data', () => {
  it('summer 2024 against summer 2023, revenue by channel, matches the raw rows and names the largest change', async () => {
    const sq: SubQuestion = { ...SERIES, template: 'growth_drivers', lens: 'breakdown', metrics: ['revenue'], dimension: 'channel', window: SUMMER_2024 };
    const answer = await answerSubQuestion(sq, ws);
    const f = pick(answer, 'growth_drivers', 'revenue') as GrowthDriversFinding;
    expect(f.current).toEqual(SUMMER_2024);
    expect(f.prior).toEqual({ start: '2023-06-01', end: '2023-09-01' });
    const channels = [...new Set(raw.map((r) => r.channel))];
    const expected = channels.map((ch) => {
      const before = revenue('2023-06-01', '2023-09-01', (r) => r.channel === ch);
      const after = revenue('2024-06-01', '2024-09-01', (r) => r.channel === ch);
      return { ch, before, after, change: after - before };
    });
    expected.sort((a, b) => Math.abs(b.change) - Math.abs(a.change));
    expect(f.segments[0]!.segment).toBe(expected[0]!.ch);
    for (const e of expected) {
      const s = f.segments.find((x) => x.segment === e.ch)!;
      closeRel(s.before, e.before);
      closeRel(s.after, e.after);
    }
    closeRel(f.total.before, revenue('2023-06-01', '2023-09-01'));
    closeRel(f.total.after, revenue('2024-06-01', '2024-09-01'));
    // Contributions of an additive metric add up to the total's relative change.
    closeRel(f.segments.reduce((a, s) => a + s.contribution!, 0), f.total.relative!);
    // Kiosk opened on 2023-06-01 (demo-scenario.md effect 7), so it is present in both summers.
    expect(answer.caveats.filter((c) => c.code === 'late_segment')).toEqual([]);
    const p = SUB_QUESTIONS['growth_drivers'].present(answer, presentCtx('managers'));
    expect(p.title.toLowerCase()).toContain(String(expected[0]!.ch));
  });

  it('summer 2023 against summer 2022 flags kiosk as a late segment from its first day', async () => {
    const sq: SubQuestion = { ...SERIES, template: 'growth_drivers', lens: 'breakdown', metrics: ['revenue'], dimension: 'channel', window: { start: '2023-06-01', end: '2023-09-01' } };
    const answer = await answerSubQuestion(sq, ws);
    const firstKiosk = raw.filter((r) => r.channel === 'kiosk' && inSpan(r, '2023-06-01', '2023-09-01')).reduce((m, r) => (r.day < m ? r.day : m), '9999');
    expect(answer.caveats).toContainEqual({ code: 'late_segment', data: expect.objectContaining({ segment: 'kiosk', firstPeriod: firstKiosk, grain: 'day' }) });
    const kiosk = (pick(answer, 'growth_drivers', 'revenue') as GrowthDriversFinding).segments.find((s) => s.segment === 'kiosk')!;
    expect(kiosk.before).toBe(0);
    closeRel(kiosk.after, revenue('2023-06-01', '2023-09-01', (r) => r.channel === 'kiosk'));
  });

  it('a summer that has only begun is compared over the same covered dates a year earlier', async () => {
    const sq: SubQuestion = { ...SERIES, template: 'growth_drivers', lens: 'breakdown', metrics: ['revenue'], dimension: 'route', window: { start: '2025-06-01', end: '2025-09-01' } };
    const answer = await answerSubQuestion(sq, ws);
    const f = pick(answer, 'growth_drivers', 'revenue') as GrowthDriversFinding;
    expect(f.current).toEqual({ start: '2025-06-01', end: '2025-06-19' });
    expect(f.prior).toEqual({ start: '2024-06-01', end: '2024-06-19' });
    closeRel(f.total.before, revenue('2024-06-01', '2024-06-19'));
    closeRel(f.total.after, revenue('2025-06-01', '2025-06-19'));
    expect(answer.caveats.map((c) => c.code)).toContain('partial_period');
    // The routes moved both ways: every route's rise and fall added up from the raw rows.
    const moves = [...new Set(raw.map((r) => r.route))].map((route) => revenue('2025-06-01', '2025-06-19', (r) => r.route === route) - revenue('2024-06-01', '2024-06-19', (r) => r.route === route));
    closeRel(f.offset?.rises ?? null, moves.filter((m) => m > 0).reduce((a, b) => a + b, 0));
    closeRel(f.offset?.falls ?? null, moves.filter((m) => m < 0).reduce((a, b) => a + b, 0));
    const p = SUB_QUESTIONS['growth_drivers'].present(answer, presentCtx('managers'));
    expect(p.caption).toContain('Moves offset each other: the rises add up to');
    expect(p.caption).not.toContain('of the total change');
  });
});

describe('growth_share_shift on the demo data (planted concentration, effect 4)', () => {
  it('route shares of revenue match the raw rows; three routes carry 80% or more', async () => {
    const sq: SubQuestion = { ...SERIES, template: 'growth_share_shift', lens: 'distribution', metrics: ['revenue'], dimension: 'route', window: SUMMER_2024 };
    const answer = await answerSubQuestion(sq, ws);
    const f = pick(answer, 'growth_share_shift', 'revenue') as GrowthShareShiftFinding;
    const routes = [...new Set(raw.map((r) => r.route))];
    const shares = (start: string, end: string) => {
      const total = revenue(start, end);
      return new Map(routes.map((rt) => [rt, revenue(start, end, (r) => r.route === rt) / total]));
    };
    const before = shares('2023-06-01', '2023-09-01');
    const after = shares('2024-06-01', '2024-09-01');
    for (const s of f.segments) {
      closeRel(s.shareBefore, before.get(s.segment!)!);
      closeRel(s.shareAfter, after.get(s.segment!)!);
    }
    const hhi = (m: Map<string, number>) => [...m.values()].reduce((a, s) => a + (100 * s) ** 2, 0);
    closeRel(f.before.hhi, hhi(before));
    closeRel(f.after.hhi, hhi(after));
    expect(f.after.countToThreshold).toBe(3);
    const top2 = [...after.values()].sort((a, b) => b - a).slice(0, 2).reduce((a, b) => a + b, 0);
    expect(top2).toBeGreaterThan(0.6); // "two routes carry about 70% of revenue"
  });
});

describe('growth_summary on the demo data', () => {
  it('summarises the monthly year-over-year rates like jStat does over the raw-row rates', async () => {
    const sq: SubQuestion = { ...SERIES, template: 'growth_summary', lens: 'summary', metrics: ['revenue'] };
    const answer = await answerSubQuestion(sq, ws);
    const f = pick(answer, 'growth_rate_summary', 'revenue') as GrowthRateSummaryFinding;
    expect(f.basis).toBe('yoy');
    const months: string[] = [];
    for (let m = '2023-01-01'; m < '2025-06-01'; m = addMonths(m, 1)) months.push(m);
    const rates = months.map((m) => rel(revenue(addMonths(m, -12), addMonths(m, -11)), revenue(m, addMonths(m, 1))));
    expect(f.n).toBe(rates.length);
    closeRel(f.mean, jStat.mean(rates));
    closeRel(f.median, jStat.median(rates));
    closeRel(f.sd, jStat.stdev(rates, true));
    closeRel(f.min!.value, Math.min(...rates));
    closeRel(f.max!.value, Math.max(...rates));
    expect(f.max!.period).toBe(months[rates.indexOf(Math.max(...rates))]);
    expect(f.min!.period).toBe(months[rates.indexOf(Math.min(...rates))]);
  });
});

describe('growth templates on edge-case data in a real DuckDB', () => {
  // A tiny hand-made table: 2022 has zero fares, 2023 has fares, 2024 has null fares only.
  let edge: Workspace;
  beforeAll(async () => {
    const dir = await mkdtemp(join(tmpdir(), 'growth-edge-'));
    const path = join(dir, 'edge.duckdb');
    const inst = await DuckDBInstance.create(path);
    const con = await inst.connect();
    await con.run(`CREATE TABLE bookings (booking_id VARCHAR, booked_at TIMESTAMP, sail_date DATE, route VARCHAR, fare_class VARCHAR,
      channel VARCHAR, passengers INTEGER, fare_total DECIMAL(10,2), customer_id VARCHAR, customer_email VARCHAR, pass_holder BOOLEAN,
      refunded BOOLEAN, refund_amount DECIMAL(10,2))`);
    await con.run(`INSERT INTO bookings VALUES
      ('a', NULL, DATE '2022-01-01', 'r1', 'foot', 'web', 1, 0, 'c1', 'x', FALSE, FALSE, 0),
      ('b', NULL, DATE '2022-08-10', 'r1', 'foot', 'web', 1, 0, 'c1', 'x', FALSE, FALSE, 0),
      ('c', NULL, DATE '2023-03-10', 'r1', 'foot', 'web', 1, 40, 'c1', 'x', FALSE, FALSE, 0),
      ('d', NULL, DATE '2023-08-10', 'r1', 'foot', 'app', 1, 60, 'c1', 'x', FALSE, FALSE, 0),
      ('e', NULL, DATE '2024-03-10', 'r1', 'foot', 'web', 1, NULL, 'c1', 'x', FALSE, FALSE, 0),
      ('f', NULL, DATE '2024-12-31', 'r1', 'foot', 'web', 1, NULL, 'c1', 'x', FALSE, FALSE, 0)`);
    con.closeSync();
    inst.closeSync();
    const text = (await readFile(join(process.cwd(), 'config/examples/skerrywake.yaml'), 'utf8')).replace('path: skerrywake.duckdb', 'path: edge.duckdb');
    const cfgPath = join(dir, 'edge.yaml');
    writeFileSync(cfgPath, text);
    edge = await openWorkspace(parseConfigText(text, cfgPath));
  });
  afterAll(async () => {
    await edge?.source.close();
  });

  it('a zero base gives null growth with base_zero; a window with no data gives no_data', async () => {
    const sq: SubQuestion = { ...SERIES, metrics: ['revenue'], grain: 'year', window: { start: '2022-01-01', end: '2025-01-01' } };
    const a = await answerSubQuestion(sq, edge);
    const years = pick(a, 'growth_years', 'revenue') as GrowthYearsFinding;
    expect(years.years.map((y) => y.value)).toEqual([0, 100, null]);
    expect(years.years[1]!.yoy).toBeNull();
    expect(a.caveats.map((c) => c.code)).toContain('base_zero');
    const none = await answerSubQuestion({ ...sq, window: { start: '2030-01-01', end: '2031-01-01' } }, edge);
    expect(none.findings).toEqual([]);
    expect(none.caveats.map((c) => c.code)).toContain('no_data');
    for (const template of ['growth_drivers', 'growth_summary', 'growth_share_shift'] as const) {
      const other = await answerSubQuestion({ ...sq, template, dimension: 'channel', window: { start: '2030-01-01', end: '2031-01-01' } }, edge);
      expect(other.caveats.map((c) => c.code)).toContain('no_data');
    }
  });

  it('a metric all null in the window gives all_null; a single period gives single_period', async () => {
    const sq: SubQuestion = { ...SERIES, metrics: ['revenue'], grain: 'month', window: { start: '2024-01-01', end: '2025-01-01' } };
    const a = await answerSubQuestion(sq, edge);
    expect(a.caveats).toContainEqual({ code: 'all_null', data: { metric: 'revenue' } });
    const one = await answerSubQuestion({ ...sq, window: { start: '2023-03-01', end: '2023-04-01' } }, edge);
    expect(one.caveats.map((c) => c.code)).toContain('single_period');
    const d = await answerSubQuestion({ ...sq, template: 'growth_summary' }, edge);
    expect(d.caveats).toContainEqual({ code: 'all_null', data: { metric: 'revenue' } });
    // Every presenter copes with these answers.
    for (const ans of [a, one, d]) {
      const p = definitionOf(ans.subQuestion).present(ans, presentCtx('leadership'));
      expect(`${p.title} ${p.caption} ${p.notes.join(' ')}`).not.toMatch(/NaN|Infinity|undefined|\d{4}-\d{2}-\d{2}/);
    }
  });
});

describe('charts of every growth presenter render on the demo data', () => {
  it('writes one PNG per presenter', async () => {
    const out = join(tmpdir(), 'growth-charts');
    mkdirSync(out, { recursive: true });
    const sqs: SubQuestion[] = [
      SERIES,
      { ...SERIES, template: 'growth_drivers', lens: 'breakdown', metrics: ['revenue'], dimension: 'channel', window: SUMMER_2024 },
      { ...SERIES, template: 'growth_summary', lens: 'summary', metrics: ['revenue'] },
      { ...SERIES, template: 'growth_share_shift', lens: 'distribution', metrics: ['revenue'], dimension: 'route', window: SUMMER_2024 },
    ];
    for (const sq of sqs) {
      const p = definitionOf(sq).present(await answerSubQuestion(sq, ws), presentCtx('managers'));
      expect(p.chart).not.toBeNull();
      const png = await renderChart(p.chart!);
      expect(png.subarray(1, 4).toString('latin1')).toBe('PNG');
      writeFileSync(join(out, `${sq.template}.png`), png);
    }
  });
});

function presentCtx(audience: 'leadership' | 'managers' | 'analysts') {
  return { dataset: ws.dataset, locale: 'en-IE', audience, chart: { width: 1200, height: 675, scale: 1 as const }, dataAsOf: ws.coverage.lastDate };
}
