// One shared scan per run: sub-questions whose numbers are sums and counts read one rollup of
// the table (day x the run's dimensions, with each metric's additive pieces) instead of the table.
// Checked on the generated demo (invented data) in DuckDB against the same questions read from the
// table, which is the reference: every result table and finding must agree within 1e-9 relative
// (sums are re-added in another order; see test/helpers/template-cases.ts). PostgreSQL runs the
// shown statements in test/analysis/cross-engine.test.ts.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import { covers, rollupNeeds, runRollup } from '../../analysis/rollup/eligibility.js';
import { isAdditive, metricByName } from '../../analysis/catalog.js';
import { SUB_QUESTIONS, TEMPLATE_NAMES } from '../../analysis/sub-questions/registry.js';
import { compileRollup, executedStatements, ROLLUP_NOTE, rollupTable, sharedScanQuery, withRollup } from '../../analysis/rollup/rollup.js';
import { seriesTemplate } from '../../analysis/templates/series.js';
import { openRunScope } from '../../analysis/run-scope.js';
import type { SubQuestion } from '../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { loadConfig } from '../../config/load.js';
import { demoFixture } from '../helpers/demo-fixture.js';
import { CASES, compareAnswers, FULL, SUMMER_2024 } from '../helpers/template-cases.js';

let ws: Workspace;

beforeAll(async () => {
  const demo = await demoFixture();
  ws = await openWorkspace(loadConfig(demo.configPath));
});
afterAll(async () => {
  await ws?.source.close();
});

const q = (over: Partial<SubQuestion> & Pick<SubQuestion, 'template' | 'kind' | 'lens'>): SubQuestion => ({
  id: `${over.template}-${over.metrics?.join('-') ?? 'revenue'}-${over.dimension ?? ''}-${over.filters?.length ?? 0}`,
  metrics: ['revenue'],
  grain: 'month',
  window: FULL,
  filters: [],
  ...over,
});

/** Beyond the per-template cases: every additive metric type, filters, other grains and a short window. */
const MORE: SubQuestion[] = [
  q({ template: 'series', kind: 'trend', lens: 'time_pattern', metrics: ['bookings', 'average_fare', 'refunded_revenue_share'], grain: 'week' }),
  q({ template: 'series', kind: 'trend', lens: 'time_pattern', metrics: ['revenue', 'refund_rate'], grain: 'day', window: { start: '2024-07-01', end: '2024-08-01' }, filters: [{ dimension: 'route', values: ['Skerry Main', 'no such route'] }] }),
  q({ template: 'segment_trend', kind: 'trend', lens: 'breakdown', metrics: ['average_fare'], dimension: 'route', grain: 'month' }),
  q({ template: 'segment_shares', kind: 'trend', lens: 'distribution', metrics: ['bookings'], dimension: 'channel', filters: [{ dimension: 'fare_class', values: ['foot'] }] }),
  q({ template: 'growth_drivers', kind: 'growth', lens: 'breakdown', metrics: ['refund_rate'], dimension: 'route', window: SUMMER_2024 }),
  q({ template: 'kpi_snapshot', kind: 'kpi', lens: 'time_pattern', metrics: ['revenue', 'bookings', 'average_fare'], grain: 'quarter' }),
  q({ template: 'kpi_mix', kind: 'kpi', lens: 'distribution', metrics: ['average_fare'], dimension: 'channel' }),
  q({ template: 'kpi_by_segment', kind: 'kpi', lens: 'breakdown', metrics: ['refund_rate'], dimension: 'fare_class' }),
  q({ template: 'growth_series', kind: 'growth', lens: 'time_pattern', metrics: ['passengers'], window: { start: '2030-01-01', end: '2030-07-01' } }),
  // Bookings per group and period are sums of counts; the demo plan's before/after series.
  q({ template: 'performance_before_after', kind: 'performance', lens: 'time_pattern', comparisonGroup: 'skerrypass', metrics: ['bookings'] }),
  q({ template: 'performance_before_after', kind: 'performance', lens: 'time_pattern', comparisonGroup: 'skerrypass', metrics: ['bookings'], grain: 'quarter', filters: [{ dimension: 'channel', values: ['web'] }] }),
  // Group comparisons from counts, sums and sums of squares per day: a mean (money: the before/after
  // series has no median), a share, a ratio, a per-row mean of a sum, and a mean that is not money.
  q({ template: 'performance_before_after', kind: 'performance', lens: 'time_pattern', comparisonGroup: 'skerrypass', metrics: ['average_fare'], grain: 'quarter' }),
  q({ template: 'performance_before_after', kind: 'performance', lens: 'time_pattern', comparisonGroup: 'skerrypass', metrics: ['refund_rate'] }),
  q({ template: 'performance_compare', kind: 'performance', lens: 'summary', comparisonGroup: 'skerrypass', metrics: ['fare_per_passenger'], window: SUMMER_2024 }),
  q({ template: 'performance_compare', kind: 'performance', lens: 'summary', comparisonGroup: 'skerrypass', metrics: ['passengers'] }),
  q({ template: 'performance_by_segment', kind: 'performance', lens: 'breakdown', comparisonGroup: 'skerrypass', metrics: ['refund_rate'], dimension: 'channel', filters: [{ dimension: 'fare_class', values: ['foot', 'car'] }] }),
];

