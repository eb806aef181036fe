// A named airport's share of all flights ("what percentage of flights leave from ORD") on
// vega-datasets' flights-3m.parquet (FAA on-time records, January to June 2001, as packaged by
// vega-datasets). Expected values come from this test's own SQL over the file (read_parquet in
// DuckDB, counts and ranks written here, not the project's query).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { segmentSharesWords } from '../../../analysis/captions/trend-segments-caption.js';
import { dimensionByName, metricByName } from '../../../analysis/catalog.js';
import type { SegmentSharesFinding } from '../../../analysis/findings/segments.js';
import type { LineSpec } from '../../../analysis/charts/spec.js';
import { definitionOf } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { parseConfigText } from '../../../config/load.js';
import { buildPlan } from '../../../bot/plan.js';
import { readRequest } from '../../../bot/reading/read-request.js';
import { flightsParquetConfigText, vegaDataFile } from '../../helpers/open-data.js';

const FLIGHTS = vegaDataFile('flights-3m.parquet');
const config = parseConfigText(
  `${flightsParquetConfigText([])}    dimensions:
      - { name: origin, label: Origin airport, column: origin, also_called: [origin, departure airport] }
`,
  '/virtual/flights.yaml',
);
const WINDOW = { start: '2001-01-01', end: '2001-07-01' };
const NOW = new Date('2026-12-05T12:00:00Z');
const focusOn = (value: string, extra: Partial<SubQuestion> = {}): SubQuestion => ({ id: 's', kind: 'trend', lens: 'distribution', template: 'segment_shares', metrics: ['flights'], dimension: 'origin', grain: 'month', window: WINDOW, filters: [], focus: { dimension: 'origin', value }, answersAsked: true, ...extra });

describe("a named airport's share of all flights (flights-3m.parquet)", () => {
  let ws: Workspace;
  const own = async (sql: string) => (await ws.source.run({ sql, params: [] }, { maxRows: 1000, timeoutMs: 120_000 })).rows;
  /** The test's own figures: the airport's flights, all flights, its rank (airports with more flights, plus one), the airports, and its share in January and June. */
  const expected = async (code: string) => {
    const sizes = await own(`SELECT origin, CAST(COUNT(*) AS DOUBLE) AS n FROM read_parquet('${FLIGHTS}') WHERE date >= DATE '2001-01-01' AND date < DATE '2001-07-01' GROUP BY origin`);
    const mine = Number(sizes.find((r) => r.origin === code)!.n);
    const total = sizes.reduce((a, r) => a + Number(r.n), 0);
    const months = await own(`SELECT month(date) AS m, CAST(SUM(CASE WHEN origin = '${code}' THEN 1 ELSE 0 END) AS DOUBLE) / COUNT(*) AS s FROM read_parquet('${FLIGHTS}') WHERE date >= DATE '2001-01-01' AND date < DATE '2001-07-01' GROUP BY 1 ORDER BY 1`);
    return { mine, total, rank: sizes.filter((r) => Number(r.n) > mine).length + 1, of: sizes.length, jan: Number(months[0]!.s), jun: Number(months[5]!.s), monthly: months.map((r) => Number(r.s)) };
  };
  /** The airport ranked `n`th by the test's own count (ties broken by code). */
  const nth = async (n: number) => String((await own(`SELECT origin FROM read_parquet('${FLIGHTS}') WHERE date >= DATE '2001-01-01' AND date < DATE '2001-07-01' GROUP BY origin ORDER BY COUNT(*) DESC, origin LIMIT 1 OFFSET ${n - 1}`))[0]!.origin);
  beforeAll(async () => {
    ws = await openWorkspace(config, 'flights', {}, NOW);
  }, 120_000);
  afterAll(async () => ws?.source.close());

  it('the largest airport: its share, rank, total and change in points match the SQL over the file', async () => {
    const code = await nth(1);
    const want = await expected(code);
    const a = await answerSubQuestion(focusOn(code), ws);
    const f = a.findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares')!;
    expect(f.focus!.value).toBe(want.mine);
    expect(f.focus!.total).toBe(want.total);
    expect(f.focus!.share).toBeCloseTo(want.mine / want.total, 12);
    expect(f.focus!.rank).toBe(want.rank);
    expect(f.focus!.of).toBe(want.of);
    expect(f.focus!.series.map((p) => p.share)).toEqual(want.monthly.map((s) => expect.closeTo(s, 12)));
    expect(f.focus!.change!.points).toBeCloseTo(want.jun - want.jan, 12);
    const words = segmentSharesWords(metricByName(ws.dataset, 'flights'), dimensionByName(ws.dataset, 'origin'), a.findings, 'managers', 'en-GB');
    // The caption leads with the airport, its share, the whole beside it and its rank; the change is in points, never a percent of a percent.
    expect(words.caption.startsWith(`${code} carried ${(100 * want.mine / want.total).toFixed(1)}% of all`)).toBe(true);
    expect(words.caption).toContain(`rank ${want.rank} of ${want.of} origin airports`);
    expect(words.caption).toContain(`${Math.abs(100 * (want.jun - want.jan)).toFixed(1)} pts from January 2001 to June 2001`);
    expect(words.caption).not.toMatch(/[+−-]\d+(?:\.\d+)?%/);
  }, 120_000);

  it('an airport far past the named eight: its rank comes from every airport, and the chart is its monthly share', async () => {
    const code = await nth(25);
    const want = await expected(code);
    const a = await answerSubQuestion(focusOn(code), ws);
    const f = a.findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares')!;
    expect(f.rows.some((r) => r.segment === code)).toBe(false);
    expect(f.focus!.rank).toBe(want.rank);
    expect(f.focus!.share).toBeCloseTo(want.mine / want.total, 12);
    const p = definitionOf(a.subQuestion).present(a, { dataset: ws.dataset, locale: 'en-GB', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: '2001-06-30' });
    const spec = p.chart as LineSpec;
    expect(spec.kind).toBe('line');
    expect(spec.points.map((x) => x.value)).toEqual(want.monthly.map((s) => expect.closeTo(s, 12)));
    expect(p.title.startsWith(code)).toBe(true);
  }, 120_000);

  it('read and planned: a share question keeps every airport in the total; a filter with no share words still filters', async () => {
    const facts = { dataset: ws.dataset, coverage: ws.coverage, values: ws.values };
    const share = readRequest('what percentage of flights leave from ORD', facts, { now: NOW });
    expect(share.questions[0]!.shareOf).toEqual({ dimension: 'origin', value: 'ORD' });
    expect(share.questions[0]!.filters).toEqual([]);
    expect(share.saidBack?.some((l) => l.includes('"ORD" read as the origin airport whose share of all flights is asked'))).toBe(true);
    const plan = buildPlan(share, ws.dataset, ws.coverage);
    expect(plan.items[0]).toMatchObject({ template: 'segment_shares', focus: { dimension: 'origin', value: 'ORD' }, filters: [] });
    // Regression: no share words, so ORD is a filter and every answer is ORD's own flights.
    const filtered = readRequest('how have flights from ORD moved by month', facts, { now: NOW });
    expect(filtered.questions[0]!.shareOf).toBeUndefined();
    expect(filtered.questions[0]!.filters).toEqual([{ dimension: 'origin', values: ['ORD'] }]);
    expect(buildPlan(filtered, ws.dataset, ws.coverage).items.every((i) => !i.focus && i.filters.some((x) => x.values.includes('ORD')))).toBe(true);
  }, 120_000);
});
