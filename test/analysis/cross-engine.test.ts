// The same demo data (invented Skerrywake bookings) in two independent engines, DuckDB and
// PostgreSQL, and every template asked a representative sub-question on both through
// answerSubQuestion. The two engines share no code below the SQL text, so their agreeing on every
// result table and every finding checks both the portability of the SQL and each engine's answer.
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import { openRunScope } from '../../analysis/run-scope.js';
import { SUB_QUESTIONS, TEMPLATE_NAMES } from '../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { loadConfig, parseConfigText } from '../../config/load.js';
import { demoFixture } from '../helpers/demo-fixture.js';
import { CASES, compareAnswers, differences } from '../helpers/template-cases.js';
import { copyDuckDbTableToPostgres, copyDuckDbTableToShards, createReaderRole, describeWithPostgres, describeWithShardedPostgres, dropSchema, dropShardedSchema, onPostgres, uniqueName, withClient } from '../helpers/postgres.js';
import { explain, foreignScans, rowFetchingScans } from '../helpers/remote-plan.js';
import { compileCoverage } from '../../analysis/coverage.js';
import { catalogColumns, compileQualityChecks, DUPLICATES_QUERY } from '../../analysis/quality/quality-checks.js';

it('covers every template in the registry', () => {
  expect([...new Set(CASES.map((c) => c.template))].sort()).toEqual([...TEMPLATE_NAMES].sort());
});

it('compares numbers within the stated tolerance and nothing looser', () => {
  const out: string[] = [];
  differences({ x: [1, 'a', null] }, { x: [1 + 1e-12, 'a', null] }, 'ok', out);
  expect(out).toEqual([]);
  differences({ x: 100 }, { x: 100 * (1 + 1e-7) }, 'far', out);
  differences({ x: 'a' }, { x: 'b' }, 'text', out);
  differences([1, 2], [1], 'length', out);
  expect(out).toHaveLength(3);
});

describeWithPostgres('DuckDB and PostgreSQL agree on every template', (adminUrl) => {
  const schema = uniqueName('tc_cross');
  const urlEnv = 'TC_CROSS_ENGINE_URL';
  let duck: Workspace;
  let post: Workspace;
  let role: string | undefined;
  let loadedRows = 0;
  let fixtureRows = 0;

  beforeAll(async () => {
    const demo = await demoFixture();
    fixtureRows = demo.rows;
    loadedRows = (await copyDuckDbTableToPostgres({ duckdbPath: demo.databasePath, table: 'bookings', url: adminUrl, schema })).rows;
    // Read through a SELECT-only role, as a warehouse would grant it.
    const reader = await createReaderRole(adminUrl, schema);
    role = reader.role;
    const config = loadConfig(demo.configPath);
    duck = await openWorkspace(config);
    post = await openWorkspace(onPostgres(config, urlEnv, schema), undefined, { [urlEnv]: reader.url });
  }, 180_000);

  afterAll(async () => {
    await duck?.source.close();
    await post?.source.close();
    await dropSchema(adminUrl, schema, role ? [role] : []);
  });

  it('loads every demo row and sees the same coverage in both engines', () => {
    expect(loadedRows).toBe(fixtureRows);
    expect(post.source.dialect.name).toBe('postgres');
    expect(duck.source.dialect.name).toBe('duckdb');
    expect(post.context.timeColumnType).toBe(duck.context.timeColumnType);
    expect(post.coverage).toEqual(duck.coverage);
  });

  for (const sq of CASES) {
    const label = `${sq.template}: ${sq.metrics.join(', ')}${sq.dimension ? ` by ${sq.dimension}` : ''}${sq.filters.length ? ' (filtered)' : ''}`;
    it(label, async () => {
      const [d, p] = await Promise.all([answerSubQuestion(sq, duck), answerSubQuestion(sq, post)]);
      // The answer must say something: a template that found nothing on both engines proves little.
      expect(d.findings.length).toBeGreaterThan(0);
      expect(Object.values(d.tables).some((t) => t.rows.length > 0)).toBe(true);
      expect(p.queries.map((q) => q.name)).toEqual(d.queries.map((q) => q.name));
      expect(compareAnswers(d, p)).toEqual([]);
    }, 60_000);
  }

  // The same questions over one rollup for all of them: DuckDB reads its stored copy, PostgreSQL
  // runs the statement as shown (the rollup as a CTE). Both must give the table-read answers.
  const countBeforeAfter: SubQuestion = { ...CASES.find((c) => c.template === 'performance_before_after')!, metrics: ['bookings'] };
  const rolled = [...CASES.filter((sq) => { const use = SUB_QUESTIONS[sq.template].rollup; return !!use && !use.when; }), countBeforeAfter];
  for (const sq of rolled) {
    it(`over the run's rollup: ${sq.template}: ${sq.metrics.join(', ')}`, async () => {
      const [dScope, pScope] = [openRunScope(rolled, duck), openRunScope(rolled, post)];
      // The reference reads every number from the table's rows.
      const reference = openRunScope([sq], duck, { readTable: true });
      const [raw, d, p] = await Promise.all([answerSubQuestion(sq, duck, { scope: reference }), answerSubQuestion(sq, duck, { scope: dScope }), answerSubQuestion(sq, post, { scope: pScope })]);
      // A before/after per customer (performance-unit-did.ts) reads the rows: the rollup has no customer key.
      const readsRollup = !sq.metrics.includes('customers') && (SUB_QUESTIONS[sq.template].rollup?.when?.(sq, duck.dataset) ?? true);
      // A median over rows (trend_summary's row_stats) reads the rows themselves, never the rollup.
      expect(d.queries.every((q) => (q.readsRows ? !q.scan : !!q.scan === readsRollup))).toBe(true);
      expect(p.queries.every((q) => (q.readsRows ? !q.scan : !!q.scan === readsRollup))).toBe(true);
      expect(compareAnswers(raw, d)).toEqual([]);
      expect(compareAnswers(raw, p)).toEqual([]);
    }, 60_000);
  }
});