const ALL = [...CASES, ...MORE];

/** Templates that declare they read the rollup whatever the metric (a plain count's before/after series reads it too). */
const ROLLUP_TEMPLATES = new Set(TEMPLATE_NAMES.filter((n) => { const use = SUB_QUESTIONS[n].rollup; return !!use && !use.when; }));

describe('which sub-questions read the rollup', () => {
  it('lists only templates whose numbers are sums and counts, and never a distinct count', () => {
    const ds = ws.dataset;
    for (const sq of ALL) {
      const need = rollupNeeds(sq, ds);
      // Group comparisons of rows (not frequencies) read the rollup's moments; two values' sums or counts against each other read it too.
      const comparison = sq.template.startsWith('performance_') && sq.template !== 'performance_frequency';
      const valuesAdditive = sq.template === 'value_compare' && isAdditive(metricByName(ds, sq.metrics[0]!));
      if (!ROLLUP_TEMPLATES.has(sq.template) && !comparison && !valuesAdditive) expect(need).toBeNull();
      if (valuesAdditive) expect(need).not.toBeNull();
      if (sq.metrics.includes('customers')) expect(need).toBeNull();
    }
    expect([...ROLLUP_TEMPLATES].some((t) => t.startsWith('performance'))).toBe(false);
    // Every sum-and-count template of the trend, growth and KPI families, and the period table.
    expect([...ROLLUP_TEMPLATES].sort()).toEqual(
      ['series', 'trend_test', 'trend_summary', 'trend_seasonality', 'segment_trend', 'segment_shares', 'growth_series', 'growth_summary', 'growth_drivers', 'growth_share_shift', 'kpi_snapshot', 'kpi_context', 'kpi_by_segment', 'kpi_mix', 'period_table'].sort(),
    );
    // Means, shares and ratios compared between groups add up from the days' moments; the
    // summary of money compared as a mean also gives its median, which needs each row, and
    // frequencies are per customer.
    const group = { kind: 'performance' as const, comparisonGroup: 'skerrypass' };
    for (const metric of ['average_fare', 'refund_rate', 'fare_per_passenger']) {
      expect(rollupNeeds(q({ ...group, template: 'performance_before_after', lens: 'time_pattern', metrics: [metric] }), ds)?.moments).toEqual([metric]);
    }
    // A sum or a count before and after a launch is compared per customer (performance-unit-did.ts): the rollup has no customer key.
    for (const metric of ['revenue', 'bookings']) {
      expect(rollupNeeds(q({ ...group, template: 'performance_before_after', lens: 'time_pattern', metrics: [metric] }), ds)).toBeNull();
    }
    for (const metric of ['average_fare', 'revenue']) {
      expect(rollupNeeds(q({ ...group, template: 'performance_compare', lens: 'summary', metrics: [metric] }), ds)).toBeNull();
      expect(rollupNeeds(q({ ...group, template: 'performance_by_segment', lens: 'breakdown', dimension: 'route', metrics: [metric] }), ds)).toBeNull();
    }
    for (const metric of ['refund_rate', 'fare_per_passenger', 'passengers']) expect(rollupNeeds(q({ ...group, template: 'performance_compare', lens: 'summary', metrics: [metric] }), ds)).not.toBeNull();
    expect(rollupNeeds(q({ ...group, template: 'performance_frequency', lens: 'distribution', metrics: ['bookings'] }), ds)).toBeNull();
    // A breakdown by personal data is refused by its template, not folded into a rollup.
    expect(rollupNeeds(q({ template: 'segment_shares', kind: 'trend', lens: 'distribution', dimension: 'customer_email' }), ds)).toBeNull();
  });

  it('makes one rollup per run from the union of what its sub-questions need, and only for two or more readers', () => {
    const ds = ws.dataset;
    const shape = runRollup(ALL, ds)!;
    expect(shape.columns).toEqual(['channel', 'fare_class', 'pass_holder', 'route'].filter((c) => shape.columns.includes(c)));
    expect(shape.columns).toEqual(expect.arrayContaining(['channel', 'fare_class', 'route']));
    for (const sq of ALL) {
      const need = rollupNeeds(sq, ds);
      if (need) expect(covers(shape, need)).toBe(true);
    }
    const one = ALL.filter((sq) => sq.template === 'series').slice(0, 1);
    expect(runRollup(one, ds, 2)).toBeNull();
    expect(openRunScope(one, ws).rollup).toBeNull();
    expect(openRunScope(ALL, ws, { sharedScan: false }).rollup).toBeNull();
  });
});

