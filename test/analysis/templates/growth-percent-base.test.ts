// Growth percentages only where the base allows one (stats/growth percentScale), checked on two
// open datasets (vega-datasets, the npm package): FAA wildlife strikes 1990–2002 (birdstrikes.csv)
// and US flights of Q1 2001 (flights-20k.json). Every figure the answers are checked against is
// computed here by our own SQL on the raw file, in a DuckDB instance of the test's own.
import { DuckDBInstance, type DuckDBConnection } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { GrowthDriversFinding, GrowthRateSummaryFinding, GrowthSeriesFinding } from '../../../analysis/findings/growth.js';
import type { TrendTestFinding } from '../../../analysis/findings/segments.js';
import { TINY_BASE_FRACTION } from '../../../analysis/stats/index.js';
import { percentBaseUsable, percentScale } from '../../../analysis/stats/growth.js';
import { SUB_QUESTIONS, type TemplateName } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { FLIGHTS_TABLE, STRIKES_TABLE, flightsWorkspace, strikesWorkspace } from './open-data-tables.js';

let flightsWs: Awaited<ReturnType<typeof flightsWorkspace>>;
let strikesWs: Awaited<ReturnType<typeof strikesWorkspace>>;
let truthDb: DuckDBInstance;
let truth: DuckDBConnection;
beforeAll(async () => {
  flightsWs = await flightsWorkspace();
  strikesWs = await strikesWorkspace();
  // The truth comes from a database of the test's own, with SQL written here.
  truthDb = await DuckDBInstance.create(':memory:');
  truth = await truthDb.connect();
  await truth.run(FLIGHTS_TABLE);
  await truth.run(STRIKES_TABLE);
});
afterAll(async () => {
  await flightsWs?.source.close();
  await strikesWs?.source.close();
  truth?.closeSync();
  truthDb?.closeSync();
});

async function rows(sql: string): Promise<Record<string, unknown>[]> {
  return (await truth.runAndReadAll(sql)).getRowObjectsJson() as Record<string, unknown>[];
}

