// Two rules over vega-datasets' football.json (European league matches, 20 July 2013 to 28 May 2017,
// one row per match), each checked against the test's own SQL over the file:
// - a rate over a span is its numerator's sum over its denominator's (away wins over matches), never
//   the mean of the monthly rates (a month of two matches weighs as much as a month of forty);
// - a filtered count's month with no rows at all, inside the months the segment has matches, is 0
//   matches (the leagues' June breaks), while a rate there has no value.
import { describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { metricByName } from '../../../analysis/catalog.js';
import { trendSummaryWords } from '../../../analysis/captions/trend-summary-caption.js';
import { formatValue, valueFormatOf } from '../../../analysis/format.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { parseConfigText } from '../../../config/load.js';
import { FOOTBALL_JSON, footballConfigText } from '../../helpers/open-data.js';
import { seriesPoints, useFileWorkspace } from '../../helpers/workspace-checks.js';

const FOOTBALL = FOOTBALL_JSON;
const config = parseConfigText(footballConfigText(
  [
    '{ name: matches, label: Matches, count: rows, kind: flow, unit: count }',
    '{ name: goals, label: Goals, sum: home_score + away_score, kind: flow, unit: count }',
    '{ name: away_win_rate, label: Away win rate, rate: { when: "home_score < away_score" }, unit: percent }',
    '{ name: goals_per_match, label: Goals per match, ratio: { of: goals, per: matches }, unit: number, decimals: 2 }',
  ],
  [
    '{ name: division, label: Division, column: division }',
    '{ name: home_team, label: Home team, column: home_team }',
  ],
), '/virtual/football.yaml');

const WHOLE = { start: '2013-07-20', end: '2017-05-29' };
const summary = (metric: string, filters: SubQuestion['filters']): SubQuestion => ({ id: `sum-${metric}`, kind: 'trend', lens: 'summary', template: 'trend_summary', metrics: [metric], grain: 'month', window: WHOLE, filters });
const series = (metric: string, filters: SubQuestion['filters']): SubQuestion => ({ id: `ser-${metric}`, kind: 'trend', lens: 'time_pattern', template: 'series', metrics: [metric], grain: 'month', window: WHOLE, filters });
const SRC = `read_json_auto('${FOOTBALL}')`;

describe('a rate over a span is pooled (football.json)', () => {
  const { ws, own } = useFileWorkspace(config, 'football');

  it("Barcelona's and R. Madrid's home matches: the away win rate over the span is away wins over matches", async () => {
    const filters = [{ dimension: 'home_team', values: ['Barcelona', 'R. Madrid'] }];
    const [pooled] = await own(`SELECT CAST(COUNT(*) FILTER (WHERE home_score < away_score) AS DOUBLE) / COUNT(*) AS r FROM ${SRC} WHERE home_team IN ('Barcelona', 'R. Madrid')`);
    // The mean of the complete months' rates (August 2013 to April 2017), the figure the title had said.
    const [monthly] = await own(`SELECT AVG(r) AS m FROM (SELECT date_trunc('month', CAST(date AS DATE)) AS mo, CAST(COUNT(*) FILTER (WHERE home_score < away_score) AS DOUBLE) / COUNT(*) AS r
      FROM ${SRC} WHERE home_team IN ('Barcelona', 'R. Madrid') AND CAST(date AS DATE) >= DATE '2013-08-01' AND CAST(date AS DATE) < DATE '2017-05-01' GROUP BY 1)`);
    const metric = metricByName(ws().dataset, 'away_win_rate');
    const said = (x: number) => formatValue(x, valueFormatOf(metric, 'en-GB'), { compact: true });
    // The two differ at the shown precision, so the check tells them apart.
    expect(said(Number(pooled!.r))).not.toBe(said(Number(monthly!.m)));
    const a = await answerSubQuestion(summary('away_win_rate', filters), ws());
    const words = trendSummaryWords(metric, 'month', a.findings, 'managers', 'en-GB');
    expect(words.title).toContain(`averaged ${said(Number(pooled!.r))}`);
    expect(`${words.title} ${words.caption}`).not.toContain(said(Number(monthly!.m)));
  }, 120_000);

  it('goals per match over two divisions is their goals over their matches', async () => {
    const filters = [{ dimension: 'division', values: ['Serie A', 'Deutsche Bundesliga'] }];
    const [pooled] = await own(`SELECT CAST(SUM(home_score + away_score) AS DOUBLE) / COUNT(*) AS r FROM ${SRC} WHERE division IN ('Serie A', 'Deutsche Bundesliga')`);
    const metric = metricByName(ws().dataset, 'goals_per_match');
    const a = await answerSubQuestion(summary('goals_per_match', filters), ws());
    const s = a.findings.find((f) => f.type === 'trend_summary');
    expect(s && s.type === 'trend_summary' ? s.pooled : undefined).toBeCloseTo(Number(pooled!.r), 9);
    const words = trendSummaryWords(metric, 'month', a.findings, 'managers', 'en-GB');
    expect(words.title).toContain(`averaged ${formatValue(Number(pooled!.r), valueFormatOf(metric, 'en-GB'), { compact: true })}`);
  }, 120_000);
});

describe("a filtered count's month with no rows at all is 0 inside the segment's months (football.json)", () => {
  const { ws, own } = useFileWorkspace(config, 'football');
  const EPL = [{ dimension: 'division', values: ['English Premier League'] }];

  it('English Premier League matches by month: the June breaks are 0, every month as the SQL counts it', async () => {
    // Every month from the league's first to its last month with a match, with its matches (0 where none).
    const want = await own(`WITH m AS (SELECT date_trunc('month', CAST(date AS DATE)) AS mo, COUNT(*) AS n FROM ${SRC} WHERE division = 'English Premier League' GROUP BY 1),
      months AS (SELECT CAST(unnest(generate_series((SELECT MIN(mo) FROM m), (SELECT MAX(mo) FROM m), INTERVAL 1 MONTH)) AS DATE) AS mo)
      SELECT strftime(months.mo, '%Y-%m-%d') AS period, CAST(COALESCE(m.n, 0) AS DOUBLE) AS n FROM months LEFT JOIN m ON CAST(m.mo AS DATE) = months.mo ORDER BY 1`);
    const zeroMonths = want.filter((r) => Number(r.n) === 0).map((r) => String(r.period));
    // The file itself: no match at all in June 2014, 2015 or 2016 in any division.
    const [june] = await own(`SELECT COUNT(*) AS n FROM ${SRC} WHERE month(CAST(date AS DATE)) = 6`);
    expect(Number(june!.n)).toBe(0);
    expect(zeroMonths).toEqual(expect.arrayContaining(['2014-06-01', '2015-06-01', '2016-06-01']));
    const a = await answerSubQuestion(series('matches', EPL), ws());
    const got = new Map(seriesPoints(a, 'matches').filter((p) => !p.partial).map((p) => [p.period, p.value]));
    for (const r of want) if (got.has(String(r.period))) expect(got.get(String(r.period)), String(r.period)).toBe(Number(r.n));
    for (const p of zeroMonths) expect(got.get(p), p).toBe(0);
    // The note counts the months with no rows at all in the file (not those with other leagues' matches only).
    const [holes] = await own(`WITH months AS (SELECT CAST(unnest(generate_series(DATE '2013-08-01', DATE '2017-05-01', INTERVAL 1 MONTH)) AS DATE) AS mo)
      SELECT COUNT(*) AS n, strftime(MIN(mo), '%Y-%m-%d') AS first FROM months WHERE mo NOT IN (SELECT DISTINCT date_trunc('month', CAST(date AS DATE)) FROM ${SRC})`);
    const note = a.caveats.find((c) => c.code === 'series_gap');
    expect(note?.data).toMatchObject({ zero: true, periods: Number(holes!.n), firstGap: holes!.first });
  }, 120_000);

  it('a rate there has no value, and the unfiltered count keeps its months without rows blank', async () => {
    const rate = await answerSubQuestion(series('away_win_rate', EPL), ws());
    expect(seriesPoints(rate, 'away_win_rate').find((p) => p.period === '2015-06-01')?.value).toBeNull();
    const all = await answerSubQuestion(series('matches', []), ws());
    expect(seriesPoints(all, 'matches').find((p) => p.period === '2015-06-01')?.value).toBeNull();
  }, 120_000);

  it('growth by month of a filtered count reads the same zeros', async () => {
    const a = await answerSubQuestion({ ...series('matches', EPL), id: 'g', kind: 'growth', template: 'growth_series' }, ws());
    const g = a.findings.find((f) => f.type === 'growth_series');
    const p = g && 'points' in g ? (g.points as { period: string; value: number | null }[]).find((x) => x.period === '2015-06-01') : undefined;
    expect(p?.value).toBe(0);
  }, 120_000);
});

