// The Pareto count (fewest segments, largest first, whose running share reaches 80%) on
// vega-datasets' flights-3m.parquet (FAA on-time records, January to June 2001, as packaged by
// vega-datasets): 229 origin airports, far more than the chart names, so the count lies inside the
// fold and must come from every segment. Expected values come from this test's own SQL over the
// file (read_parquet in DuckDB, window sums written here, not the project's query).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { segmentSharesWords } from '../../../analysis/captions/trend-segments-caption.js';
import { dimensionByName, metricByName } from '../../../analysis/catalog.js';
import type { SegmentSharesFinding } from '../../../analysis/findings/segments.js';
import type { ParetoSpec } from '../../../analysis/charts/spec.js';
import { renderChartWithGeometry } from '../../../analysis/charts/render.js';
import { definitionOf } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { parseConfigText } from '../../../config/load.js';
import { flightsParquetConfigText, vegaDataFile } from '../../helpers/open-data.js';

const FLIGHTS = vegaDataFile('flights-3m.parquet');
const config = parseConfigText(
  `${flightsParquetConfigText(['{ name: distance, label: Distance flown, sum: distance, unit: number, unit_label: miles, kind: flow }'])}    dimensions:
      - { name: origin, label: Origin airport, column: origin }
`,
  '/virtual/flights.yaml',
);
const WINDOW = { start: '2001-01-01', end: '2001-07-01' };
const shares = (metric: string, extra: Partial<SubQuestion> = {}): SubQuestion => ({ id: 's', kind: 'trend', lens: 'distribution', template: 'segment_shares', metrics: [metric], dimension: 'origin', grain: 'month', window: WINDOW, filters: [], ...extra });

describe('Pareto count over every origin airport (flights-3m.parquet)', () => {
  let ws: Workspace;
  const own = async (sql: string) => (await ws.source.run({ sql, params: [] }, { maxRows: 1000, timeoutMs: 120_000 })).rows;
  /** The test's own Pareto count: sizes by origin, largest first, the first rank whose running sum reaches 80%. */
  const expected = async (size: string, where = '') => {
    const rows = await own(`SELECT origin, CAST(${size} AS DOUBLE) AS v FROM read_parquet('${FLIGHTS}') WHERE date >= DATE '2001-01-01' AND date < DATE '2001-07-01' ${where} GROUP BY origin ORDER BY v DESC, origin`);
    const values = rows.map((r) => Number(r.v));
    const total = values.reduce((a, b) => a + b, 0);
    let run = 0;
    const k = values.findIndex((v) => (run += v) >= 0.8 * total) + 1;
    return { k, n: values.length, reached: values.slice(0, k).reduce((a, b) => a + b, 0) / total, top: rows.slice(0, 3).map((r) => String(r.origin)), topShares: values.slice(0, 3).map((v) => v / total) };
  };
  beforeAll(async () => {
    ws = await openWorkspace(config, 'flights', {}, new Date('2026-12-05T12:00:00Z'));
  }, 120_000);
  afterAll(async () => ws?.source.close());

  it('flights: the count lies past the named airports and matches the SQL over every airport', async () => {
    const want = await expected('COUNT(*)');
    const a = await answerSubQuestion(shares('flights'), ws);
    const f = a.findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares')!;
    // The check can fail: the count is past the 8 named airports, where the old reading gave none.
    expect(want.k).toBeGreaterThan(f.rows.filter((r) => !r.other).length);
    expect(f.countToThreshold).toBe(want.k);
    expect(f.segmentCount).toBe(want.n);
    expect(f.reachShare).toBeCloseTo(want.reached, 12);
    const words = segmentSharesWords(metricByName(ws.dataset, 'flights'), dimensionByName(ws.dataset, 'origin'), a.findings, 'managers', 'en-GB');
    const pct = (x: number) => `${(100 * x).toFixed(0)}%`;
    expect(words.title).toBe(`${want.k} of ${want.n} origin airports (${pct(want.k / want.n)}) carry 80% of flights`);
    // The top ones are named with their shares, and the 80% is said to be a convention.
    for (const [i, code] of want.top.entries()) expect(words.caption).toContain(`${code} (${(100 * want.topShares[i]!).toFixed(1)}%)`);
    expect(words.caption).toMatch(/rule of thumb/);
  }, 120_000);

  it('the Pareto chart reads at a glance: the named airports fill the plot, the fold is broken, the 80% line says the count', async () => {
    const want = await expected('COUNT(*)');
    const a = await answerSubQuestion(shares('flights'), ws);
    const p = definitionOf(a.subQuestion).present(a, { dataset: ws.dataset, locale: 'en-GB', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: '2001-06-30' });
    const spec = p.chart as ParetoSpec;
    expect(spec.kind).toBe('pareto');
    expect(spec.thresholdText).toBe(`80% of total: ${want.k} of ${want.n} origin airports`);
    const fold = spec.bars.find((b) => b.other)!;
    const largest = Math.max(...spec.bars.filter((b) => !b.other).map((b) => b.value));
    // The fold is many times the largest airport (the SQL's own count), so it is drawn broken.
    expect(fold.value).toBeGreaterThan(1.5 * largest);
    expect(spec.foldBroken).toBe(true);
    const { geometry } = await renderChartWithGeometry(spec);
    expect(geometry.valueAxis!.max).toBeLessThan(fold.value);
    const tallest = geometry.cells[0]!;
    // Before, the fold set the axis and the largest airport filled a thirteenth of the plot.
    expect((tallest.bottom - tallest.top) / (geometry.plot.bottom - geometry.plot.top)).toBeGreaterThan(0.6);
    expect(geometry.marks.some((m) => m.role === 'threshold-label')).toBe(true);
  }, 120_000);

  it('a sum (distance flown) and a filter: the count follows the filtered sizes', async () => {
    const want = await expected('SUM(distance)', `AND date >= DATE '2001-03-01' AND date < DATE '2001-04-01' AND origin <> 'ORD'`);
    const a = await answerSubQuestion(shares('distance', { window: { start: '2001-03-01', end: '2001-04-01' }, filters: [{ dimension: 'origin', values: ['ORD'], exclude: true }] }), ws);
    const f = a.findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares')!;
    expect(f.countToThreshold).toBe(want.k);
    expect(f.segmentCount).toBe(want.n);
    expect(f.reachShare).toBeCloseTo(want.reached, 9);
  }, 120_000);
});
