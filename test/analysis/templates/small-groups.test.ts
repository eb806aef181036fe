// Small-group suppression through real SQL. A tiny CSV dataset (written here, read by an
// in-memory DuckDB) has two routes with a handful of rows each and a route whose pass holders are
// only three bookings; with min_group_size 10 every segment-producing template folds the two tiny
// routes into "All others" in SQL and every group comparison withholds the three bookings. The
// two tiny routes together hold fewer than 10 rows, so the fold would still be small: the
// smallest named route (Middle) joins it as a complementary suppression (secondary cell
// suppression, ESSnet Handbook on Statistical Disclosure Control; see complement-fold.test.ts). The
// expected values are plain JS reductions over the generated rows (never the same SQL). A second
// part runs the demo data with a minimum large enough to fold its smallest route.
import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig, parseConfigText } from '../../../config/load.js';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { definitionOf, type TemplateName } from '../../../analysis/sub-questions/registry.js';
import { caveatNote } from '../../../analysis/captions/caveat-text.js';
import { tableToCsv } from '../../../analysis/table-csv.js';
import type { Answer, Finding, SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { aliasOf, minGroupSize } from '../../../analysis/templates/small-groups.js';
import { demoFixture } from '../../helpers/demo-fixture.js';
import { copyDuckDbTableToPostgres, createReaderRole, describeWithPostgres, dropSchema, onPostgres, uniqueName } from '../../helpers/postgres.js';

const MIN = 10;

const CONFIG = `version: 1
datasets:
  - name: trips
    label: Small-group trips
    source: { kind: csv, paths: [trips.csv] }
    table: trips
    time_column: sail_date
    timezone: Europe/Dublin
    key_column: booking_id
    min_group_size: ${MIN}
    metrics:
      - { name: revenue, label: Revenue, definition: { type: sum, column: fare_total }, unit: currency, currency: EUR, higher_is_better: true }
      - { name: bookings, label: Bookings, definition: { type: count }, unit: count, higher_is_better: true }
      - { name: average_fare, label: Average fare, definition: { type: average, column: fare_total }, unit: currency, currency: EUR, higher_is_better: true }
    dimensions:
      - { name: route, column: route, label: Route }
    comparison_groups:
      - { name: pass, label: Pass, column: pass_holder, members_label: Pass holders, others_label: Other customers, launch_date: "2023-01-01", unit_column: customer_id }
`;

interface Row {
  id: string;
  date: string;
  route: string;
  fare: number;
  customer: string;
  pass: boolean;
}

/** Two years of bookings: North every day (pass holders among them), South every day with three pass-holder bookings, Middle every other day, and two tiny routes. */
function generate(): Row[] {
  const rows: Row[] = [];
  let id = 0;
  const add = (date: string, route: string, fare: number, customer: string, pass: boolean) => rows.push({ id: `B${id++}`, date, route, fare, customer, pass });
  for (let day = 0; day < 731; day++) {
    const date = new Date(Date.UTC(2023, 0, 1 + day)).toISOString().slice(0, 10);
    add(date, 'North', 20 + (day % 13), `N${day % 40}`, false);
    add(date, 'North', 15 + (day % 7), `P${day % 25}`, true);
    add(date, 'South', 30 + (day % 11) * 0.5, `S${day % 30}`, false);
    if (day % 2 === 0) add(date, 'Middle', 25, `M${day % 10}`, false);
  }
  // South's only pass holders: three bookings, one customer each.
  add('2024-06-05', 'South', 12, 'SP1', true);
  add('2024-07-10', 'South', 13, 'SP2', true);
  add('2024-08-20', 'South', 14, 'SP3', true);
  // Tiny routes: a few bookings each, in the summers compared and in the latest months.
  for (const [date, fare] of [['2023-07-20', 41], ['2024-07-03', 43], ['2024-07-15', 47], ['2024-12-09', 44]] as const) add(date, 'Tiny1', fare, 'T1', false);
  for (const [date, fare] of [['2023-08-11', 51], ['2024-06-10', 53], ['2024-08-01', 59], ['2024-11-05', 57], ['2024-12-20', 55]] as const) add(date, 'Tiny2', fare, 'T2', false);
  return rows;
}

const ROWS = generate();

function csv(rows: Row[]): string {
  return `booking_id,sail_date,route,fare_total,customer_id,pass_holder\n${rows.map((r) => `${r.id},${r.date},${r.route},${r.fare},${r.customer},${r.pass}`).join('\n')}\n`;
}

/** Plain reductions over the generated rows. */
const inWindow = (r: Row, start: string, end: string) => r.date >= start && r.date < end;
const sumFare = (rows: Row[]) => rows.reduce((a, r) => a + r.fare, 0);
const where = (pred: (r: Row) => boolean) => ROWS.filter(pred);
/** The rows of "All others": the tiny routes and their complement, Middle. */
const folded = (r: Row) => r.route.startsWith('Tiny') || r.route === 'Middle';

let ws: Workspace;
let off: Workspace;
beforeAll(async () => {
  const dir = await mkdtemp(join(tmpdir(), 'threadcount-small-groups-'));
  await writeFile(join(dir, 'trips.csv'), csv(ROWS));
  ws = await openWorkspace(parseConfigText(CONFIG, join(dir, 'threadcount.yaml')));
  // The same data with suppression off, as the control.
  const dataset = { ...ws.dataset, min_group_size: 0 };
  off = { ...ws, dataset, context: { ...ws.context, dataset } };
});
afterAll(async () => {
  await ws?.source.close();
});

function sq(template: TemplateName, over: Partial<SubQuestion> = {}): SubQuestion {
  return {
    id: template,
    kind: 'trend',
    lens: 'breakdown',
    template,
    metrics: ['revenue'],
    dimension: 'route',
    grain: 'month',
    window: { start: '2023-01-01', end: '2025-01-01' },
    filters: [],
    comparisonGroup: 'pass',
    ...over,
  };
}

const typeOf = <T extends Finding['type']>(a: Answer, type: T) => a.findings.filter((f): f is Extract<Finding, { type: T }> => f.type === type);
const suppressed = (a: Answer) => a.caveats.filter((c) => c.code === 'suppressed_small_groups');

/** Every text a presenter writes, for three audiences: no NaN, no "undefined". */
function texts(a: Answer, w: Workspace = ws): string {
  const out: string[] = [];
  for (const audience of ['leadership', 'managers', 'analysts'] as const) {
    const p = definitionOf(a.subQuestion).present(a, { dataset: w.dataset, locale: 'en-IE', audience, chart: { width: 800, height: 450, scale: 1 }, dataAsOf: w.coverage.lastDate });
    out.push(p.title, p.caption, ...p.notes, p.takeaway?.text ?? '');
    if (p.chart) out.push(JSON.stringify(p.chart));
  }
  const joined = out.join('\n');
  expect(joined).not.toMatch(/NaN|Infinity|undefined/);
  return joined;
}

/** The CSVs a thread would attach: no tiny route is named in them. */
function attached(a: Answer): string {
  return Object.values(a.tables).map(tableToCsv).join('\n');
}

describe('small-group suppression (in-memory DuckDB over a tiny CSV)', () => {
  it('reads the minimum from the dataset; 0 or 1 suppresses nothing', () => {
    expect(minGroupSize(ws.dataset)).toBe(MIN);
    expect(minGroupSize({ min_group_size: 0 })).toBeNull();
    expect(minGroupSize({ min_group_size: 1 })).toBeNull();
    expect(minGroupSize({})).toBeNull();
    expect(aliasOf('CAST(COUNT(*) AS DOUBLE) AS tc_n')).toBe('tc_n');
    expect(aliasOf('SUM(x) AS "revenue"')).toBe('"revenue"');
  });

  it('segment_shares: the tiny routes fold into "All others" whatever their rank, with Middle as their complement', async () => {
    const a = await answerSubQuestion(sq('segment_shares', { lens: 'distribution' }), ws);
    const f = typeOf(a, 'segment_shares')[0]!;
    const named = f.rows.filter((r) => !r.other).map((r) => r.segment);
    expect(named).toEqual(['North', 'South']);
    const fold = f.rows.find((r) => r.other)!;
    expect(fold.members).toBe(3);
    // Independent: the folded routes' fares summed in JS.
    expect(fold.value).toBeCloseTo(sumFare(where(folded)), 6);
    expect(f.rows.find((r) => r.segment === 'North')!.value).toBeCloseTo(sumFare(where((r) => r.route === 'North')), 6);
    expect(f.total).toBeCloseTo(sumFare(ROWS), 6);
    expect(suppressed(a)).toEqual([{ code: 'suppressed_small_groups', data: { count: 2, minimum: MIN, dimension: 'route', complementary: 1 } }]);
    expect(a.caveats.map((c) => c.code)).not.toContain('segments_folded');
    expect(attached(a)).not.toMatch(/Tiny|Middle/);
    expect(texts(a)).toContain('2 segments with fewer than 10 rows (the minimum group size) are combined as "All others", with 1 more segment so that they cannot be worked out from the total.');
    // The control: with suppression off the tiny routes are named.
    const plain = typeOf(await answerSubQuestion(sq('segment_shares', { lens: 'distribution' }), off), 'segment_shares')[0]!;
    expect(plain.rows.map((r) => r.segment)).toEqual(['North', 'South', 'Middle', 'Tiny2', 'Tiny1']);
  });

  it('segment_trend: the fold\'s monthly series is the folded routes\' monthly sums', async () => {
    const a = await answerSubQuestion(sq('segment_trend', { lens: 'time_pattern' }), ws);
    const fold = typeOf(a, 'segment_trend').find((t) => t.other)!;
    const byMonth = new Map<string, number>();
    for (const r of where(folded)) byMonth.set(`${r.date.slice(0, 7)}-01`, (byMonth.get(`${r.date.slice(0, 7)}-01`) ?? 0) + r.fare);
    for (const p of fold.points) expect(p.value ?? 0).toBeCloseTo(byMonth.get(p.period) ?? 0, 6);
    expect(typeOf(a, 'segment_trend').filter((t) => !t.other).map((t) => t.segment)).toEqual(['North', 'South']);
    expect(attached(a)).not.toMatch(/Tiny|Middle/);
    texts(a);
  });

  it('kpi_by_segment: a segment small in any period read joins "All others"', async () => {
    const a = await answerSubQuestion(sq('kpi_by_segment', { kind: 'kpi', metrics: ['revenue'] }), ws);
    const f = typeOf(a, 'kpi_by_segment')[0]!;
    expect(f.period).toBe('2024-12-01');
    const fold = f.segments.find((s) => s.other)!;
    // December 2024: one booking of each tiny route, too few on their own, so Middle joins them.
    expect(fold.value).toBeCloseTo(sumFare(where((r) => folded(r) && inWindow(r, '2024-12-01', '2025-01-01'))), 6);
    expect(f.segments.filter((s) => !s.other).map((s) => s.key)).toEqual(['North', 'South']);
    expect(suppressed(a)[0]?.data).toMatchObject({ count: 2, minimum: MIN, complementary: 1 });
    expect(attached(a)).not.toMatch(/Tiny|Middle/);
    texts(a);
  });

  it('kpi_mix: the fold is one "All others" row with the tiny routes\' share', async () => {
    const a = await answerSubQuestion(sq('kpi_mix', { kind: 'kpi', lens: 'distribution' }), ws);
    const f = typeOf(a, 'kpi_mix')[0]!;
    const fold = f.segments.find((s) => s.other)!;
    const dec = where((r) => inWindow(r, '2024-12-01', '2025-01-01'));
    expect(fold.value).toBeCloseTo(sumFare(dec.filter(folded)), 6);
    expect(fold.share!).toBeCloseTo(sumFare(dec.filter(folded)) / sumFare(dec), 9);
    expect(f.segments.at(-1)!.other).toBe(true);
    expect(f.total).toBeCloseTo(sumFare(dec), 6);
    expect(suppressed(a)[0]?.data).toMatchObject({ count: 2, minimum: MIN, complementary: 1 });
    expect(attached(a)).not.toMatch(/Tiny|Middle/);
    expect(texts(a)).toContain('All others');
  });

  it('growth_drivers and growth_share_shift: the tiny routes and their complement are one folded row per side, summing correctly', async () => {
    const summer = { start: '2024-06-01', end: '2024-09-01' };
    const tiny = (start: string, end: string) => sumFare(where((r) => folded(r) && inWindow(r, start, end)));
    const drivers = await answerSubQuestion(sq('growth_drivers', { kind: 'growth', window: summer }), ws);
    const d = typeOf(drivers, 'growth_drivers')[0]!;
    expect(d.segments.map((s) => s.segment).sort()).toEqual(['North', 'South']);
    expect(d.others).toMatchObject({ count: 3 });
    expect(d.others!.after).toBeCloseTo(tiny('2024-06-01', '2024-09-01'), 6);
    expect(d.others!.before).toBeCloseTo(tiny('2023-06-01', '2023-09-01'), 6);
    // The parts still add up to the total on each side.
    expect(d.segments.reduce((x, s) => x + s.after!, 0) + d.others!.after!).toBeCloseTo(d.total.after!, 6);
    expect(suppressed(drivers)[0]?.data).toMatchObject({ count: 2, minimum: MIN, complementary: 1 });
    expect(attached(drivers)).not.toMatch(/Tiny|Middle/);
    texts(drivers);

    const shift = await answerSubQuestion(sq('growth_share_shift', { kind: 'growth', lens: 'distribution', window: summer }), ws);
    const s = typeOf(shift, 'growth_share_shift')[0]!;
    expect(s.others!.after).toBeCloseTo(tiny('2024-06-01', '2024-09-01'), 6);
    expect(s.others!.shareAfter!).toBeCloseTo(tiny('2024-06-01', '2024-09-01') / sumFare(where((r) => inWindow(r, '2024-06-01', '2024-09-01'))), 9);
    expect(s.segments.reduce((x, r) => x + r.shareAfter!, 0) + s.others!.shareAfter!).toBeCloseTo(1, 9);
    expect(attached(shift)).not.toMatch(/Tiny|Middle/);
    texts(shift);
  });

  it('performance_by_segment: tiny routes fold; a side of a segment below the minimum reads "too few to show"', async () => {
    const a = await answerSubQuestion(sq('performance_by_segment', { kind: 'performance', metrics: ['average_fare'], window: { start: '2024-01-01', end: '2025-01-01' } }), ws);
    const segs = typeOf(a, 'performance_segment');
    // Named segments come in the order of the metric asked (average fare over both groups, in JS).
    const meanFare = (route: string) => { const rs = where((r) => r.route === route && inWindow(r, '2024-01-01', '2025-01-01')); return sumFare(rs) / rs.length; };
    const byFare = ['North', 'South'].sort((x, y) => meanFare(y) - meanFare(x));
    expect(segs.filter((s) => !s.folded).map((s) => s.segment)).toEqual(byFare);
    const south = segs.find((s) => s.segment === 'South')!;
    expect(south).toMatchObject({ suppressedMembers: true, suppressedOthers: false, members: null, difference: null, pValue: null, nMembers: 0 });
    // The others' side is shown: the mean fare of South's other bookings in 2024, in JS.
    const southOthers = where((r) => r.route === 'South' && !r.pass && inWindow(r, '2024-01-01', '2025-01-01'));
    expect(south.others).toBeCloseTo(sumFare(southOthers) / southOthers.length, 9);
    // The SQL returned South's pass-holder row with every number withheld.
    const hidden = a.tables.segments!.rows.find((r) => r.tc_segment === 'South' && r.tc_member === true)!;
    expect(hidden.tc_suppressed).toBe(true);
    expect([hidden.tc_n, hidden.tc_mean, hidden.tc_value, hidden.tc_rows]).toEqual([null, null, null, null]);
    expect(a.caveats).toContainEqual({ code: 'suppressed_small_groups', data: { count: 2, minimum: MIN, dimension: 'route', complementary: 1 } });
    // The tiny routes hold only seven bookings in 2024, so Middle joins the fold; its other
    // customers' side is then large enough to show: the mean fare of those rows, in JS.
    const foldOthers = where((r) => folded(r) && !r.pass && inWindow(r, '2024-01-01', '2025-01-01'));
    expect(segs.find((s) => s.folded)!.others).toBeCloseTo(sumFare(foldOthers) / foldOthers.length, 9);
    expect(a.caveats).toContainEqual({ code: 'suppressed_small_groups', data: expect.objectContaining({ cells: true, count: 1, groups: 'Pass holders' }) });
    expect(texts(a)).toMatch(/too few to show/);
    // Complementary suppression (ESSnet Handbook on SDC): the groups' overall figures are shown
    // beside the segments, so on each side no single cell may be withheld alone.
    const rows = a.tables.segments!.rows;
    for (const side of [true, false]) {
      const hiddenOnSide = rows.filter((r) => r.tc_member === side && r.tc_suppressed === true);
      expect(hiddenOnSide.length === 0 || hiddenOnSide.length >= 2, `side ${side}: ${hiddenOnSide.length} withheld`).toBe(true);
    }
    // South's pass holders are the only small cell on their side (the fold has none), so the
    // smallest other pass-holder cell, North's, is withheld with it and said to be.
    const northMembers = rows.find((r) => r.tc_segment === 'North' && r.tc_member === true)!;
    expect(northMembers).toMatchObject({ tc_suppressed: true, tc_complement: true, tc_n: null, tc_value: null });
    expect(rows.find((r) => r.tc_segment === 'South' && r.tc_member === true)!.tc_complement).toBe(false);
    expect(segs.find((s) => s.segment === 'North')).toMatchObject({ suppressedMembers: true, members: null, difference: null });
    expect(a.caveats).toContainEqual({ code: 'suppressed_small_groups', data: { count: 1, minimum: MIN, groups: 'Pass holders', cells: true, dimension: 'route', complementary: 1 } });
    expect(texts(a)).toContain('1 more is withheld so that it cannot be worked out from the totals');
  });

  describe('a comparison group below the minimum (South only: three pass-holder bookings)', () => {
    const south = { filters: [{ dimension: 'route', values: ['South'] }], kind: 'performance' as const, window: { start: '2024-01-01', end: '2025-01-01' } };

    it('performance_compare: no numbers for the pass holders, no test, "too few to show"', async () => {
      const a = await answerSubQuestion(sq('performance_compare', { ...south, lens: 'summary', metrics: ['average_fare'] }), ws);
      const members = typeOf(a, 'performance_group').find((g) => g.group === 'members')!;
      expect(members).toMatchObject({ suppressed: true, n: 0, estimate: null, median: null, metricValue: null });
      expect(typeOf(a, 'performance_no_test')[0]).toMatchObject({ reason: 'suppressed', suppressedFirst: true, suppressedSecond: false, minimum: MIN });
      expect(typeOf(a, 'performance_verdict')).toEqual([]);
      expect(typeOf(a, 'performance_median_difference')).toEqual([]);
      const groupRow = a.tables.groups!.rows.find((r) => r.tc_member === true)!;
      expect(groupRow).toMatchObject({ tc_suppressed: true, tc_n: null, tc_mean: null, tc_median: null, tc_rows: null });
      // The bounded sample never draws the small group's single rows.
      expect(a.tables.sample!.rows.filter((r) => r.tc_member === true)).toEqual([]);
      expect(a.caveats).toContainEqual({ code: 'suppressed_small_groups', data: { count: 1, minimum: MIN, groups: 'Pass holders' } });
      expect(a.caveats.map((c) => c.code)).not.toContain('no_data');
      const t = texts(a);
      expect(t).toContain('too few to show');
      // None of the three fares (12, 13, 14) nor their mean appears in the attached tables.
      expect(attached(a)).not.toMatch(/(^|,)(12|13|14)(\.0+)?(,|$)/m);
      const others = where((r) => r.route === 'South' && !r.pass && inWindow(r, '2024-01-01', '2025-01-01'));
      expect(typeOf(a, 'performance_group').find((g) => g.group === 'others')!.estimate).toBeCloseTo(sumFare(others) / others.length, 9);
    });

    it('performance_frequency: three customers are too few to show', async () => {
      const a = await answerSubQuestion(sq('performance_frequency', { ...south, lens: 'distribution', metrics: ['bookings'] }), ws);
      expect(typeOf(a, 'performance_frequency_group').map((g) => g.group)).toEqual(['others']);
      expect(typeOf(a, 'performance_no_test')[0]).toMatchObject({ reason: 'suppressed', suppressedFirst: true });
      expect(typeOf(a, 'performance_frequency_ratio')).toEqual([]);
      expect(texts(a)).toContain('too few to show');
    });

    it('performance_before_after: the small months are blank and no pooled comparison is made', async () => {
      const a = await answerSubQuestion(sq('performance_before_after', { ...south, lens: 'time_pattern', metrics: ['average_fare'], window: { start: '2023-01-01', end: '2025-01-01' } }), ws);
      const members = typeOf(a, 'performance_group_series').find((s) => s.group === 'members')!;
      expect(members.points.every((p) => p.value === null)).toBe(true);
      expect(typeOf(a, 'performance_did_not_applicable')[0]?.reason).toBe('suppressed');
      expect(typeOf(a, 'performance_difference')).toEqual([]);
      expect(suppressed(a)[0]?.data).toMatchObject({ count: 3, periods: true, groups: 'Pass holders', minimum: MIN });
      expect(caveatNote(suppressed(a)[0]!, 'en-IE')).toBe('3 periods of Pass holders had fewer than 10 rows (the minimum group size): too few to show, so they are left blank.');
      expect(texts(a)).toContain('too few to show');
    });

    it('with suppression off the same comparison shows the three bookings (the control)', async () => {
      const a = await answerSubQuestion(sq('performance_compare', { ...south, lens: 'summary', metrics: ['average_fare'] }), off);
      expect(typeOf(a, 'performance_group').find((g) => g.group === 'members')).toMatchObject({ n: 3, estimate: 13 });
    });
  });
});

describe('small-group suppression on the demo data (200k rows)', () => {
  let demo: Workspace;
  let routeRows: Map<string, number>;
  let routeRevenue: Map<string, number>;
  const month = { start: '2024-01-01', end: '2024-02-01' };

  beforeAll(async () => {
    const fixture = await demoFixture();
    // Independent: rows and revenue per route in January 2024, by a plain reduction over the raw rows.
    const db = await DuckDBInstance.create(fixture.databasePath, { access_mode: 'READ_ONLY' });
    const con = await db.connect();
    const reader = await con.runAndReadAll('SELECT CAST(sail_date AS VARCHAR), route, CAST(fare_total AS VARCHAR) FROM bookings');
    routeRows = new Map();
    routeRevenue = new Map();
    for (const [d, route, fare] of reader.getRows() as [string, string, string][]) {
      if (d < month.start || d >= month.end) continue;
      routeRows.set(route, (routeRows.get(route) ?? 0) + 1);
      routeRevenue.set(route, (routeRevenue.get(route) ?? 0) + Number(fare));
    }
    con.closeSync();
    db.closeSync();
    // A minimum just above the smallest route's rows in that month: that route, and only it, is folded.
    const counts = [...routeRows.values()].sort((a, b) => a - b);
    expect(counts[0]! + 1).toBeLessThanOrEqual(counts[1]!);
    const config = loadConfig(fixture.configPath);
    const base = await openWorkspace(config);
    const dataset = { ...base.dataset, min_group_size: counts[0]! + 1 };
    demo = { ...base, dataset, context: { ...base.context, dataset } };
  });
  afterAll(async () => {
    await demo?.source.close();
  });

  // The smallest route alone in "All others" would be the total minus the named routes, so the
  // next-smallest route joins it (complementary suppression).
  const bySize = () => [...routeRows.entries()].sort((a, b) => a[1] - b[1] || (a[0] < b[0] ? -1 : 1)).map(([route]) => route);

  it('segment_shares folds the smallest route with the next-smallest; named routes and the fold match the raw rows and add up to the total', async () => {
    const [smallest, complement] = bySize() as [string, string];
    const a = await answerSubQuestion(sq('segment_shares', { lens: 'distribution', window: month, comparisonGroup: undefined } as Partial<SubQuestion>), demo);
    const f = typeOf(a, 'segment_shares')[0]!;
    expect(f.rows.map((r) => r.segment)).not.toContain(smallest);
    expect(f.rows.map((r) => r.segment)).not.toContain(complement);
    const fold = f.rows.find((r) => r.other)!;
    expect(fold.members).toBe(2);
    expect(fold.value).toBeCloseTo(routeRevenue.get(smallest)! + routeRevenue.get(complement)!, 2);
    for (const r of f.rows.filter((x) => !x.other)) expect(r.value).toBeCloseTo(routeRevenue.get(r.segment!)!, 2);
    const total = [...routeRevenue.values()].reduce((x, y) => x + y, 0);
    expect(f.rows.reduce((x, r) => x + (r.value ?? 0), 0)).toBeCloseTo(total, 2);
    expect(suppressed(a)[0]?.data).toMatchObject({ count: 1, complementary: 1 });
    texts(a, demo);
  });

  it('growth_drivers folds the same two routes on both sides and its parts add up', async () => {
    const [smallest, complement] = bySize() as [string, string];
    const a = await answerSubQuestion(sq('growth_drivers', { kind: 'growth', window: month }), demo);
    const d = typeOf(a, 'growth_drivers')[0]!;
    expect(d.segments.map((s) => s.segment)).not.toContain(smallest);
    expect(d.segments.map((s) => s.segment)).not.toContain(complement);
    expect(d.others).toMatchObject({ count: 2 });
    expect(d.others!.after).toBeCloseTo(routeRevenue.get(smallest)! + routeRevenue.get(complement)!, 2);
    expect(d.segments.reduce((x, s) => x + s.after!, 0) + d.others!.after!).toBeCloseTo(d.total.after!, 2);
    texts(a, demo);
  });
});

/** Equal up to floating-point summation order (the engines add rows in different orders): 1e-9 relative. */
function expectSame(a: unknown, b: unknown, path = ''): void {
  if (typeof a === 'number' && typeof b === 'number') {
    expect(Math.abs(a - b) <= Math.max(1e-12, 1e-9 * Math.max(Math.abs(a), Math.abs(b))), `${path}: ${a} vs ${b}`).toBe(true);
    return;
  }
  if (a && b && typeof a === 'object' && typeof b === 'object') {
    expect(Object.keys(a).sort(), path).toEqual(Object.keys(b).sort());
    for (const k of Object.keys(a)) expectSame((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}.${k}`);
    return;
  }
  expect(a, path).toEqual(b);
}

// The suppression SQL is written once for both engines: with a minimum large enough to fold routes
// and withhold pass-holder cells, PostgreSQL must give the same tables, findings and caveats.
describeWithPostgres('small-group suppression agrees on DuckDB and PostgreSQL', (adminUrl) => {
  const schema = uniqueName('tc_small');
  const urlEnv = 'TC_SMALL_GROUPS_URL';
  let duck: Workspace;
  let post: Workspace;
  let role: string | undefined;
  const quarter = { start: '2024-01-01', end: '2024-04-01' };

  beforeAll(async () => {
    const fixture = await demoFixture();
    await copyDuckDbTableToPostgres({ duckdbPath: fixture.databasePath, table: 'bookings', url: adminUrl, schema });
    const reader = await createReaderRole(adminUrl, schema);
    role = reader.role;
    const config = loadConfig(fixture.configPath);
    const strict = { ...config, datasets: config.datasets.map((d) => ({ ...d, min_group_size: 2000 })) };
    duck = await openWorkspace(strict);
    post = await openWorkspace(onPostgres(strict, urlEnv, schema), undefined, { [urlEnv]: reader.url });
  }, 180_000);
  afterAll(async () => {
    await duck?.source.close();
    await post?.source.close();
    await dropSchema(adminUrl, schema, role ? [role] : []);
  });

  const cases: Partial<SubQuestion>[] = [
    { template: 'segment_shares', lens: 'distribution', window: quarter },
    { template: 'segment_trend', lens: 'time_pattern', window: quarter },
    { template: 'kpi_by_segment', kind: 'kpi', window: quarter },
    { template: 'kpi_mix', kind: 'kpi', lens: 'distribution', window: quarter },
    { template: 'growth_drivers', kind: 'growth', window: quarter },
    { template: 'growth_share_shift', kind: 'growth', lens: 'distribution', window: quarter },
    { template: 'performance_by_segment', kind: 'performance', metrics: ['average_fare'], window: quarter, comparisonGroup: 'skerrypass' },
    { template: 'performance_compare', kind: 'performance', lens: 'summary', metrics: ['average_fare'], window: quarter, comparisonGroup: 'skerrypass', filters: [{ dimension: 'route', values: ['Tern Holm–Saltreach'] }] },
  ];
  for (const c of cases) {
    it(`${c.template}${c.filters ? ' (one route)' : ''}`, async () => {
      const q = sq(c.template!, c);
      const [d, p] = await Promise.all([answerSubQuestion(q, duck), answerSubQuestion(q, post)]);
      expect(d.caveats.some((x) => x.code === 'suppressed_small_groups'), 'something is suppressed').toBe(true);
      for (const name of Object.keys(d.tables)) {
        const key = (r: Record<string, unknown>) => JSON.stringify(Object.entries(r).filter(([, v]) => typeof v !== 'number'));
        const sort = (rows: Record<string, unknown>[]) => [...rows].sort((x, y) => (key(x) < key(y) ? -1 : key(x) > key(y) ? 1 : 0));
        expectSame(sort(d.tables[name]!.rows), sort(p.tables[name]!.rows), name);
      }
      expectSame(d.findings, p.findings, 'findings');
      expectSame(d.caveats, p.caveats, 'caveats');
    }, 60_000);
  }
});