type Ws = typeof flightsWs;
const question = (template: TemplateName, metric: string, window: SubQuestion['window'], extra: Partial<SubQuestion> = {}): SubQuestion => ({
  id: 's',
  kind: 'growth',
  lens: 'summary',
  template,
  metrics: [metric],
  grain: 'month',
  window,
  filters: [],
  ...extra,
});
const present = async (ws: Ws, sq: SubQuestion) => {
  const answer = await answerSubQuestion(sq, ws);
  const shown = SUB_QUESTIONS[sq.template].present(answer, { dataset: ws.dataset, locale: 'en-GB', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
  return { answer, shown, text: `${shown.title}\n${shown.caption}\n${shown.notes.join('\n')}` };
};

describe('a percentage of a tiny base is never given', () => {
  it('a sparse cost (most months none): the usual level is that of the months with any, so US$70 is no base', async () => {
    // "Cost Other" by month: most months are 0, so a median over them all was 0 and every base
    // passed (a "+243,451%" month). Our SQL over the raw file gives the months and the median of
    // those with a cost.
    const months = await rows(`
      SELECT CAST(date_trunc('month', "Flight Date") AS DATE) AS month, SUM("Cost Other")::DOUBLE AS cost
      FROM strikes GROUP BY 1 ORDER BY 1`);
    const values = months.map((r) => Number(r.cost));
    expect(values.filter((v) => v === 0).length).toBeGreaterThan(values.length / 2);
    const [{ med }] = (await rows(`SELECT median(c) AS med FROM (SELECT SUM("Cost Other")::DOUBLE AS c FROM strikes GROUP BY date_trunc('month', "Flight Date")) WHERE c > 0`)) as [{ med: number }];
    const scale = percentScale(values, true);
    expect(scale.typical).toBeCloseTo(Number(med), 6);
    expect(percentBaseUsable(70, scale)).toBe(false);
    expect(percentBaseUsable(Number(med), scale)).toBe(true);
  });

  it('wildlife-strike costs by month: a September of US$313 gives the next September no percentage, and the summary leads with the median', async () => {
    const sq = question('growth_summary', 'cost_total', { start: '1990-02-01', end: '2002-07-01' });
    const { answer, text } = await present(strikesWs, sq);
    const summary = answer.findings.find((f): f is GrowthRateSummaryFinding => f.type === 'growth_rate_summary')!;
    expect(summary.basis).toBe('yoy');
    expect(summary.measure).toBe('relative');
    // Our SQL: monthly sums of "Cost Total $" over the window, their median absolute level, and
    // each month's change on the same month a year earlier where the base is at least a tenth of it.
    // Months without a strike have no row, so no value: no rate is taken to or from them (the
    // project says so in a note); the typical level is over the months that have a cost (a month
    // of strikes without any cost is "none", not the level: on a sparse cost most months are 0).
    const months = await rows(`
      WITH m AS (
        SELECT CAST(date_trunc('month', "Flight Date") AS DATE) AS month, SUM("Cost Total $")::DOUBLE AS cost
        FROM strikes WHERE "Flight Date" >= DATE '1990-02-01' AND "Flight Date" < DATE '2002-07-01' GROUP BY 1
      ), typical AS (SELECT median(abs(cost)) FILTER (WHERE cost <> 0) AS med FROM m)
      SELECT strftime(a.month, '%Y-%m-%d') AS month, a.cost, b.cost AS base, typical.med
      FROM m a JOIN m b ON b.month = a.month - INTERVAL 1 YEAR CROSS JOIN typical
      ORDER BY 1`);
    const med = Number(months[0]!.med);
    // Recalled from the newcomer's check, and confirmed by the SQL above: September 1994 cost US$313, September 1995 US$3,811,576.
    const sept = months.find((r) => r.month === '1995-09-01')!;
    expect(Number(sept.base)).toBe(313);
    expect(Number(sept.cost)).toBe(3_811_576);
    expect(Number(sept.base)).toBeLessThan(TINY_BASE_FRACTION * med);
    const expected = months
      .filter((r) => Number(r.base) > 0 && Number(r.base) >= TINY_BASE_FRACTION * med)
      .map((r) => ({ period: String(r.month), value: Number(r.cost) / Number(r.base) - 1 }));
    expect(expected.length).toBeLessThan(months.filter((r) => Number(r.base) > 0).length);
    const given = summary.rates.filter((r) => r.value !== null);
    expect(given.map((r) => r.period)).toEqual(expected.map((e) => e.period));
    given.forEach((g, i) => expect(g.value!).toBeCloseTo(expected[i]!.value, 9));
    expect(summary.rates.find((r) => r.period === '1995-09-01')?.value).toBeNull();
    expect(text).not.toContain('1,217,656');
    // The managers' caption gives the middle value (median of the rates given), not the mean.
    const sorted = given.map((g) => g.value!).sort((a, b) => a - b);
    const mid = sorted.length % 2 ? sorted[(sorted.length - 1) / 2]! : (sorted[sorted.length / 2 - 1]! + sorted[sorted.length / 2]!) / 2;
    expect(summary.median).toBeCloseTo(mid, 12);
    expect(text).toContain('had a middle value of');
    expect(text).not.toContain('averaged');
    expect(text).toContain('under a tenth of the usual (median) level');
  });
});

describe('a quantity that reaches zero or goes below is never given as a percentage', () => {
  it('average delay by day (flights-20k): it goes below zero, so its changes are in minutes', async () => {
    const low = await rows(`SELECT MIN(d)::DOUBLE AS low FROM (SELECT CAST(departed AS DATE) AS day, AVG(delay) AS d FROM flights GROUP BY 1)`);
    expect(Number(low[0]!.low)).toBeLessThan(0);
    const { answer, text } = await present(flightsWs, question('growth_summary', 'avg_delay', { start: '2001-01-01', end: '2001-04-01' }, { grain: 'day' }));
    const summary = answer.findings.find((f): f is GrowthRateSummaryFinding => f.type === 'growth_rate_summary')!;
    expect(summary.measure).toBe('units');
    expect(text).not.toMatch(/\d%/);
    expect(text).toContain('min');
    const series = await present(flightsWs, question('growth_series', 'avg_delay', { start: '2001-01-01', end: '2001-04-01' }, { grain: 'day' }));
    const f = series.answer.findings.find((x): x is GrowthSeriesFinding => x.type === 'growth_series')!;
    expect(f.inUnits).toBe(true);
    expect(f.points.every((p) => p.pop === null && p.yoy === null)).toBe(true);
    expect(series.text).not.toMatch(/\d%/);
    expect(series.text).not.toContain('not enough complete periods');
  });

  it('average delay by origin, March against February 2001: MSP fell 10.5 min, not "−100.7%"', async () => {
    const msp = await rows(`
      SELECT AVG(delay) FILTER (WHERE departed < TIMESTAMP '2001-03-01')::DOUBLE AS feb,
             AVG(delay) FILTER (WHERE departed >= TIMESTAMP '2001-03-01')::DOUBLE AS mar
      FROM flights WHERE origin = 'MSP' AND departed >= TIMESTAMP '2001-02-01' AND departed < TIMESTAMP '2001-04-01'`);
    const [feb, mar] = [Number(msp[0]!.feb), Number(msp[0]!.mar)];
    // The plain relative change would be about −100.7%: the March average is just below zero.
    expect(mar).toBeLessThan(0);
    expect((mar - feb) / feb).toBeCloseTo(-1.007, 3);
    const sq = question('growth_drivers', 'avg_delay', { start: '2001-03-01', end: '2001-04-01' }, { lens: 'breakdown', dimension: 'origin', compareWindow: { start: '2001-02-01', end: '2001-03-01' } });
    const { answer, text } = await present(flightsWs, sq);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    const row = f.segments.find((s) => s.segment === 'MSP')!;
    expect(row.before).toBeCloseTo(feb, 9);
    expect(row.after).toBeCloseTo(mar, 9);
    expect(row.relative).toBeNull();
    // Some origin averages at or below zero: no percentage for any segment, nor the total.
    expect(f.segments.every((s) => s.relative === null)).toBe(true);
    expect(f.total.relative).toBeNull();
    expect(text).not.toContain('100.7%');
    expect(text).toContain(`MSP ${(mar - feb).toFixed(1).replace('-', '\u2212')}\u00a0min`);
  });
});

describe('a trend slope from under a year of data is said per period, never "a year"', () => {
  it('weekly flights over Q1 2001: the slope per week, no yearly rate', async () => {
    const { answer, text } = await present(flightsWs, question('trend_test', 'flights', { start: '2001-01-01', end: '2001-04-01' }, { kind: 'trend', lens: 'time_pattern', grain: 'week' }));
    const t = answer.findings.find((x): x is TrendTestFinding => x.type === 'trend_test')!;
    const weeks = await rows(`SELECT COUNT(DISTINCT date_trunc('week', departed)) AS n FROM flights`);
    expect(Number(weeks[0]!.n)).toBeLessThan(52);
    expect(t.underAYear).toBe(true);
    expect(t.slopePerYearRelative).toBeNull();
    expect(text).not.toContain('a year');
    for (const audience of ['analysts', 'leadership'] as const) {
      const other = SUB_QUESTIONS.trend_test.present(answer, { dataset: flightsWs.dataset, locale: 'en-GB', audience, chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: flightsWs.coverage.lastDate });
      expect(`${other.title} ${other.caption}`).not.toContain('a year');
    }
  });
});
