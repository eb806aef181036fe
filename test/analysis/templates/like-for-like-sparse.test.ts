// Like-for-like presence on sparse categories (analysis/presence.ts): a segment with no row near the
// data's edge has not opened or closed unless its own rhythm makes that silence unlikely. Checked on
// two open datasets from the vega-datasets package: seattle-weather.csv (daily Seattle weather,
// 2012–2015) and movies.json (films with release dates, distributors and genres). Every expected
// value comes from our own plain SQL on the files (DuckDB), never through the templates.
import { DuckDBInstance, type DuckDBConnection } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { GrowthDriversFinding } from '../../../analysis/findings/growth.js';
import type { SegmentTrendFinding } from '../../../analysis/findings/segments.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { parseConfigText } from '../../../config/load.js';
import { presentContext } from '../../../bot/present-answer.js';
import { MOVIES_FILE, MOVIES_RELEASE, moviesConfigText, vegaDataFile } from '../../helpers/open-data.js';
import { SEATTLE_WEATHER_CSV, seattleWeatherConfig } from '../stats/seattle-weather.js';

const MOVIES = MOVIES_FILE;
const RELEASE = MOVIES_RELEASE;
const Y2014 = { start: '2014-01-01', end: '2015-01-01' };
const Y2015 = { start: '2015-01-01', end: '2016-01-01' };

const drivers = (extra: Partial<SubQuestion>): SubQuestion => ({
  id: 'lfl-sparse',
  kind: 'growth',
  lens: 'breakdown',
  template: 'growth_drivers',
  metrics: ['days'],
  dimension: 'weather',
  grain: 'month',
  window: Y2015,
  compareWindow: Y2014,
  filters: [],
  ...extra,
});

let db: DuckDBInstance;
let con: DuckDBConnection;
const rows = async (sql: string) => (await con.runAndReadAll(sql)).getRowObjectsJson() as Record<string, unknown>[];

/**
 * Our SQL for the rule, on a view `v(seg, d)`: the segments seen in either year judged against the
 * first day with data in the earlier year (e0) and the last in the later one (e1). Silent beyond
 * 30 days (a twelfth of a year), over at least one month boundary, and (1 - p)^g below 1%, with p
 * the share of the months after its first that have a row. Written with date_diff, not the
 * template's month arithmetic.
 */
function judgedSql(before: number, after: number): string {
  return `WITH life AS (
    SELECT seg, MIN(d) AS f, MAX(d) AS l, COUNT(DISTINCT date_trunc('month', d)) AS am, date_diff('month', date_trunc('month', MIN(d)), date_trunc('month', MAX(d))) AS span
    FROM v WHERE d IS NOT NULL GROUP BY seg),
  edges AS (SELECT MIN(d) FILTER (WHERE year(d) = ${before}) AS e0, MAX(d) FILTER (WHERE year(d) = ${after}) AS e1 FROM v),
  gaps AS (
    SELECT life.*, edges.*, date_diff('month', date_trunc('month', e0), date_trunc('month', f)) AS g_open,
      date_diff('month', date_trunc('month', l), date_trunc('month', e1)) AS g_close
    FROM life, edges WHERE seg IS DISTINCT FROM NULL AND seg IN (SELECT seg FROM v WHERE year(d) IN (${before}, ${after})))
  SELECT seg, CAST(f AS VARCHAR) AS f, CAST(l AS VARCHAR) AS l, am, span, g_open, g_close,
    (f - e0 > 30 AND g_open >= 1 AND am >= 2 AND pow(1 - (am - 1) / span, g_open) < 0.01) AS opened,
    (e1 - l > 30 AND g_close >= 1 AND am >= 2 AND pow(1 - (am - 1) / span, g_close) < 0.01) AS closed,
    (e1 - l) AS days_silent_at_end,
    (f - e0 > 30 OR e1 - l > 30) AS old_rule
  FROM gaps ORDER BY seg`;
}

beforeAll(async () => {
  db = await DuckDBInstance.create(':memory:');
  con = await db.connect();
  await con.run(`CREATE TABLE weather AS SELECT CAST(date AS DATE) AS d, weather FROM read_csv_auto('${SEATTLE_WEATHER_CSV.replace(/'/g, "''")}')`);
  await con.run(`CREATE TABLE movies AS SELECT CAST(${RELEASE} AS DATE) AS d, * EXCLUDE ("Release Date") FROM read_json_auto('${MOVIES.replace(/'/g, "''")}')`);
});
afterAll(() => {
  con?.closeSync();
  db?.closeSync();
});

