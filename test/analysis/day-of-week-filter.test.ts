// A day-of-week filter reaches the SQL of the sub-questions and keeps only the rows of those days
// of the week (the time column's local date, ISO 1 = Monday ... 7 = Sunday). Checked on two open
// datasets of vega-datasets: seattle-weather.csv (NOAA daily weather in Seattle, 2012-2015), with
// the expected numbers from the CSV read in plain JavaScript (the weekday from Date.getUTCDay, not
// from SQL), on DuckDB (the file) and PostgreSQL (a table loaded from it), straight from the table
// and through the day-level rollup; and flights-3m.parquet (US flights, January to June 2001) on
// DuckDB, with the expected numbers from the test's own SQL over the file (dayname(), not ISODOW).
import { describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import { dayFilter, WEEKEND } from '../../analysis/day-of-week.js';
import { openRunScope } from '../../analysis/run-scope.js';
import type { SubQuestion } from '../../analysis/types.js';
import type { Workspace } from '../../analysis/workspace.js';
import { parseConfigText } from '../../config/load.js';
import { flightsParquetConfigText, vegaDataFile } from '../helpers/open-data.js';
import { seriesPoints, useFileWorkspace } from '../helpers/workspace-checks.js';
import { describeOnSeattleWeather, loadSeattleWeather } from './stats/seattle-weather.js';

const WINDOW = { start: '2012-01-01', end: '2016-01-01' };
const isoDay = (date: string) => ((new Date(`${date}T00:00:00Z`).getUTCDay() + 6) % 7) + 1;

/** Per month of the CSV, over the days kept: day count, precipitation total, temp_max sum. */
function monthsOf(days: readonly number[]): Map<string, { days: number; precipitation: number; tempMax: number }> {
  const out = new Map<string, { days: number; precipitation: number; tempMax: number }>();
  for (const d of loadSeattleWeather()) {
    const key = `${d.date.slice(0, 7)}-01`;
    const m = out.get(key) ?? { days: 0, precipitation: 0, tempMax: 0 };
    if (days.includes(isoDay(d.date))) {
      m.days++;
      m.precipitation += d.precipitation;
      m.tempMax += d.tempMax;
    }
    out.set(key, m);
  }
  return out;
}

function seattleChecks(ws: () => Workspace): void {
  for (const path of ['table', 'rollup'] as const) {
    const answer = (sq: SubQuestion) => answerSubQuestion(sq, ws(), path === 'table' ? { scope: openRunScope([sq], ws(), { readTable: true }) } : {});
    const sq = (days: number[], metrics: string[]): SubQuestion => ({ id: 'days', kind: 'trend', lens: 'time_pattern', template: 'series', metrics, grain: 'month', window: WINDOW, filters: [dayFilter(days)] });

    it(`rainfall on Mondays, by month (${path})`, async () => {
      const want = monthsOf([1]);
      const a = await answer(sq([1], ['precipitation', 'days']));
      const points = seriesPoints(a, 'precipitation');
      expect(points.length).toBe(48);
      for (const p of points) expect(p.value).toBeCloseTo(want.get(p.period)!.precipitation, 9);
      // Each month has 4 or 5 Mondays (the calendar), never all its days.
      for (const p of seriesPoints(a, 'days')) {
        expect(p.value).toBe(want.get(p.period)!.days);
        expect([4, 5]).toContain(p.value);
      }
      expect(a.queries.some((q) => /ISODOW/.test(q.sql))).toBe(true);
    });

    it(`weekend average temp_max, by month (${path})`, async () => {
      const want = monthsOf([...WEEKEND]);
      const a = await answer(sq([...WEEKEND], ['temp_max']));
      for (const p of seriesPoints(a, 'temp_max')) expect(p.value).toBeCloseTo(want.get(p.period)!.tempMax / want.get(p.period)!.days, 9);
    });

    it(`weekdays and weekends add up to every day (${path})`, async () => {
      const all = monthsOf([1, 2, 3, 4, 5, 6, 7]);
      const week = seriesPoints(await answer(sq([1, 2, 3, 4, 5], ['days'])), 'days');
      const end = seriesPoints(await answer(sq([6, 7], ['days'])), 'days');
      for (let i = 0; i < week.length; i++) expect(week[i]!.value! + end[i]!.value!).toBe(all.get(week[i]!.period)!.days);
    });
  }
}

describeOnSeattleWeather({ duckdb: 'day-of-week filter on DuckDB (seattle-weather.csv)', postgres: 'day-of-week filter on PostgreSQL (table loaded from seattle-weather.csv)' }, 'tc_dow', seattleChecks);

const FLIGHTS = vegaDataFile('flights-3m.parquet');
const flightsConfig = parseConfigText(flightsParquetConfigText(['{ name: delay, label: Average delay, average: delay, unit: number, unit_label: min, kind: ratio }']), '/virtual/flights.yaml');

describe('Fridays only on flights-3m.parquet (DuckDB)', () => {
  const { ws, own } = useFileWorkspace(flightsConfig, 'flights');

  it('average delay and flights per month on Fridays match the file', async () => {
    const rows = await own(`SELECT strftime(date_trunc('month', date), '%Y-%m-%d') AS m, AVG(delay) AS delay, CAST(COUNT(*) AS DOUBLE) AS n
      FROM read_parquet('${FLIGHTS}') WHERE dayname(date) = 'Friday' AND date < DATE '2001-07-01' GROUP BY 1 ORDER BY 1`);
    expect(rows.length).toBe(6);
    const sq: SubQuestion = { id: 'fri', kind: 'trend', lens: 'time_pattern', template: 'series', metrics: ['delay', 'flights'], grain: 'month', window: { start: '2001-01-01', end: '2001-07-01' }, filters: [dayFilter([5])] };
    const a = await answerSubQuestion(sq, ws());
    const delay = seriesPoints(a, 'delay');
    const flights = seriesPoints(a, 'flights');
    for (const r of rows) {
      expect(delay.find((p) => p.period === r.m)!.value).toBeCloseTo(Number(r.delay), 9);
      expect(flights.find((p) => p.period === r.m)!.value).toBe(Number(r.n));
    }
  }, 120_000);
});
