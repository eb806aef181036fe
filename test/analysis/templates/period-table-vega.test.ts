// The period table on a dataset the project was not built around: vega-datasets' daily weather
// for Seattle and New York (2012–2015, weather.csv), with a config written here. A brief naming two
// metrics by month plans the table first; its numbers are checked against a spreadsheet-style
// computation of the same CSV done with arquero alone (its own CSV parser, a group-by per month, a
// lag for the month before and a month × year pivot for the year earlier), never through DuckDB.
import * as aq from 'arquero';
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { renderChart } from '../../../analysis/charts/render.js';
import type { PeriodTableFinding } from '../../../analysis/findings/table.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { Answer, SubQuestion } from '../../../analysis/types.js';
import type { Brief } from '../../../bot/brief.js';
import { buildPlan } from '../../../bot/plan.js';
import { memoryWorkspace } from './trend-memory-db.js';
import { vegaDataFile } from '../../helpers/open-data.js';

const { op } = aq;
const CSV = vegaDataFile('weather.csv');

const CONFIG = `
version: 1
datasets:
  - name: weather
    label: Daily weather, Seattle and New York (vega-datasets)
    source: { kind: duckdb, path: unused.duckdb }
    table: weather
    time_column: date
    timezone: UTC
    metrics:
      - name: precipitation
        label: Precipitation
        definition: { type: sum, column: precipitation }
        unit: number
        decimals: 1
        higher_is_better: false
      - name: rain_days
        label: Rainy days
        definition: { type: count, where: { column: weather, op: eq, value: rain } }
        unit: count
        higher_is_better: false
      - name: temp_max
        label: Daily maximum temperature
        definition: { type: average, column: temp_max }
        unit: number
        decimals: 1
        higher_is_better: true
        kind: level
      - name: wind
        label: Mean wind speed
        definition: { type: average, column: wind }
        unit: number
        decimals: 2
        higher_is_better: false
    dimensions:
      - { name: location, column: location, label: City }
      - { name: weather, column: weather, label: Weather }
`;

interface Day {
  location: string;
  date: string;
  precipitation: number;
  temp_max: number;
  wind: number;
  weather: string;
}

let ws: Awaited<ReturnType<typeof memoryWorkspace>>;
let days: aq.ColumnTable;

beforeAll(async () => {
  ws = await memoryWorkspace([`CREATE TABLE weather AS SELECT * FROM read_csv('${CSV.replaceAll("'", "''")}', header = true)`], CONFIG);
  days = aq.fromCSV(readFileSync(CSV, 'utf8'), { parse: { date: String } });
});
afterAll(async () => {
  await ws?.source.close();
});

/** The spreadsheet: one row per month (and city, when asked), the month before by lag, the year earlier from a month × year pivot. */
function spreadsheet(where: (d: Day) => boolean) {
  const rows = days
    .filter(aq.escape(where))
    .derive({ month: (d: Day) => op.substring(d.date, 0, 7) })
    .groupby('month')
    .rollup({
      precipitation: (d: Day) => op.sum(d.precipitation),
      rain_days: (d: Day) => op.sum(d.weather === 'rain' ? 1 : 0),
      wind: (d: Day) => op.mean(d.wind),
    })
    .orderby('month')
    .derive({ precipitation_prev: (d: { precipitation: number }) => op.lag(d.precipitation, 1), rain_days_prev: (d: { rain_days: number }) => op.lag(d.rain_days, 1) });
  const pivot = rows
    .derive({ moy: (d: { month: string }) => op.substring(d.month, 5, 7), year: (d: { month: string }) => op.substring(d.month, 0, 4) })
    .groupby('moy')
    .pivot('year', { p: (d: { precipitation: number }) => op.sum(d.precipitation), r: (d: { rain_days: number }) => op.sum(d.rain_days) });
  return {
    byMonth: new Map(rows.objects().map((o) => [String((o as { month: string }).month), o as Record<string, number>])),
    byMoy: new Map(pivot.objects().map((o) => [String((o as { moy: string }).moy), o as Record<string, number>])),
  };
}

const close = (actual: number | null, expected: number) => {
  expect(actual).not.toBeNull();
  expect(Math.abs(actual! - expected)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(expected)));
};
/** A relative change, or null where the spreadsheet would divide by zero (the table gives no rate on a zero base). */
const rel = (base: number, value: number) => (base > 0 ? value / base - 1 : null);

const brief: Brief = {
  requestText: 'precipitation and rainy days by month for 2013 to 2015',
  questions: [{ text: 'precipitation and rainy days by month for 2013 to 2015', kind: 'trend', metrics: ['precipitation', 'rain_days'], dimensions: [], filters: [], frequency: false }],
  kinds: ['trend'],
  metrics: ['precipitation', 'rain_days'],
  dimensions: [],
  unknownTerms: [],
  grain: 'month',
  window: { start: '2013-01-01', end: '2016-01-01' },
  audience: 'managers',
};

