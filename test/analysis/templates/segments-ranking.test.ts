// "Worst 10", "best 5", "lowest 3": a ranking by the metric's value in the direction asked, not by
// size. Checked on vega-datasets' flights-20k.json (open data: 20,000 US flights of Q1 2001 with
// their delay in minutes). The expected rankings come from DuckDB SQL written in this file over the
// raw JSON file, never from the project's SQL; the same answers run on DuckDB (a database file made
// from the JSON) and on PostgreSQL (that table copied there), since the ranking SQL is compiled per
// dialect. A figure over few rows is not ranked (RANK_FLOOR: 1% of the rows, kept between 30 and
// 100, common practice), and the caption says so. kpi_by_segment names as many as asked too, and
// reads a filtered count of a period with rows but none matching as 0.
import { mkdtempSync, rmSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { KpiBySegmentFinding } from '../../../analysis/findings/kpi.js';
import type { SegmentSharesFinding } from '../../../analysis/findings/segments.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { parseConfigText } from '../../../config/load.js';
import { captionProblems } from '../../helpers/caption-checks.js';
import { copyDuckDbTableToPostgres, describeWithPostgres, dropSchema, onPostgres, uniqueName, withClient } from '../../helpers/postgres.js';

const require = createRequire(import.meta.url);
const FLIGHTS_JSON = join(dirname(dirname(require.resolve('vega-datasets'))), 'data', 'flights-20k.json');
const dir = mkdtempSync(join(tmpdir(), 'tc-ranking-'));
const DB = join(dir, 'flights.duckdb');

const config = () =>
  parseConfigText(
    `
version: 1
datasets:
  - name: flights
    label: Flights (vega-datasets)
    source: { kind: duckdb, path: ${JSON.stringify(DB)} }
    table: flights
    time_column: departed
    timezone: UTC
    metrics:
      - name: flights
        label: Flights
        count: rows
        unit: count
        kind: flow
      - name: avg_delay
        label: Average delay
        average: delay
        unit: number
        unit_label: min
        decimals: 1
        higher_is_better: false
        kind: ratio
      - name: late_share
        label: Share of flights late
        rate: {when: "delay > 15"}
        unit: percent
        higher_is_better: false
      - name: total_delay
        label: Total delay minutes
        sum: delay
        unit: number
        unit_label: min
        higher_is_better: false
        kind: flow
    dimensions:
      - name: origin
        label: Origin airport
        column: origin
      - name: destination
        label: Destination airport
        column: destination
`,
    join(dir, 'flights.yaml'),
  );

/** The reference: DuckDB over the raw JSON, with the ranking rule written out here. */
let reference: Awaited<ReturnType<DuckDBInstance['connect']>>;
let refInstance: DuckDBInstance;
async function truth(sql: string): Promise<Record<string, unknown>[]> {
  return (await reference.runAndReadAll(sql)).getRowObjectsJson() as Record<string, unknown>[];
}
const RAW = `read_json('${FLIGHTS_JSON.replaceAll("'", "''")}')`;

beforeAll(async () => {
  refInstance = await DuckDBInstance.create(':memory:');
  reference = await refInstance.connect();
  const file = await DuckDBInstance.create(DB);
  const c = await file.connect();
  await c.run(`CREATE TABLE flights AS SELECT strptime(date, '%Y/%m/%d %H:%M') AS departed, CAST(delay AS INTEGER) AS delay, CAST(distance AS INTEGER) AS distance, origin, destination FROM ${RAW}`);
  c.closeSync();
  file.closeSync();
});
afterAll(() => {
  reference?.closeSync();
  refInstance?.closeSync();
  rmSync(dir, { recursive: true, force: true });
});

const Q1 = { start: '2001-01-01', end: '2001-04-01' };
const question = (metric: string, dimension: string, extra: Partial<SubQuestion>): SubQuestion => ({
  id: 'r',
  kind: 'trend',
  lens: 'distribution',
  template: 'segment_shares',
  metrics: [metric],
  dimension,
  grain: 'month',
  window: Q1,
  filters: [],
  ...extra,
});

function checks(open: () => Promise<Workspace>): void {
  let ws: Workspace;
  beforeAll(async () => {
    ws = await open();
  });
  afterAll(async () => ws?.source.close());
  const present = async (sq: SubQuestion) => {
    const answer = await answerSubQuestion(sq, ws);
    const shown = SUB_QUESTIONS[sq.template].present(answer, { dataset: ws.dataset, locale: 'en-GB', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
    const f = answer.findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares')!;
    return { answer, shown, f, named: f.rows.filter((r) => !r.other) };
  };

  it('"share of late flights by destination, worst 10": the ten highest late shares among destinations with at least 100 flights', async () => {
    // 1% of 20,000 flights is 200, kept to at most 100. The newcomer's own check on this file
    // (report2.md, item 12) found SEA 32.2%, LGA 29.5%, SAN 29.2% at the head of the same list.
    const want = await truth(`SELECT destination, AVG(CASE WHEN delay > 15 THEN 1.0 ELSE 0.0 END) AS late, COUNT(*) AS n
      FROM ${RAW} GROUP BY destination HAVING COUNT(*) >= 100 ORDER BY late DESC, destination LIMIT 10`);
    const [{ thin }] = (await truth(`SELECT COUNT(*) AS thin FROM (SELECT destination FROM ${RAW} GROUP BY destination HAVING COUNT(*) < 100)`)) as [{ thin: string }];
    const { answer, shown, f, named } = await present(question('late_share', 'destination', { rankLimit: 10, rankOrder: 'worst' }));
    expect(named.map((r) => r.segment)).toEqual(want.map((w) => w.destination));
    for (const [i, r] of named.entries()) expect(r.value).toBeCloseTo(Number(want[i]!.late), 12);
    expect(want.slice(0, 3).map((w) => `${w.destination} ${(Number(w.late) * 100).toFixed(1)}%`)).toEqual(['SEA 32.2%', 'LGA 29.5%', 'SAN 29.2%']);
    expect(f.ranking).toMatchObject({ order: 'worst', descending: true, minRows: 100, thin: Number(thin) });
    expect(shown.title).toBe('Worst 10 destination airports by share of flights late: SEA, 32.2%');
    expect(shown.caption).toContain('Ranked highest first (a high value is worse for share of flights late): SEA 32.2%, LGA 29.5%, SAN 29.2%');
    expect(shown.caption).toContain(`Only destination airports with at least 100 flights are ranked`);
    expect(shown.caption).toContain(`${thin} destination airports with fewer are left out`);
    expect(shown.chart?.kind).toBe('bars');
    expect(captionProblems(answer, shown)).toEqual([]);
  });

  it('"best 5 origins by average delay": lower delay is better, so the five lowest means first', async () => {
    const want = await truth(`SELECT origin, AVG(delay) AS d FROM ${RAW} GROUP BY origin HAVING COUNT(*) >= 100 ORDER BY d ASC, origin LIMIT 5`);
    const { shown, f, named } = await present(question('avg_delay', 'origin', { rankLimit: 5, rankOrder: 'best' }));
    expect(named.map((r) => r.segment)).toEqual(want.map((w) => w.origin));
    expect(f.ranking?.descending).toBe(false);
    expect(shown.caption).toMatch(/^Ranked lowest first \(a high value is worse for average delay\)/);
    expect(shown.title).toContain(`Best 5 origin airports by average delay: ${want[0]!.origin}, ${Number(want[0]!.d).toFixed(1)}\u00a0min`);
  });

  it('"highest 3 origins by average delay" is literal, whatever the metric\'s better direction', async () => {
    const want = await truth(`SELECT origin FROM ${RAW} GROUP BY origin HAVING COUNT(*) >= 100 ORDER BY AVG(delay) DESC, origin LIMIT 3`);
    const { named } = await present(question('avg_delay', 'origin', { rankLimit: 3, rankOrder: 'highest' }));
    expect(named.map((r) => r.segment)).toEqual(want.map((w) => w.origin));
  });

  it('"lowest 5 origins by total delay minutes": a sum ranks by its value with no row floor, smallest first', async () => {
    const want = await truth(`SELECT origin, SUM(delay) AS s FROM ${RAW} GROUP BY origin ORDER BY s ASC, origin LIMIT 5`);
    const { answer, shown, f, named } = await present(question('total_delay', 'origin', { rankLimit: 5, rankOrder: 'lowest' }));
    expect(named.map((r) => r.segment)).toEqual(want.map((w) => w.origin));
    expect(f.ranking).toMatchObject({ order: 'lowest', descending: false, minRows: null, thin: 0 });
    expect(shown.caption).not.toMatch(/at least/);
    expect(captionProblems(answer, shown)).toEqual([]);
  });

  it('kpi_by_segment filtered to flights into TUS: an origin with flights in February but none to TUS reads 0 there, not a gap', async () => {
    const sq: SubQuestion = { ...question('flights', 'origin', {}), template: 'kpi_by_segment', kind: 'kpi', lens: 'breakdown', filters: [{ dimension: 'destination', values: ['TUS'] }] };
    const a = await answerSubQuestion(sq, ws);
    const f = a.findings.find((x): x is KpiBySegmentFinding => x.type === 'kpi_by_segment')!;
    expect(f.period).toBe('2001-03-01');
    const named = f.segments.filter((r) => !r.other);
    expect(named).toHaveLength(8);
    const feb = await truth(`SELECT origin, COUNT(*) FILTER (WHERE destination = 'TUS') AS tus, COUNT(*) AS all_flights
      FROM ${RAW} WHERE date >= '2001/02/01' AND date < '2001/03/01' GROUP BY origin`);
    const byOrigin = new Map(feb.map((r) => [String(r.origin), Number(r.tus)]));
    const zeros = named.filter((r) => byOrigin.get(String(r.key)) === 0);
    // The file has several such origins (counted by the SQL above); each reads 0, with no note of a gap.
    expect(zeros.length).toBeGreaterThan(0);
    for (const r of named) expect(r.previous?.value ?? null).toBe(byOrigin.has(String(r.key)) ? byOrigin.get(String(r.key))! : null);
    const [{ n }] = (await truth(`SELECT COUNT(*) AS n FROM ${RAW} WHERE destination = 'TUS' AND date >= '2001/03/01' AND date < '2001/04/01'`)) as [{ n: string }];
    expect(f.total.value).toBe(Number(n));
  });

  it('kpi_by_segment names as many segments as asked ("top 12")', async () => {
    const a = await answerSubQuestion({ ...question('flights', 'origin', { rankLimit: 12 }), template: 'kpi_by_segment', kind: 'kpi', lens: 'breakdown' }, ws);
    const f = a.findings.find((x): x is KpiBySegmentFinding => x.type === 'kpi_by_segment')!;
    expect(f.segments.filter((r) => !r.other)).toHaveLength(12);
    expect(f.topN).toBe(12);
  });

  it('without a direction, "top 5" of an average names the highest values, not the busiest (one ranking rule)', async () => {
    // The floor is the same as a ranking asked by value: 100 flights here (1% of 20,000, kept to at most 100).
    const want = await truth(`SELECT origin, AVG(delay) AS d FROM ${RAW} GROUP BY origin HAVING COUNT(*) >= 100 ORDER BY d DESC, origin LIMIT 5`);
    const busiest = await truth(`SELECT origin FROM ${RAW} GROUP BY origin ORDER BY COUNT(*) DESC, origin LIMIT 5`);
    const { answer, named, f } = await present(question('avg_delay', 'origin', { rankLimit: 5 }));
    expect(named.map((r) => r.segment)).toEqual(want.map((w) => w.origin));
    for (const [i, r] of named.entries()) expect(r.value).toBeCloseTo(Number(want[i]!.d), 9);
    expect(named.map((r) => r.segment)).not.toEqual(busiest.map((w) => w.origin));
    expect(f.ranking).toBeUndefined();
    // The fold holds lower averages and thin origins, each said as such.
    const folded = answer.caveats.filter((c) => c.code === 'segments_folded');
    expect(folded).toContainEqual({ code: 'segments_folded', data: expect.objectContaining({ folded: 'lower' }) });
    expect(folded).toContainEqual({ code: 'segments_folded', data: expect.objectContaining({ minRows: 100 }) });
  });
}

describe('rankings by value on DuckDB', () => {
  checks(() => openWorkspace(config()));
});

describeWithPostgres('rankings by value on PostgreSQL (the table copied from DuckDB)', (adminUrl) => {
  const schema = uniqueName('tc_rank');
  checks(async () => {
    await withClient(adminUrl, (c) => c.query(`CREATE SCHEMA ${schema}`));
    await copyDuckDbTableToPostgres({ duckdbPath: DB, table: 'flights', url: adminUrl, schema });
    return openWorkspace(onPostgres(config(), 'TC_RANK_URL', schema), undefined, { TC_RANK_URL: adminUrl });
  });
  afterAll(async () => dropSchema(adminUrl, schema));
});