describe('the order a run starts its sub-questions in', () => {
  it('starts the table scans first, then the rollup readers, each in plan order', () => {
    const scope = openRunScope(ALL, ws);
    const order = scope.startOrder(ALL);
    expect([...order].sort((a, b) => a - b)).toEqual(ALL.map((_, i) => i));
    const reads = (i: number) => rollupNeeds(ALL[i]!, ws.dataset) !== null;
    const firstReader = order.findIndex(reads);
    expect(firstReader).toBeGreaterThan(0);
    expect(order.slice(0, firstReader).every((i) => !reads(i))).toBe(true);
    expect(order.slice(firstReader).every(reads)).toBe(true);
    for (const part of [order.slice(0, firstReader), order.slice(firstReader)]) expect(part).toEqual([...part].sort((a, b) => a - b));
    // Without a rollup every sub-question reads the table: plan order.
    expect(openRunScope(ALL, ws, { sharedScan: false }).startOrder(ALL)).toEqual(ALL.map((_, i) => i));
  });
});

describe('answers over the rollup equal answers read from the table', () => {
  let scope: ReturnType<typeof openRunScope>;
  beforeAll(() => {
    scope = openRunScope(ALL, ws);
  });

  it('has cases for every template that reads the rollup', () => {
    expect(new Set(ALL.filter((sq) => rollupNeeds(sq, ws.dataset)).map((sq) => sq.template))).toEqual(
      new Set([...ROLLUP_TEMPLATES, 'performance_before_after', 'performance_compare', 'performance_by_segment', 'value_compare']),
    );
  });

  for (const [i, sq] of ALL.entries()) {
    it(`${i}: ${sq.template} ${sq.metrics.join(', ')}${sq.dimension ? ` by ${sq.dimension}` : ''}${sq.filters.length ? ' (filtered)' : ''} at ${sq.grain}`, async () => {
      // The reference: every number read from the table's rows.
      const raw = await answerSubQuestion(sq, ws, { scope: openRunScope([sq], ws, { readTable: true }) });
      // Over the run's shared rollup (stored once by DuckDB), and over a day-level rollup of the
      // sub-question's own shape and dates (what a run without a shared rollup, and PostgreSQL, runs).
      const rolled = await answerSubQuestion(sq, ws, { scope });
      const own = await answerSubQuestion(sq, ws);
      const reads = rollupNeeds(sq, ws.dataset) !== null;
      // A median over rows (trend_summary's row_stats) reads the rows themselves on every path.
      const rowsRead = (qs: typeof raw.queries) => qs.filter((x) => x.readsRows);
      for (const side of [raw, rolled, own]) expect(rowsRead(side.queries).every((x) => !x.scan && !x.sql.includes('tc_rollup'))).toBe(true);
      const summed = (qs: typeof raw.queries) => qs.filter((x) => !x.readsRows);
      expect(summed(rolled.queries).every((x) => !!x.scan === reads)).toBe(true);
      expect(raw.queries.every((x) => !x.scan && !x.sql.includes('tc_rollup'))).toBe(true);
      expect(summed(own.queries).every((x) => !x.scan && x.sql.includes('tc_rollup') === reads)).toBe(true);
      expect(compareAnswers(raw, rolled)).toEqual([]);
      expect(compareAnswers(raw, own)).toEqual([]);
      if (reads) {
        // The statement shown is runnable as it stands and gives the same table as what ran.
        for (const shown of summed(rolled.queries)) {
          const direct = await ws.source.run({ sql: shown.sql, params: shown.params }, ws.runOptions);
          expect(compareAnswers({ ...raw, tables: { t: direct } }, { ...raw, tables: { t: rolled.tables[shown.name]! } })).toEqual([]);
          expect(shown.sql.startsWith(`${ROLLUP_NOTE}\nWITH tc_rollup AS (`)).toBe(true);
          expect(shown.sql).toContain('FROM "bookings"');
        }
        // Each day-level rollup reads only the dates its query reads: a range on the time column.
        // A growth comparison by segment also reads each segment's first and last day in the whole
        // table (tc_life: like for like is judged on the whole table), so its rollup reads every date.
        for (const shown of summed(own.queries)) {
          expect(shown.sql).toMatch(
            shown.sql.includes('tc_life AS (')
              ? /FROM "bookings"\n\s*GROUP BY/
              : /FROM "bookings"\n\s*WHERE "sail_date" >= CAST\(\$\d+ AS DATE\) AND "sail_date" < CAST\(\$\d+ AS DATE\)\n\s*GROUP BY/,
          );
        }
      }
    }, 60_000);
  }

  it('stores the run\'s rollup once in the engine\'s memory catalog, never in the data file', async () => {
    const stored = await ws.source.run({ sql: "SELECT table_name FROM duckdb_tables() WHERE database_name = 'memory' AND table_name LIKE 'tc_rollup_%'", params: [] }, ws.runOptions);
    expect(stored.rows.length).toBe(1);
    const data = await ws.source.run({ sql: "SELECT COUNT(*) AS n FROM duckdb_tables() WHERE database_name <> 'memory'", params: [] }, ws.runOptions);
    expect(data.rows[0]!.n).toBe(1);
  });
});