function check(answer: Answer, where: (d: Day) => boolean) {
  const table = answer.findings.find((f): f is PeriodTableFinding => f.type === 'period_table')!;
  const { byMonth, byMoy } = spreadsheet(where);
  expect(table.rows).toHaveLength(36);
  expect(table.rows.some((r) => r.partial)).toBe(false);
  let compared = 0;
  for (const row of table.rows) {
    const key = row.period.slice(0, 7);
    const year = Number(key.slice(0, 4));
    const o = byMonth.get(key)!;
    const p = byMoy.get(key.slice(5, 7))!;
    close(row.cells[0]!.value, o.precipitation!);
    close(row.cells[1]!.value, o.rain_days!);
    const expectations: [number | null, number | null][] = [
      [row.cells[0]!.vsPrevious, rel(o.precipitation_prev!, o.precipitation!)],
      [row.cells[1]!.vsPrevious, rel(o.rain_days_prev!, o.rain_days!)],
      [row.cells[0]!.vsYearEarlier, rel(p[`p_${year - 1}`]!, p[`p_${year}`]!)],
      [row.cells[1]!.vsYearEarlier, rel(p[`r_${year - 1}`]!, p[`r_${year}`]!)],
    ];
    for (const [actual, expected] of expectations) {
      if (expected === null) expect(actual).toBeNull();
      else {
        close(actual, expected);
        compared++;
      }
    }
  }
  expect(compared).toBeGreaterThan(100);
  // Best and worst: fewer wet days and less rain are better here (higher_is_better: false).
  const months = [...byMonth.entries()].filter(([k]) => k >= '2013' && k < '2016');
  const driest = months.reduce((a, b) => (b[1].precipitation! < a[1].precipitation! ? b : a))[0];
  expect(table.rows.find((r) => r.cells[0]!.mark === 'best')!.period.slice(0, 7)).toBe(driest);
  close(table.columns[0]!.total.value, months.reduce((a, [, o]) => a + o.precipitation!, 0));
  return table;
}

describe('a brief naming two metrics by month, on vega-datasets weather', () => {
  it('plans the period table first, with both metrics and the brief’s window', () => {
    const plan = buildPlan(brief, ws.dataset, ws.coverage);
    expect(plan.items[0]).toMatchObject({ id: 'q1', template: 'period_table', metrics: ['precipitation', 'rain_days'], grain: 'month', window: brief.window });
  });

  it('answers it with the numbers a spreadsheet of the same CSV gives, both cities together', async () => {
    const sq = buildPlan(brief, ws.dataset, ws.coverage).items[0]!;
    check(await answerSubQuestion(sq, ws), () => true);
  });

  it('and for one city, through a bound filter', async () => {
    const sq: SubQuestion = { ...buildPlan(brief, ws.dataset, ws.coverage).items[0]!, filters: [{ dimension: 'location', values: ['New York'] }] };
    const answer = await answerSubQuestion(sq, ws);
    check(answer, (d) => d.location === 'New York');
    const p = SUB_QUESTIONS.period_table.present(answer, { dataset: ws.dataset, locale: 'en-GB', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
    const pages = [p.chart!, ...(p.moreCharts ?? [])];
    expect(pages).toHaveLength(3);
    // The takeaway keeps its scope beside it; the summary says it once for lines that share it.
    expect(p.takeaway!.scope).toBe('city: New York');
    expect(p.caption).toMatch(/^Filtered to city: New York\. /);
    expect(p.takeaway!.text).toMatch(/^Precipitation peaked in \w+ 20\d\d at [\d.,]+ on \d+ rainy days; in December 2015, against a year earlier, /);
    expect(pages[0]!.subtitle).toMatch(/City: New York/);
    const png = await renderChart(pages[2]!);
    expect(png.subarray(1, 4).toString('ascii')).toBe('PNG');
  });

  it('states a level’s changes in its own units and its totals row as the mean of its months', async () => {
    const sq: SubQuestion = { ...buildPlan(brief, ws.dataset, ws.coverage).items[0]!, metrics: ['temp_max', 'precipitation'], filters: [{ dimension: 'location', values: ['Seattle'] }] };
    const table = (await answerSubQuestion(sq, ws)).findings.find((f): f is PeriodTableFinding => f.type === 'period_table')!;
    expect(table.columns.map((c) => [c.kind, c.basis, c.total.rule])).toEqual([
      ['level', 'units', 'mean'],
      ['flow', 'percent', 'sum'],
    ]);
    const monthly = days
      .filter((d: Day) => d.location === 'Seattle')
      .derive({ month: (d: Day) => op.substring(d.date, 0, 7) })
      .groupby('month')
      .rollup({ t: (d: Day) => op.mean(d.temp_max) })
      .objects() as { month: string; t: number }[];
    const t = new Map(monthly.map((o) => [o.month, o.t]));
    for (const row of table.rows) {
      const key = row.period.slice(0, 7);
      const yearAgo = `${Number(key.slice(0, 4)) - 1}${key.slice(4)}`;
      close(row.cells[0]!.value, t.get(key)!);
      // A temperature a year earlier is compared as a difference in degrees, never as a percent of its base.
      close(row.cells[0]!.vsYearEarlier, t.get(key)! - t.get(yearAgo)!);
    }
    const inWindow = monthly.filter((o) => o.month >= '2013' && o.month < '2016');
    close(table.columns[0]!.total.value, inWindow.reduce((a, o) => a + o.t, 0) / inWindow.length);
  });
});
