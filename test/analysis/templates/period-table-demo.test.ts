// The period table on the generated Skerrywake demo (invented data) in a real DuckDB. Every number
// is checked twice outside the template: against a plain JS reduction over the raw rows read back
// from the file, and against a spreadsheet-style computation of the same rows with arquero (a
// group-by per month, a lag for the month before, and a month × year pivot for the year earlier).
import { DuckDBInstance } from '@duckdb/node-api';
import * as aq from 'arquero';
import { getISOWeek, getISOWeekYear, setISOWeek, startOfISOWeek } from 'date-fns';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { PeriodTableFinding, TableLatestFinding, TableQuotientFinding } from '../../../analysis/findings/table.js';
import { addDays, addMonths, nextPeriod } from '../../../analysis/periods.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { Answer, Grain, SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { loadConfig } from '../../../config/load.js';
import { demoFixture } from '../../helpers/demo-fixture.js';

const { op } = aq;

interface RawRow {
  day: string;
  /** fare_total in cents: DECIMAL(10,2) summed as integers is exact, like the database's decimal sum. */
  cents: number | null;
  refunded: boolean;
  customer: string;
}

let ws: Workspace;
let raw: RawRow[];

beforeAll(async () => {
  const demo = await demoFixture();
  ws = await openWorkspace(loadConfig(demo.configPath));
  const inst = await DuckDBInstance.create(demo.databasePath, { access_mode: 'READ_ONLY' });
  const con = await inst.connect();
  const reader = await con.runAndReadAll('SELECT sail_date, fare_total, refunded, customer_id FROM bookings');
  raw = reader.getRowsJson().map((r) => ({
    day: String(r[0]).slice(0, 10),
    cents: r[1] === null ? null : Math.round(Number(r[1]) * 100),
    refunded: r[2] === true,
    customer: String(r[3]),
  }));
  con.closeSync();
  inst.closeSync();
});

afterAll(async () => {
  await ws?.source.close();
});

// ---- the plain reduction ----------------------------------------------------------------------
interface Totals {
  revenue: number;
  bookings: number;
  average_fare: number;
  refund_rate: number;
  customers: number;
}

function reduce(start: string, end: string): Totals {
  let cents = 0;
  let fares = 0;
  let bookings = 0;
  let refunded = 0;
  const customers = new Set<string>();
  for (const r of raw) {
    if (r.day < start || r.day >= end) continue;
    bookings++;
    if (r.cents !== null) {
      cents += r.cents;
      fares++;
    }
    if (r.refunded) refunded++;
    customers.add(r.customer);
  }
  return { revenue: cents / 100, bookings, average_fare: cents / 100 / fares, refund_rate: refunded / bookings, customers: customers.size };
}

const METRICS = ['revenue', 'bookings', 'average_fare', 'refund_rate', 'customers'] as const;
const MONTHLY: SubQuestion = {
  id: 'table-demo',
  kind: 'growth',
  lens: 'time_pattern',
  template: 'period_table',
  metrics: [...METRICS],
  grain: 'month',
  window: { start: '2023-01-01', end: '2025-07-01' },
  filters: [],
};

const tableOf = (a: Answer) => a.findings.find((f): f is PeriodTableFinding => f.type === 'period_table')!;
const close = (actual: number | null, expected: number, rel = 1e-9) => {
  expect(actual).not.toBeNull();
  expect(Math.abs(actual! - expected)).toBeLessThanOrEqual(rel * Math.max(1, Math.abs(expected)));
};
/** Refund rate is a rate: its changes are in points; the others' are relative. */
const changeOf = (m: (typeof METRICS)[number], base: number, value: number) => (m === 'refund_rate' ? value - base : value / base - 1);