describe('the statements DuckDB runs', () => {
  it('store each distinct rollup once, before its first reader, and read the stored copy after', () => {
    const ctx = { ...ws.context, coverage: ws.coverage };
    const shape = runRollup(ALL, ws.dataset)!;
    const rollup = compileRollup(ctx, shape);
    const queries = [
      { sql: 'SELECT 1', params: [] },
      { sql: 'WITH tc_rollup AS (...) SELECT 2', params: [], scan: { key: 'k1', rollup, body: { sql: 'SELECT 2 FROM tc_rollup', params: [] } } },
      { sql: 'WITH tc_rollup AS (...) SELECT 3', params: [], scan: { key: 'k1', rollup, body: { sql: 'SELECT 3 FROM tc_rollup', params: [] } } },
    ];
    const out = executedStatements(queries);
    expect(out.map((s) => s.sql.split('\n')[0])).toEqual([
      'SELECT 1',
      `CREATE TABLE ${rollupTable('k1')} AS`,
      `WITH tc_rollup AS (`,
      `WITH tc_rollup AS (`,
    ]);
    expect(out[2]!.sql).toContain(`SELECT * FROM ${rollupTable('k1')}`);
  });

  it('merge the rollup into a query\'s own WITH list', () => {
    expect(withRollup('SELECT 1 AS x', 'WITH a AS (SELECT x FROM tc_rollup) SELECT * FROM a')).toBe('WITH tc_rollup AS (\n  SELECT 1 AS x\n),\na AS (SELECT x FROM tc_rollup) SELECT * FROM a');
    expect(withRollup('SELECT 1 AS x', 'SELECT x FROM tc_rollup')).toBe('WITH tc_rollup AS (\n  SELECT 1 AS x\n)\nSELECT x FROM tc_rollup');
  });

  it('number the rollup\'s parameters after the query\'s own in the statement shown', async () => {
    // A metric whose filter has a value to bind (the demo catalog's filters have none).
    const phone = { name: 'phone_revenue', label: 'Phone revenue', synonyms: [], definition: { type: 'sum' as const, column: 'fare_total', where: { column: 'channel', op: 'eq' as const, value: 'phone' } }, unit: 'currency' as const, currency: 'EUR', higher_is_better: true };
    const dataset = { ...ws.dataset, metrics: [...ws.dataset.metrics, phone] };
    const ctx = { ...ws.context, dataset, coverage: ws.coverage };
    const sq = q({ template: 'series', kind: 'trend', lens: 'time_pattern', metrics: ['phone_revenue', 'revenue'] });
    const shape = rollupNeeds(sq, dataset)!;
    const body = seriesTemplate.compile(sq, { ...ctx, rollup: shape })[0]!;
    const shown = sharedScanQuery(ctx, shape, body);
    expect(body.params).toEqual([FULL.start, FULL.end]);
    expect(shown.params).toEqual([FULL.start, FULL.end, 'phone']);
    expect(shown.sql).toContain('"channel" = $3');
    expect(shown.scan.rollup.sql).toContain('"channel" = $1');
    // Run as shown, and as DuckDB runs it, on the demo file: the same rows, phone revenue below revenue.
    const a = await ws.source.run({ sql: shown.sql, params: shown.params }, ws.runOptions);
    const b = await ws.source.run(shown, ws.runOptions);
    expect(a.rows).toEqual(b.rows);
    expect(a.rows.length).toBeGreaterThan(12);
    for (const r of a.rows) expect(Number(r.phone_revenue)).toBeLessThan(Number(r.revenue));
  });
});