describe('like for like on sparse weather types (seattle-weather.csv, vega-datasets)', () => {
  let ws: Workspace;
  beforeAll(async () => {
    ws = await openWorkspace(seattleWeatherConfig());
  });
  afterAll(async () => {
    await ws?.source.close();
  });

  it('2015 against 2014: drizzle (last seen 6 October 2015) and snow (none in 2015) stay in like for like, counted as they are', async () => {
    await con.run(`CREATE OR REPLACE VIEW v AS SELECT weather AS seg, d FROM weather`);
    const judged = await rows(judgedSql(2014, 2015));
    const drizzle = judged.find((r) => r.seg === 'drizzle')!;
    // Rows in 21 of the 46 months from January 2012 to October 2015; silent for 86 days, November and December.
    expect([drizzle.l, Number(drizzle.am), Number(drizzle.span) + 1, Number(drizzle.g_close), Number(drizzle.days_silent_at_end)]).toEqual(['2015-10-06', 21, 46, 2, 86]);
    // (1 - 20/45)^2 = 0.31: two quiet months are ordinary for drizzle. The old rule (any silence over 30 days) called it closed.
    expect((1 - 20 / 45) ** 2).toBeGreaterThan(0.01);
    const snow = judged.find((r) => r.seg === 'snow')!;
    // Rows in 10 of its 35 months, silent for 13: (1 - 9/34)^13 = 0.018, not below 1%.
    expect([snow.l, Number(snow.am), Number(snow.span) + 1, Number(snow.g_close)]).toEqual(['2014-11-29', 10, 35, 13]);
    expect(judged.filter((r) => r.opened === true || r.closed === true)).toEqual([]);
    expect(judged.filter((r) => r.old_rule === true).map((r) => r.seg)).toEqual(['drizzle', 'snow']);

    const answer = await answerSubQuestion(drivers({}), ws);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    expect(f.likeForLike).toBeNull();
    expect(answer.caveats.filter((c) => c.code === 'late_segment' || c.code === 'segment_gap')).toEqual([]);
    const counts = await rows(`SELECT weather AS w, COUNT(*) FILTER (WHERE year(d) = 2014) AS before, COUNT(*) FILTER (WHERE year(d) = 2015) AS after FROM weather GROUP BY 1 ORDER BY 1`);
    for (const c of counts) {
      const s = f.segments.find((x) => x.segment === c.w)!;
      expect([s.segment, s.before ?? 0, s.after ?? 0]).toEqual([c.w, Number(c.before), Number(c.after)]);
    }
    const p = SUB_QUESTIONS.growth_drivers.present(answer, presentContext(ws, 'managers'));
    expect(p.caption).not.toMatch(/like for like|opened|closed|last there/i);
  });
});

