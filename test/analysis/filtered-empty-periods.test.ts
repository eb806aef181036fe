// A filtered count's empty period is 0, not a gap. Checked on vega-datasets' seattle-weather.csv
// (public daily weather record, 2012–2015, one row a day): filtered to rain, July 2013 has no rain
// day at all, so its count is 0 and it is the lowest month; filtered to snow, most months have no
// snow day, so snow precipitation there is 0 while snow days' average temp_max has no value (and is
// said to be empty). Expected numbers come from the CSV read here in plain JavaScript
// (test/analysis/stats/seattle-weather.ts), never from the project's SQL. Each check runs through
// the real compile path on DuckDB (the CSV file) and PostgreSQL (a table loaded from it), both
// straight from the table and through the day-level rollup.
import { expect, it } from 'vitest';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import { openRunScope } from '../../analysis/run-scope.js';
import type { SubQuestion } from '../../analysis/types.js';
import type { Workspace } from '../../analysis/workspace.js';
import { seriesPoints } from '../helpers/workspace-checks.js';
import { describeOnSeattleWeather, loadSeattleWeather } from './stats/seattle-weather.js';

const WINDOW = { start: '2012-01-01', end: '2016-01-01' };
const question = (template: 'series' | 'period_table' | 'growth_series', metrics: string[], weather: string): SubQuestion => ({
  id: `${template}-${weather}`,
  kind: 'trend',
  lens: 'time_pattern',
  template,
  metrics,
  grain: 'month',
  window: WINDOW,
  filters: [{ dimension: 'weather', values: [weather] }],
});

/** Per calendar month of the file: days, precipitation and temp_max sum over the days with this weather. */
function fromCsv(weather: string): Map<string, { days: number; precipitation: number; tempMaxSum: number }> {
  const out = new Map<string, { days: number; precipitation: number; tempMaxSum: number }>();
  // Every month of the file is a key, with or without a matching day: the file has a row for every day.
  for (const d of loadSeattleWeather()) {
    const key = `${d.date.slice(0, 7)}-01`;
    const m = out.get(key) ?? { days: 0, precipitation: 0, tempMaxSum: 0 };
    if (d.weather === weather) {
      m.days++;
      m.precipitation += d.precipitation;
      m.tempMaxSum += d.tempMax;
    }
    out.set(key, m);
  }
  return out;
}

function checks(ws: () => Workspace): void {

  for (const path of ['table', 'rollup'] as const) {
    const answer = (sq: SubQuestion) => answerSubQuestion(sq, ws(), path === 'table' ? { scope: openRunScope([sq], ws(), { readTable: true }) } : {});

    it(`rain days by month: July 2013 is 0 and the lowest month (${path})`, async () => {
      const want = fromCsv('rain');
      expect(want.get('2013-07-01')!.days).toBe(0); // the CSV itself: no day of July 2013 is "rain"
      const a = await answer(question('series', ['days'], 'rain'));
      const points = seriesPoints(a, 'days');
      expect(points.map((p) => p.period)).toEqual([...want.keys()].sort());
      for (const p of points) expect(p.value).toBe(want.get(p.period)!.days);
      const trough = a.findings.find((f) => f.type === 'trough');
      expect(trough).toMatchObject({ period: '2013-07-01', value: 0 });
      expect(a.caveats.map((c) => c.code)).not.toContain('series_gap');
    });

    it(`snow: precipitation is 0 in a month without snow, the average is empty and said so (${path})`, async () => {
      const want = fromCsv('snow');
      const a = await answer(question('series', ['precipitation', 'temp_max'], 'snow'));
      const emptyMonths = [...want].filter(([, m]) => m.days === 0).map(([k]) => k);
      expect(emptyMonths.length).toBeGreaterThan(30);
      for (const p of seriesPoints(a, 'precipitation')) expect(p.value).toBeCloseTo(want.get(p.period)!.precipitation, 9);
      for (const p of seriesPoints(a, 'temp_max')) {
        const m = want.get(p.period)!;
        if (m.days === 0) expect(p.value).toBeNull();
        else expect(p.value).toBeCloseTo(m.tempMaxSum / m.days, 9);
      }
      const empty = a.caveats.find((c) => c.code === 'empty_period' && c.data.metric === 'temp_max');
      expect(empty?.data).toMatchObject({ periods: emptyMonths.length, firstEmpty: emptyMonths[0] });
      expect(a.caveats.some((c) => c.code === 'empty_period' && c.data.metric === 'precipitation')).toBe(false);
      expect(a.caveats.map((c) => c.code)).not.toContain('series_gap');
    });

    it(`fog first appears in July 2012: the series starts there, and 2012 is no base year for growth (${path})`, async () => {
      const want = fromCsv('fog');
      const firstFog = [...want].find(([, m]) => m.days > 0)![0];
      expect(firstFog).toBe('2012-07-01'); // the CSV itself: the first "fog" day is 11 July 2012
      const a = await answer(question('series', ['days'], 'fog'));
      const points = seriesPoints(a, 'days');
      expect(points[0]!.period).toBe(firstFog);
      for (const p of points) expect(p.value).toBe(want.get(p.period)!.days);
      expect(a.caveats.find((c) => c.code === 'empty_period')?.data).toMatchObject({ leading: true, periods: 6, firstEmpty: '2012-01-01', firstMatch: firstFog });
      expect(a.findings.find((f) => f.type === 'trough')).toMatchObject({ value: Math.min(...points.map((p) => p.value!)) });

      const g = await answer(question('growth_series', ['days'], 'fog'));
      const years = g.findings.find((f) => f.type === 'growth_years');
      if (years?.type !== 'growth_years') throw new Error('no growth_years');
      const year = (y: string) => years.years.find((x) => x.year === `${y}-01-01`)!;
      const total = (y: string) => [...want].filter(([k]) => k.startsWith(y)).reduce((n, [, m]) => n + m.days, 0);
      expect(year('2012').complete).toBe(false);
      expect(year('2013').yoy).toBeNull();
      expect(year('2014').yoy).toBeCloseTo(total('2014') / total('2013') - 1, 12);
    });

    it(`period table of rain days keeps July 2013 as a 0 row (${path})`, async () => {
      const want = fromCsv('rain');
      const a = await answer(question('period_table', ['days'], 'rain'));
      const whole = (a.tables.by_period?.rows ?? []).filter((r) => r.g_period === 0 && r.g_window === 1);
      const byPeriod = new Map(whole.map((r) => [String(r.period).slice(0, 10), r.days]));
      for (const [k, m] of want) expect(byPeriod.get(k)).toBe(m.days);
    });
  }
}

describeOnSeattleWeather({ duckdb: 'filtered months with no matching rows on DuckDB (CSV file)', postgres: 'filtered months with no matching rows on PostgreSQL (table loaded from the CSV)' }, 'tc_empty', checks);
