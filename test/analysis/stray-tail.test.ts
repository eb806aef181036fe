// A few rows stamped just past the data's end are a stray tail, not a day of data. Checked on
// vega-datasets' flights-3m.parquet (public US flight records, FAA on-time data as packaged by
// vega-datasets): 3,000,000 flights from 1 January to 30 June 2001, plus a handful stamped
// 1 July 2001 00:00. The last full day is 30 June, so 1 July is no "latest complete day" and the
// week of Monday 25 June (25 June to 1 July) is partial. Expected numbers come from the test's own
// SQL over the file (read_parquet in DuckDB), not from the project's queries. The 1% share of a
// typical day is common practice, not a published standard.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import { checkQuality, qualityCaveatsFor } from '../../analysis/quality/check-run.js';
import type { Answer, PeriodPoint, SubQuestion } from '../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { parseConfigText } from '../../config/load.js';
import { flightsParquetConfigText, vegaDataFile } from '../helpers/open-data.js';

const FLIGHTS = vegaDataFile('flights-3m.parquet');
const config = parseConfigText(flightsParquetConfigText(), '/virtual/flights.yaml');

const question = (template: 'series' | 'growth_series', grain: 'day' | 'week' | 'month', start: string): SubQuestion => ({
  id: `${template}-${grain}`,
  kind: 'trend',
  lens: 'time_pattern',
  template,
  metrics: ['flights'],
  grain,
  window: { start, end: '2001-08-01' },
  filters: [],
});

function seriesPoints(a: Answer): PeriodPoint[] {
  const f = a.findings.find((x) => x.type === 'series');
  if (!f || f.type !== 'series') throw new Error('no series');
  return f.points;
}

describe('a stray tail after the last full day (flights-3m.parquet)', () => {
  let ws: Workspace;
  const own = async (sql: string) => (await ws.source.run({ sql, params: [] }, { maxRows: 1000, timeoutMs: 120_000 })).rows;
  let days: { d: string; n: number }[];
  beforeAll(async () => {
    ws = await openWorkspace(config, 'flights', {}, new Date('2026-12-05T12:00:00Z'));
    days = (await own(`SELECT strftime(CAST(date AS DATE), '%Y-%m-%d') AS d, CAST(COUNT(*) AS DOUBLE) AS n FROM read_parquet('${FLIGHTS}') GROUP BY 1 ORDER BY 1`)).map((r) => ({ d: String(r.d), n: Number(r.n) }));
  }, 120_000);
  afterAll(async () => ws?.source.close());

  it('the file has a tail: its last day holds under 1% of a typical day (own SQL)', () => {
    const last = days[days.length - 1]!;
    const sorted = days.map((x) => x.n).sort((a, b) => a - b);
    const median = (sorted[(sorted.length - 1) >> 1]! + sorted[sorted.length >> 1]!) / 2;
    expect(last.d).toBe('2001-07-01');
    expect(last.n).toBeLessThan(0.01 * median);
    expect(days[days.length - 2]!.d).toBe('2001-06-30');
    expect(days[days.length - 2]!.n).toBeGreaterThan(0.5 * median);
    // The coverage ends on the last full day and keeps the tail's rows and dates.
    expect(ws.coverage.lastDate).toBe('2001-06-30');
    expect(ws.coverage.strayTail).toEqual({ firstDate: '2001-07-01', lastDate: '2001-07-01', rows: last.n, typicalDayRows: median });
    expect(ws.coverage.rows).toBe(days.reduce((s, x) => s + x.n, 0));
  });

  it('a daily series ends on 30 June: 1 July is no day of the series, and the mean a day is over the full days', async () => {
    const a = await answerSubQuestion(question('series', 'day', '2001-03-01'), ws);
    const points = seriesPoints(a);
    const want = days.filter((x) => x.d >= '2001-03-01' && x.d <= '2001-06-30');
    expect(want.length).toBe(122);
    expect(points.map((p) => p.period)).toEqual(want.map((x) => x.d));
    expect(points.every((p) => !p.partial)).toBe(true);
    const trough = a.findings.find((f) => f.type === 'trough');
    expect(trough && trough.type === 'trough' && trough.period).not.toBe('2001-07-01');
    const mean = points.reduce((s, p) => s + (p.value ?? 0), 0) / points.length;
    expect(mean).toBeCloseTo(want.reduce((s, x) => s + x.n, 0) / want.length, 6);
  }, 120_000);

  it('the week of 25 June is partial (covered 25 to 30 June), so the latest complete week is the one before', async () => {
    const a = await answerSubQuestion(question('series', 'week', '2001-01-01'), ws);
    const points = seriesPoints(a);
    const last = points[points.length - 1]!;
    expect(last).toMatchObject({ period: '2001-06-25', partial: true });
    expect(points.filter((p) => p.partial).map((p) => p.period)).toEqual(['2001-06-25']);
    expect(a.caveats.find((c) => c.code === 'partial_period' && c.data.period === '2001-06-25')?.data).toMatchObject({ coveredFrom: '2001-06-25', coveredTo: '2001-06-30' });
    // Partial weeks are left out of the high, the low and the outliers.
    const outliers = a.caveats.filter((c) => c.code === 'outlier');
    expect(JSON.stringify(outliers)).not.toContain('2001-06-25');
    const trough = a.findings.find((f) => f.type === 'trough');
    expect(trough && trough.type === 'trough' && trough.period).not.toBe('2001-06-25');
    // The week before is whole; its count is the file's own (own SQL).
    const [w] = await own(`SELECT CAST(COUNT(*) AS DOUBLE) AS n FROM read_parquet('${FLIGHTS}') WHERE date >= DATE '2001-06-18' AND date < DATE '2001-06-25'`);
    expect(points.find((p) => p.period === '2001-06-18')?.value).toBe(Number(w!.n));
  }, 120_000);

  it('growth by week: the latest complete week is the week of 18 June, not the tail week', async () => {
    const a = await answerSubQuestion(question('growth_series', 'week', '2001-01-01'), ws);
    const series = a.findings.find((f) => f.type === 'growth_series');
    if (!series || series.type !== 'growth_series') throw new Error('no growth series');
    const complete = series.points.filter((p) => !p.partial);
    expect(complete[complete.length - 1]!.period).toBe('2001-06-18');
  }, 120_000);

  it('the stale-data note dates the data to its last full day, as every answer does, not to the tail', async () => {
    const sq = question('series', 'month', '2001-01-01');
    const report = await checkQuality([sq], ws);
    // The raw last stamp is the tail's day (own SQL above); the note names the day before it.
    expect(report.lastDate).toBe(days[days.length - 1]!.d);
    const stale = qualityCaveatsFor(sq, report, ws, new Date('2026-12-05T12:00:00Z')).find((c) => c.code === 'stale_data');
    expect(stale?.data.lastDate).toBe(days[days.length - 2]!.d);
  }, 120_000);
});