describe('like for like on distributors and genres (movies.json, vega-datasets)', () => {
  let ws: Workspace;
  beforeAll(async () => {
    const config = parseConfigText(
      moviesConfigText([`{ name: worldwide_gross, label: Worldwide Gross, sum: '"Worldwide Gross"', unit: number, kind: flow }`], [`{ name: distributor, label: Distributor, column: Distributor }`, `{ name: major_genre, label: Major Genre, column: Major Genre }`]),
      '/virtual/movies-lfl.yaml',
    );
    ws = await openWorkspace(config, undefined, {}, new Date('2026-12-05T09:00:00Z'));
  });
  afterAll(async () => {
    await ws?.source.close();
  });

  const Y2004 = { start: '2004-01-01', end: '2005-01-01' };
  const Y2005 = { start: '2005-01-01', end: '2006-01-01' };

  it('2005 against 2004 by distributor: only those silent beyond chance are left out, and the rest is our own SQL total', async () => {
    await con.run(`CREATE OR REPLACE VIEW v AS SELECT Distributor AS seg, d FROM movies`);
    const judged = await rows(judgedSql(2004, 2005));
    const leftOut = judged.filter((r) => r.opened === true || r.closed === true).map((r) => [r.seg, r.opened, r.closed, r.f]);
    // Three first appear in late 2005 and then release often; one-film distributors give no rhythm to judge.
    expect(leftOut).toEqual([
      ['IDP/Goldwyn/Roadside', true, false, '2005-10-05'],
      ['Magnolia Pictures', true, false, '2005-12-07'],
      ['Weinstein Co.', true, false, '2005-11-11'],
    ]);
    // The old rule (any silence over 30 days) left out 38 of the 63 distributors of those two years.
    expect([judged.filter((r) => r.old_rule === true).length, judged.length]).toEqual([38, 63]);

    const answer = await answerSubQuestion(drivers({ metrics: ['worldwide_gross'], dimension: 'distributor', window: Y2005, compareWindow: Y2004 }), ws);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    expect(f.likeForLike!.excluded.map((c) => [c.segment, c.opened, c.closed, c.firstDay])).toEqual(leftOut);
    const totals = (await rows(`SELECT SUM("Worldwide Gross") FILTER (WHERE year(d) = 2004) AS before, SUM("Worldwide Gross") FILTER (WHERE year(d) = 2005) AS after
      FROM movies WHERE Distributor IS NULL OR Distributor NOT IN ('IDP/Goldwyn/Roadside', 'Magnolia Pictures', 'Weinstein Co.')`))[0]!;
    expect(f.likeForLike!.before).toBeCloseTo(Number(totals.before), 0);
    expect(f.likeForLike!.after).toBeCloseTo(Number(totals.after), 0);
  });

  it('2005 against 2004 by genre: every genre runs from before 2004 to after 2005, so none is left out', async () => {
    await con.run(`CREATE OR REPLACE VIEW v AS SELECT "Major Genre" AS seg, d FROM movies`);
    const judged = await rows(judgedSql(2004, 2005));
    expect(judged.every((r) => String(r.f) < '2004-01-01' && String(r.l) > '2005-12-31')).toBe(true);
    const answer = await answerSubQuestion(drivers({ metrics: ['worldwide_gross'], dimension: 'major_genre', window: Y2005, compareWindow: Y2004 }), ws);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    expect(f.likeForLike).toBeNull();
    const p = SUB_QUESTIONS.growth_drivers.present(answer, presentContext(ws, 'managers'));
    expect(p.caption).not.toMatch(/opened|closed|last there/i);
  });

  it('segment trend 2000 to 2010 by distributor: each of the top six grows between its own whole years, not Warner Bros. alone', async () => {
    const answer = await answerSubQuestion(
      { id: 'trend', kind: 'trend', lens: 'time_pattern', template: 'segment_trend', metrics: ['worldwide_gross'], dimension: 'distributor', grain: 'month', window: { start: '2000-01-01', end: '2011-01-01' }, filters: [], rankLimit: 6 },
      ws,
    );
    const named = answer.findings.filter((f): f is SegmentTrendFinding => f.type === 'segment_trend' && !f.other);
    expect(named.length).toBe(6);
    // Our SQL: each distributor's years 2000–2010 with a film, the months with one, and the year's gross.
    const years = await rows(`SELECT Distributor AS a, year(d) AS y, COUNT(DISTINCT month(d)) AS months, SUM("Worldwide Gross") AS gross
      FROM movies WHERE d >= DATE '2000-01-01' AND d < DATE '2011-01-01' AND Distributor IS NOT NULL GROUP BY 1, 2 ORDER BY 1, 2`);
    for (const t of named) {
      const mine = years.filter((r) => r.a === t.segment);
      const seen = mine.map((r) => Number(r.y));
      // Whole years: a film in every month, or between its first and last years with films.
      const whole = mine.filter((r) => Number(r.months) === 12 || (Number(r.y) > Math.min(...seen) && Number(r.y) < Math.max(...seen)));
      const [from, to] = [whole[0]!, whole[whole.length - 1]!];
      expect([t.segment, t.growth?.fromYear, t.growth?.toYear]).toEqual([t.segment, Number(from.y), Number(to.y)]);
      expect(t.growth!.from).toBeCloseTo(Number(from.gross), 0);
      expect(t.growth!.to).toBeCloseTo(Number(to.gross), 0);
    }
    // Warner Bros. from 2000 to 2009 (the newcomer's own check: 1.34B and 3.57B).
    const warner = named.find((t) => t.segment === 'Warner Bros.')!;
    expect([warner.growth!.fromYear, warner.growth!.toYear, Math.round(warner.growth!.from / 1e7) / 100, Math.round(warner.growth!.to / 1e7) / 100]).toEqual([2000, 2009, 1.34, 3.57]);
  });
});