// ---- a sharded PostgreSQL -------------------------------------------------------------------------
// The coordinator's bookings is range-partitioned by sail_date into yearly partitions, each a
// postgres_fdw foreign table on one of two shard servers (.ci/postgres.sh). Every template must
// agree with DuckDB there too; and the statements that sum by day (every rollup statement, the
// coverage and the quality counts) must be aggregated on the shards: EXPLAIN (VERBOSE) shows each
// foreign scan's remote SQL with its GROUP BY, so the coordinator fetches aggregated rows only.

const YEARS = ['2023-01-01', '2024-01-01', '2025-01-01'];

describeWithShardedPostgres('DuckDB and a sharded PostgreSQL agree on every template, and the shards aggregate', (servers) => {
  const schema = uniqueName('tc_shard');
  const urlEnv = 'TC_SHARDED_URL';
  let duck: Workspace;
  let sharded: Workspace;
  let role: string | undefined;
  let loaded: Awaited<ReturnType<typeof copyDuckDbTableToShards>>;
  let fixtureRows = 0;

  beforeAll(async () => {
    const demo = await demoFixture();
    fixtureRows = demo.rows;
    loaded = await copyDuckDbTableToShards({ duckdbPath: demo.databasePath, table: 'bookings', servers, schema, partitionColumn: 'sail_date', boundaries: YEARS });
    // Read through a SELECT-only role on the coordinator; it reaches the shards as their own read-only role.
    const reader = await createReaderRole(servers.coordinatorUrl, schema);
    role = reader.role;
    const config = loadConfig(demo.configPath);
    duck = await openWorkspace(config);
    sharded = await openWorkspace(onPostgres(config, urlEnv, schema), undefined, { [urlEnv]: reader.url });
  }, 300_000);

  afterAll(async () => {
    await duck?.source.close();
    await sharded?.source.close();
    await dropShardedSchema(servers, schema, role ? [role] : []);
  });

  it('loads every demo row into partitions on both shards and sees the same coverage', () => {
    expect(loaded.rows).toBe(fixtureRows);
    expect(new Set(loaded.partitions.map((p) => p.server)).size).toBe(servers.shards.length);
    expect(sharded.coverage).toEqual(duck.coverage);
  });

  for (const sq of CASES) {
    it(`${sq.template}: ${sq.metrics.join(', ')}${sq.dimension ? ` by ${sq.dimension}` : ''}${sq.filters.length ? ' (filtered)' : ''}`, async () => {
      const [d, p] = await Promise.all([answerSubQuestion(sq, duck), answerSubQuestion(sq, sharded)]);
      expect(Object.values(d.tables).some((t) => t.rows.length > 0)).toBe(true);
      expect(compareAnswers(d, p)).toEqual([]);
      // Every statement that sums by day is summed on the shards.
      for (const q of p.queries.filter((x) => x.sql.includes('tc_rollup'))) {
        const scans = foreignScans(await explain(sharded.source, q, sharded.runOptions));
        expect(scans.length, q.name).toBeGreaterThan(0);
        expect(rowFetchingScans(scans), `${sq.template} ${q.name}`).toEqual([]);
      }
    }, 120_000);
  }

  it('aggregates the coverage and the quality counts on the shards, and samples repeated keys there', async () => {
    const ctx = sharded.context;
    const statements = [{ name: 'coverage', ...compileCoverage(ctx) }, ...compileQualityChecks(ctx, [...catalogColumns(sharded.dataset)], { duplicates: 'sampled' })];
    for (const q of statements) {
      const scans = foreignScans(await explain(sharded.source, q, sharded.runOptions));
      expect(scans).toHaveLength(loaded.partitions.length);
      if (q.name === DUPLICATES_QUERY) {
        // Repeated keys group by the key, which no shard holds whole: each shard sends only its
        // sampled keys (the sample's condition runs there), not every row.
        for (const s of scans) expect(s.remoteSql).toMatch(/md5\(\(?"?booking_id"?/);
        continue;
      }
      expect(rowFetchingScans(scans), q.name).toEqual([]);
    }
  });

  it('fails a statement that tests a flag with IS TRUE or filters periods with date_trunc: those reach the coordinator as rows', async () => {
    const sq = CASES.find((c) => c.template === 'kpi_context')!; // refund rate: a flag, by month
    const [shown] = (await answerSubQuestion(sq, sharded)).queries;
    expect(rowFetchingScans(foreignScans(await explain(sharded.source, shown!, sharded.runOptions)))).toEqual([]);
    const isTrue = { ...shown!, sql: shown!.sql.replace('FILTER (WHERE "refunded")', 'FILTER (WHERE "refunded" IS TRUE)') };
    expect(isTrue.sql).not.toBe(shown!.sql);
    expect(rowFetchingScans(foreignScans(await explain(sharded.source, isTrue, sharded.runOptions))).length).toBeGreaterThan(0);
    // The day-level rollup filtered by the month it falls in rather than by a date range.
    const truncated = {
      ...shown!,
      sql: shown!.sql.replace(
        /WHERE "sail_date" >= CAST\((\$\d+) AS DATE\) AND "sail_date" < CAST\((\$\d+) AS DATE\)\n(\s*)GROUP BY/,
        `WHERE CAST(date_trunc('month', CAST("sail_date" AS TIMESTAMP)) AS DATE) >= CAST($1 AS DATE) AND CAST(date_trunc('month', CAST("sail_date" AS TIMESTAMP)) AS DATE) < CAST($2 AS DATE)\n$3GROUP BY`,
      ),
    };
    expect(truncated.sql).not.toBe(shown!.sql);
    expect(rowFetchingScans(foreignScans(await explain(sharded.source, truncated, sharded.runOptions))).length).toBeGreaterThan(0);
  });
});

// ---- time columns with and without a zone --------------------------------------------------------
// The demo's time column is a DATE. Warehouses often hold instants (TIMESTAMPTZ) or wall-clock
// times (TIMESTAMP); each dialect turns those into the dataset's local calendar date its own way
// (DuckDB: timezone(); PostgreSQL: AT TIME ZONE). Instants are placed around local midnight and
// across both 2024 daylight-saving changes in Dublin, and the daily counts are checked against a
// plain JS reduction using Intl's IANA zone data, as well as between the engines.

const ZONE = 'Europe/Dublin';
const EVENT_COUNT = 3000;

interface EventRow {
  /** The instant, UTC. */
  at: Date;
  /** Wall-clock time in Dublin, as a zone-less TIMESTAMP would hold it. */
  local: string;
  cents: number;
  kind: string;
}

function dublinWallClock(d: Date): string {
  const parts = new Intl.DateTimeFormat('en-CA', { timeZone: ZONE, hourCycle: 'h23', year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', second: '2-digit' })
    .formatToParts(d)
    .reduce<Record<string, string>>((acc, p) => ({ ...acc, [p.type]: p.value }), {});
  return `${parts.year}-${parts.month}-${parts.day} ${parts.hour}:${parts.minute}:${parts.second}`;
}

/** Deterministic instants: every 37 minutes from 2024-03-25 (DST starts 31 March, ends 27 October), plus a burst near midnights. */
function events(): EventRow[] {
  const out: EventRow[] = [];
  const start = Date.UTC(2024, 2, 25, 0, 0, 0);
  for (let i = 0; i < EVENT_COUNT; i++) {
    const t = i % 3 === 0 ? start + i * 37 * 60_000 : Date.UTC(2024, 9, 20 + (i % 12), 23, (i * 7) % 60, i % 60) - (i % 2) * 3_600_000;
    const at = new Date(t);
    out.push({ at, local: dublinWallClock(at), cents: 100 + ((i * 7919) % 5000), kind: ['a', 'b', 'c'][i % 3]! });
  }
  return out;
}

function zoneConfig(dir: string, timeColumn: 'at' | 'local_at'): string {
  return `version: 1
datasets:
  - name: events
    label: Events
    source: { kind: duckdb, path: events.duckdb }
    table: events
    time_column: ${timeColumn}
    timezone: ${ZONE}
    metrics:
      - { name: amount, label: Amount, definition: { type: sum, column: amount }, unit: currency, currency: EUR, higher_is_better: true }
      - { name: events, label: Events, definition: { type: count }, unit: count, higher_is_better: true }
    dimensions:
      - { name: kind, column: kind, label: Kind }
`;
}

describeWithPostgres('DuckDB and PostgreSQL agree on local dates of zoned and zone-less time columns', (adminUrl) => {
  const schema = uniqueName('tc_zone');
  const urlEnv = 'TC_ZONE_URL';
  const rows = events();
  let dir: string;
  const workspaces: Workspace[] = [];

  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'tc-zone-'));
    const csv = join(dir, 'events.csv');
    await writeFile(csv, `at,local_at,amount,kind\n${rows.map((r) => `${r.at.toISOString()},${r.local},${(r.cents / 100).toFixed(2)},${r.kind}`).join('\n')}\n`);
    const instance = await DuckDBInstance.create(join(dir, 'events.duckdb'));
    const c = await instance.connect();
    await c.run(`CREATE TABLE events AS SELECT CAST("at" AS TIMESTAMPTZ) AS "at", CAST(local_at AS TIMESTAMP) AS local_at,
      CAST(amount AS DECIMAL(10,2)) AS amount, CAST(kind AS VARCHAR) AS kind
      FROM read_csv('${csv}', header = true, all_varchar = true)`);
    c.closeSync();
    instance.closeSync();
    await withClient(adminUrl, async (pgc) => {
      await pgc.query(`CREATE SCHEMA ${schema}`);
      await pgc.query(`CREATE TABLE ${schema}.events ("at" TIMESTAMPTZ, local_at TIMESTAMP, amount NUMERIC(10,2), kind TEXT)`);
      const values = rows.map((_, i) => `($${i * 4 + 1}, $${i * 4 + 2}, $${i * 4 + 3}, $${i * 4 + 4})`);
      for (let i = 0; i < rows.length; i += 500) {
        const part = rows.slice(i, i + 500);
        await pgc.query(
          `INSERT INTO ${schema}.events VALUES ${values.slice(0, part.length).join(', ')}`,
          part.flatMap((r) => [r.at.toISOString(), r.local, (r.cents / 100).toFixed(2), r.kind]),
        );
      }
    });
  }, 120_000);

  afterAll(async () => {
    for (const ws of workspaces) await ws.source.close();
    await dropSchema(adminUrl, schema);
    await rm(dir, { recursive: true, force: true });
  });

  for (const timeColumn of ['at', 'local_at'] as const) {
    it(`${timeColumn === 'at' ? 'TIMESTAMPTZ' : 'TIMESTAMP'} time column: daily counts by local date`, async () => {
      const config = parseConfigText(zoneConfig(dir, timeColumn), join(dir, 'threadcount.yaml'));
      const duck = await openWorkspace(config);
      workspaces.push(duck);
      const post = await openWorkspace(onPostgres(config, urlEnv, schema), undefined, { [urlEnv]: adminUrl });
      workspaces.push(post);
      expect(duck.context.timeColumnType).toBe(timeColumn === 'at' ? 'timestamptz' : 'timestamp');
      expect(post.context.timeColumnType).toBe(duck.context.timeColumnType);
      expect(post.coverage).toEqual(duck.coverage);

      const window = { start: '2024-03-25', end: '2024-11-01' };
      const daily: SubQuestion = { id: 'zone', kind: 'trend', lens: 'time_pattern', template: 'series', metrics: ['events', 'amount'], grain: 'day', window, filters: [] };
      const [d, p] = await Promise.all([answerSubQuestion(daily, duck), answerSubQuestion(daily, post)]);
      expect(compareAnswers(d, p)).toEqual([]);

      // Independent reduction: each instant's Dublin calendar date from Intl, counted in JS.
      const expected = new Map<string, number>();
      for (const r of rows) {
        const day = r.local.slice(0, 10);
        if (day >= window.start && day < window.end) expected.set(day, (expected.get(day) ?? 0) + 1);
      }
      const got = new Map(d.tables.series!.rows.map((r) => [String(r.period), Number(r.events)]));
      expect(got).toEqual(expected);
      // Not vacuous: many instants fall on a different calendar date in UTC than in Dublin.
      expect(rows.filter((r) => r.at.toISOString().slice(0, 10) !== r.local.slice(0, 10)).length).toBeGreaterThan(500);

      const shares: SubQuestion = { ...daily, template: 'segment_shares', lens: 'distribution', dimension: 'kind', grain: 'month', metrics: ['amount'] };
      const [ds, ps] = await Promise.all([answerSubQuestion(shares, duck), answerSubQuestion(shares, post)]);
      expect(compareAnswers(ds, ps)).toEqual([]);
    }, 60_000);
  }
});