describe('monthly table of five metrics, January 2023 to June 2025', () => {
  let answer: Answer;
  let table: PeriodTableFinding;
  beforeAll(async () => {
    answer = await answerSubQuestion(MONTHLY, ws);
    table = tableOf(answer);
  });

  it('has one row per month of the window, the data’s last month (1–18 June 2025) marked partial', () => {
    expect(table.rows.map((r) => r.period)).toEqual(Array.from({ length: 30 }, (_, i) => addMonths('2023-01-01', i)));
    expect(table.rows.filter((r) => r.partial).map((r) => r.period)).toEqual(['2025-06-01']);
    expect(answer.caveats.find((c) => c.code === 'partial_period')?.data).toMatchObject({ period: '2025-06-01', coveredTo: '2025-06-18' });
  });

  it('matches a plain reduction over the raw rows: values, changes on the month before and on a year earlier', () => {
    for (const row of table.rows) {
      const at = reduce(row.period, nextPeriod(row.period, 'month'));
      const before = reduce(addMonths(row.period, -1), row.period);
      const yearAgo = reduce(addMonths(row.period, -12), addMonths(row.period, -11));
      METRICS.forEach((m, k) => {
        const cell = row.cells[k]!;
        close(cell.value, at[m]);
        if (row.partial) {
          // Half a month against a whole one says nothing: no change is given, and it is never ranked.
          expect([cell.vsPrevious, cell.vsYearEarlier, cell.mark]).toEqual([null, null, null]);
          return;
        }
        // January 2023's bases are December 2022 and January 2022, before the window: the look-back reads them.
        close(cell.vsPrevious, changeOf(m, before[m], at[m]));
        close(cell.vsYearEarlier, changeOf(m, yearAgo[m], at[m]));
      });
    }
    expect(table.columns.map((c) => c.basis)).toEqual(['percent', 'percent', 'percent', 'points', 'percent']);
  });

  it('matches a spreadsheet-style computation of the same rows with arquero (group-by, lag, month × year pivot)', () => {
    const rows = aq
      .from(raw.filter((r) => r.day >= '2022-01-01' && r.day < '2025-07-01'))
      .derive({ month: (d: RawRow) => op.substring(d.day, 0, 7) })
      .groupby('month')
      .rollup({
        cents: (d: RawRow) => op.sum(d.cents),
        fares: (d: RawRow) => op.valid(d.cents),
        bookings: () => op.count(),
        refunded: (d: RawRow) => op.sum(d.refunded ? 1 : 0),
        customers: (d: RawRow) => op.distinct(d.customer),
      })
      .derive({ revenue: (d: { cents: number }) => d.cents / 100, average_fare: (d: { cents: number; fares: number }) => d.cents / 100 / d.fares, refund_rate: (d: { refunded: number; bookings: number }) => d.refunded / d.bookings })
      .orderby('month')
      // The month before, as a spreadsheet's previous row: the demo has every month, so one row back is one month back.
      .derive({ revenue_prev: (d: { revenue: number }) => op.lag(d.revenue, 1), bookings_prev: (d: { bookings: number }) => op.lag(d.bookings, 1) });
    const byMonth = new Map(rows.objects().map((o) => [String((o as { month: string }).month), o as Record<string, number>]));
    // Month-of-year down the side, years across: the same cells a manager's pivot table holds.
    const pivot = rows
      .derive({ moy: (d: { month: string }) => op.substring(d.month, 5, 7), year: (d: { month: string }) => op.substring(d.month, 0, 4) })
      .groupby('moy')
      .pivot('year', { revenue: (d: { revenue: number }) => op.sum(d.revenue), fare: (d: { average_fare: number }) => op.sum(d.average_fare) });
    const pivotRows = new Map(pivot.objects().map((o) => [String((o as { moy: string }).moy), o as Record<string, number>]));
    for (const row of table.rows.filter((r) => !r.partial)) {
      const key = row.period.slice(0, 7);
      const year = Number(key.slice(0, 4));
      const o = byMonth.get(key)!;
      close(row.cells[0]!.value, o.revenue!);
      close(row.cells[1]!.value, o.bookings!);
      close(row.cells[2]!.value, o.average_fare!);
      close(row.cells[3]!.value, o.refund_rate!);
      expect(row.cells[4]!.value).toBe(o.customers);
      close(row.cells[0]!.vsPrevious, o.revenue! / o.revenue_prev! - 1);
      close(row.cells[1]!.vsPrevious, o.bookings! / o.bookings_prev! - 1);
      const p = pivotRows.get(key.slice(5, 7))!;
      close(row.cells[0]!.vsYearEarlier, p[`revenue_${year}`]! / p[`revenue_${year - 1}`]! - 1);
      close(row.cells[2]!.vsYearEarlier, p[`fare_${year}`]! / p[`fare_${year - 1}`]! - 1);
    }
  });

  it('marks each metric’s best and worst complete month, by its good direction, and only those', () => {
    table.columns.forEach((col, k) => {
      const complete = table.rows.filter((r) => !r.partial).map((r) => ({ period: r.period, value: reduce(r.period, nextPeriod(r.period, 'month'))[METRICS[k]!] }));
      const max = complete.reduce((a, b) => (b.value > a.value ? b : a));
      const min = complete.reduce((a, b) => (b.value < a.value ? b : a));
      const [best, worst] = col.higherIsBetter ? [max, min] : [min, max];
      expect(table.rows.filter((r) => r.cells[k]!.mark === 'best').map((r) => r.period)).toEqual([best.period]);
      expect(table.rows.filter((r) => r.cells[k]!.mark === 'worst').map((r) => r.period)).toEqual([worst.period]);
      expect(col.high!.period).toBe(max.period);
      expect(col.low!.period).toBe(min.period);
    });
    // The refund rate's worst month is the storm of January 2024 (planted in the demo), lower being better.
    expect(table.rows.find((r) => r.cells[3]!.mark === 'worst')!.period).toBe('2024-01-01');
  });

  it('gives a totals row as each metric’s kind calls for: sums for flows, the metric over the whole window otherwise', () => {
    const whole = reduce('2023-01-01', '2025-07-01');
    expect(table.columns.map((c) => c.total.rule)).toEqual(['sum', 'sum', 'overall', 'overall', 'overall']);
    METRICS.forEach((m, k) => close(table.columns[k]!.total.value, whole[m]));
    // A flow's total is the sum of its rows (the partial month included), never a mean of rates.
    close(table.columns[0]!.total.value, table.rows.reduce((a, r) => a + r.cells[0]!.value!, 0));
    expect(table.columns[4]!.total.value).toBeLessThan(table.rows.reduce((a, r) => a + r.cells[4]!.value!, 0));
  });

  it('finds that the average fare is revenue over bookings, and the latest complete month against a year earlier', () => {
    const q = answer.findings.filter((f): f is TableQuotientFinding => f.type === 'table_quotient');
    expect(q.map((f) => [f.ratio, f.numerator, f.denominator])).toEqual([['average_fare', 'revenue', 'bookings']]);
    const latest = answer.findings.find((f): f is TableLatestFinding => f.type === 'table_latest')!;
    expect(latest).toMatchObject({ period: '2025-05-01', against: 'year_earlier', base: '2024-05-01' });
    const may = reduce('2025-05-01', '2025-06-01');
    const before = reduce('2024-05-01', '2024-06-01');
    latest.changes.forEach((c) => close(c.change, changeOf(c.metric as (typeof METRICS)[number], before[c.metric as (typeof METRICS)[number]], may[c.metric as (typeof METRICS)[number]])));
  });

  it('presents three pages (12, 12 and 6 months), a CSV of the table as shown and a takeaway that leads the summary', () => {
    const p = SUB_QUESTIONS.period_table.present(answer, { dataset: ws.dataset, locale: 'en-IE', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
    const pages = [p.chart!, ...(p.moreCharts ?? [])];
    expect(pages.map((s) => (s.kind === 'period_table' ? s.rows.filter((r) => r.kind !== 'total').length : -1))).toEqual([12, 12, 6]);
    expect(pages.map((s) => (s.kind === 'period_table' ? s.rows.some((r) => r.kind === 'total') : null))).toEqual([false, false, true]);
    // The partial month says how far it goes on the image itself, which may be forwarded alone.
    const last = pages[2]!;
    expect(last.kind === 'period_table' && last.rows.find((r) => r.kind === 'partial')).toMatchObject({ label: 'Jun 2025', note: 'partial, to 18 Jun' });
    expect(p.takeaway).toMatchObject({ leads: true });
    const peak = table.columns[0]!.high!;
    expect(peak.period).toBe('2024-07-01');
    // Every number in it is checked against the reduction in the tests above (peak, May 2025 against May 2024).
    expect(p.takeaway!.text).toBe(
      'Revenue peaked in July 2024 at €318K on 8.31K bookings and 7.75K customers; in May 2025, against a year earlier, bookings fell faster than revenue (−5.1% against −1.7%), so the average fare per booking rose 3.6%, while the refund rate fell 0.3 pts and customers fell 4.7%.',
    );
    const may = reduce('2025-05-01', '2025-06-01');
    const may24 = reduce('2024-05-01', '2024-06-01');
    expect((100 * (may.bookings / may24.bookings - 1)).toFixed(1)).toBe('-5.1');
    expect((100 * (may.average_fare / may24.average_fare - 1)).toFixed(1)).toBe('3.6');
    // The CSV read back with arquero's own parser holds the finding's numbers, in percent for relative changes and points for the rate.
    const csv = aq.fromCSV(p.csv!, { parse: { period: String } }).objects() as Record<string, unknown>[];
    expect(csv.map((r) => r.period)).toEqual([...table.rows.map((r) => r.period), 'total']);
    table.rows.forEach((r, i) => {
      close(csv[i]!.revenue as number, r.cells[0]!.value!);
      if (r.cells[0]!.vsYearEarlier !== null) close(csv[i]!.revenue_vs_year_earlier_pct as number, r.cells[0]!.vsYearEarlier * 100, 1e-9);
      if (r.cells[3]!.vsPrevious !== null) close(csv[i]!.refund_rate_vs_previous_pts as number, r.cells[3]!.vsPrevious * 100, 1e-9);
      expect(csv[i]!.revenue_mark ?? null).toBe(r.cells[0]!.mark);
    });
    // Each monospace variant has every month, the partial one marked, and the totals row.
    for (const block of p.textBlocks!) {
      expect(block).toMatch(/^Jun 2025~/m);
      expect(block).toMatch(/^Whole period/m);
      expect(block.split('\n').filter((l) => /^[A-Z][a-z]{2,3} 20\d\d/.test(l))).toHaveLength(30);
    }
  });
});

describe('other grains and windows', () => {
  const ask = (grain: Grain, window: { start: string; end: string }, metrics = ['bookings', 'revenue']) =>
    answerSubQuestion({ ...MONTHLY, id: `t-${grain}`, grain, window, metrics }, ws).then(tableOf);

  it('weeks: a year earlier is the same ISO 8601 week number (checked with date-fns), a week before is seven days back', async () => {
    const table = await ask('week', { start: '2024-06-03', end: '2024-09-02' });
    expect(table.yearEarlier).toBe('iso_week');
    expect(table.rows).toHaveLength(13);
    for (const row of table.rows) {
      const d = new Date(`${row.period}T00:00:00Z`);
      const base = startOfISOWeek(setISOWeek(new Date(Date.UTC(getISOWeekYear(d) - 1, 0, 4)), getISOWeek(d)));
      const baseIso = `${base.getFullYear()}-${String(base.getMonth() + 1).padStart(2, '0')}-${String(base.getDate()).padStart(2, '0')}`;
      const at = reduce(row.period, addDays(row.period, 7));
      close(row.cells[0]!.vsYearEarlier, at.bookings / reduce(baseIso, addDays(baseIso, 7)).bookings - 1);
      close(row.cells[1]!.vsPrevious, at.revenue / reduce(addDays(row.period, -7), row.period).revenue - 1);
    }
  });

  it('days: a year earlier is 52 weeks back, the same weekday', async () => {
    const table = await ask('day', { start: '2024-07-01', end: '2024-07-15' });
    expect(table.yearEarlier).toBe('weeks_52');
    for (const row of table.rows) {
      const base = addDays(row.period, -364);
      expect(new Date(`${base}T00:00:00Z`).getUTCDay()).toBe(new Date(`${row.period}T00:00:00Z`).getUTCDay());
      close(row.cells[0]!.vsYearEarlier, reduce(row.period, addDays(row.period, 1)).bookings / reduce(base, addDays(base, 1)).bookings - 1);
    }
  });

  it('a window starting mid-month keeps that month to the window’s days, marked partial and not ranked', async () => {
    const table = await ask('month', { start: '2024-03-15', end: '2024-07-01' });
    expect(table.rows.map((r) => [r.period, r.partial])).toEqual([
      ['2024-03-01', true],
      ['2024-04-01', false],
      ['2024-05-01', false],
      ['2024-06-01', false],
    ]);
    close(table.rows[0]!.cells[0]!.value, reduce('2024-03-15', '2024-04-01').bookings);
    // April's month before is the whole of March (the look-back), not the window's half of it.
    close(table.rows[1]!.cells[0]!.vsPrevious, reduce('2024-04-01', '2024-05-01').bookings / reduce('2024-03-01', '2024-04-01').bookings - 1);
    close(table.columns[0]!.total.value, reduce('2024-03-15', '2024-07-01').bookings);
  });

  it('years at the start of the data: no base before the data, so no change, and no look-back rows shown', async () => {
    const table = await ask('year', { start: '2022-01-01', end: '2025-01-01' });
    expect(table.rows.map((r) => r.period)).toEqual(['2022-01-01', '2023-01-01', '2024-01-01']);
    expect(table.rows[0]!.cells[0]!).toMatchObject({ vsPrevious: null, vsYearEarlier: null });
    close(table.rows[1]!.cells[0]!.vsYearEarlier, reduce('2023-01-01', '2024-01-01').bookings / reduce('2022-01-01', '2023-01-01').bookings - 1);
  });
});
