// The quality report kept per version of the data, on a private copy of the demo (invented
// data) in real DuckDB: a hit gives what a fresh check gives without querying, a changed or
// replaced data file is checked again, and a broken cache only costs the query.
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { checkQuality, columnsUsed } from '../../../analysis/quality/check-run.js';
import { dataVersion } from '../../../analysis/quality/data-version.js';
import { coverageCacheFile, qualityCacheDir, qualityCacheFile } from '../../../analysis/quality/quality-cache.js';
import { keptCoverage } from '../../../analysis/quality/kept-coverage.js';
import { readDataCoverage } from '../../../analysis/coverage.js';
import { compileQualityChecks, readQuality, type QualityReport } from '../../../analysis/quality/quality-checks.js';
import type { CompiledQuery, ResultTable, SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { loadConfig } from '../../../config/load.js';
import { DEMO_CONFIG_FILE, DEMO_DATABASE_FILE } from '../../../config/demo/generate-demo.js';
import { demoFixture } from '../../helpers/demo-fixture.js';
import { copyDuckDbTableToPostgres, describeWithPostgres, dropSchema, onPostgres, uniqueName, withClient } from '../../helpers/postgres.js';

const WINDOW = { start: '2022-01-01', end: '2025-06-19' };
const base: Omit<SubQuestion, 'id' | 'metrics'> = { kind: 'trend', lens: 'time_pattern', template: 'series', grain: 'month', window: WINDOW, filters: [] };
// A plan's sub-questions: revenue by month, bookings by channel, the pass-holder comparison.
const PLAN: SubQuestion[] = [
  { ...base, id: 'a', metrics: ['revenue'] },
  { ...base, id: 'b', metrics: ['bookings'], dimension: 'channel' },
  { ...base, id: 'c', metrics: ['bookings'], comparisonGroup: 'skerrypass' },
];
// Another plan that also uses the route and the refund columns.
const OTHER_PLAN: SubQuestion[] = [{ ...base, id: 'd', metrics: ['refund_rate'], dimension: 'route' }, ...PLAN.slice(0, 1)];

const dirs: string[] = [];
const opened: Workspace[] = [];
async function closeAll(): Promise<void> {
  for (const ws of opened.splice(0)) await ws.source.close();
}
afterEach(closeAll);
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

/** A private copy of the demo's data file and config (tests here rewrite the data). */
async function demoCopy(): Promise<{ dir: string; configPath: string; databasePath: string }> {
  const demo = await demoFixture();
  const dir = mkdtempSync(join(tmpdir(), 'tc-quality-cache-'));
  dirs.push(dir);
  copyFileSync(demo.databasePath, join(dir, DEMO_DATABASE_FILE));
  copyFileSync(demo.configPath, join(dir, DEMO_CONFIG_FILE));
  return { dir, configPath: join(dir, DEMO_CONFIG_FILE), databasePath: join(dir, DEMO_DATABASE_FILE) };
}

async function open(configPath: string): Promise<Workspace> {
  const ws = await openWorkspace(loadConfig(configPath));
  opened.push(ws);
  return ws;
}

/** The workspace with the queries its source runs recorded (the real source runs them). */
function recorded(ws: Workspace): { ws: Workspace; queries: CompiledQuery[] } {
  const queries: CompiledQuery[] = [];
  const source = new Proxy(ws.source, {
    get(target, prop) {
      if (prop === 'run') {
        return (q: CompiledQuery, o: Workspace['runOptions']) => {
          queries.push(q);
          return target.run(q, o);
        };
      }
      const value: unknown = Reflect.get(target, prop, target);
      return typeof value === 'function' ? (value as (...a: unknown[]) => unknown).bind(target) : value;
    },
  });
  return { ws: { ...ws, source }, queries };
}

/** The report the check gives with no cache involved: its query compiled, run and read directly. */
async function freshReport(ws: Workspace, plan: SubQuestion[]): Promise<QualityReport> {
  const columns = [...new Set(plan.flatMap((sq) => columnsUsed(sq, ws)))];
  const tables: Record<string, ResultTable> = {};
  for (const q of compileQualityChecks(ws.context, columns)) tables[q.name] = await ws.source.run(q, ws.runOptions);
  return readQuality(tables, ws);
}

/** Changes the data file with DuckDB itself (read-write), then folds the change into the file. */
async function rewrite(databasePath: string, statements: string[]): Promise<void> {
  const instance = await DuckDBInstance.create(databasePath);
  const c = await instance.connect();
  try {
    for (const sql of statements) await c.run(sql);
    await c.run('CHECKPOINT');
  } finally {
    c.closeSync();
    instance.closeSync();
  }
}

// One existing booking repeated: one more row and one more repeated key than before.
const REPEAT_A_BOOKING = "INSERT INTO bookings SELECT * FROM bookings WHERE booking_id = (SELECT MIN(booking_id) FROM bookings WHERE fare_total > 0)";
// One positive fare made negative in place: same rows, the file's size most likely unchanged.
const NEGATE_A_FARE = 'UPDATE bookings SET fare_total = -fare_total WHERE booking_id = (SELECT MAX(booking_id) FROM bookings WHERE fare_total > 0)';

describe('the quality report cache on the demo', () => {
  let copy: Awaited<ReturnType<typeof demoCopy>>;
  beforeAll(async () => {
    copy = await demoCopy();
  });

  it('reuses the report in a newly opened workspace: the same report as a fresh check, and no query', async () => {
    const first = recorded(await open(copy.configPath));
    const report = await checkQuality(PLAN, first.ws);
    // The counts by day and the repeated-key count.
    expect(first.queries).toHaveLength(2);
    expect(report).toEqual(await freshReport(first.ws, PLAN));
    expect(existsSync(qualityCacheFile(first.ws.config, first.ws.dataset))).toBe(true);
    // The planted warts are there (demo scenario), so the comparison is not of empty reports.
    expect(report.duplicateKeys!.extraRows).toBeGreaterThan(0);
    expect(report.nulls.find((n) => n.column === 'channel')!.count).toBeGreaterThan(0);

    const second = recorded(await open(copy.configPath));
    const again = await checkQuality(PLAN, second.ws);
    expect(second.queries).toHaveLength(0);
    expect(again).toEqual(await freshReport(second.ws, PLAN));
    // The coverage is kept beside it: read again, it costs no query and gives what a fresh read gives.
    const coverage = recorded(second.ws);
    expect(await keptCoverage(coverage.ws)).toEqual(await readDataCoverage(second.ws.source, second.ws.context, second.ws.runOptions));
    expect(coverage.queries).toHaveLength(0);
    expect(existsSync(coverageCacheFile(second.ws.config, second.ws.dataset))).toBe(true);
  });

  it('checks only the columns not yet checked for this version, without counting repeated keys again', async () => {
    const { ws, queries } = recorded(await open(copy.configPath));
    await checkQuality(PLAN, ws);
    const before = queries.length;
    const report = await checkQuality(OTHER_PLAN, ws);
    const added = queries.slice(before);
    expect(added).toHaveLength(1);
    expect(added[0]!.sql).not.toContain('"booking_id"');
    expect(added[0]!.sql).toContain('"nulls__route"');
    expect(added[0]!.sql).not.toContain('"nulls__channel"');
    expect(report).toEqual(await freshReport(ws, OTHER_PLAN));
    // Both plans are now answered from the cache.
    const n = queries.length;
    expect(await checkQuality(OTHER_PLAN, ws)).toEqual(await freshReport(ws, OTHER_PLAN));
    expect(await checkQuality(PLAN, ws)).toEqual(await freshReport(ws, PLAN));
    expect(queries.length).toBe(n + 4); // the two fresh reports' own queries (two each), nothing else
  });

  it('checks again after the data file is rewritten, in place and with more rows', async () => {
    const old = await checkQuality(PLAN, await open(copy.configPath));
    const negatives = (rep: QualityReport) => rep.negatives.find((n) => n.column === 'fare_total')!.count;

    await closeAll();
    await rewrite(copy.databasePath, [NEGATE_A_FARE]);
    const negated = recorded(await open(copy.configPath));
    const afterNegating = await checkQuality(PLAN, negated.ws);
    expect(negated.queries).toHaveLength(2);
    expect(afterNegating).toEqual(await freshReport(negated.ws, PLAN));
    expect(negatives(afterNegating)).toBe(negatives(old) + 1);

    await closeAll();
    await rewrite(copy.databasePath, [REPEAT_A_BOOKING]);
    const repeated = recorded(await open(copy.configPath));
    const afterRepeating = await checkQuality(PLAN, repeated.ws);
    expect(repeated.queries).toHaveLength(2);
    expect(afterRepeating).toEqual(await freshReport(repeated.ws, PLAN));
    expect(afterRepeating.rows).toBe(old.rows + 1);
    expect(afterRepeating.duplicateKeys!.extraRows).toBe(old.duplicateKeys!.extraRows + 1);
  });

  it('stores nothing for a data file replaced while the workspace had the old one open', async () => {
    const own = await demoCopy();
    const held = recorded(await open(own.configPath));
    const replacement = join(own.dir, 'replacement.duckdb');
    copyFileSync(own.databasePath, replacement);
    await rewrite(replacement, [REPEAT_A_BOOKING]);
    renameSync(replacement, own.databasePath);

    // The engine still reads the file it opened: the old data, so no version can be named.
    expect(await dataVersion(held.ws)).toBeNull();
    const old = await checkQuality(PLAN, held.ws);
    expect(old).toEqual(await freshReport(held.ws, PLAN));
    expect(existsSync(qualityCacheFile(held.ws.config, held.ws.dataset))).toBe(false);

    const now = recorded(await open(own.configPath));
    expect(await dataVersion(now.ws)).not.toBeNull();
    const report = await checkQuality(PLAN, now.ws);
    expect(now.queries).toHaveLength(2);
    expect(report.rows).toBe(old.rows + 1);
    expect(report).toEqual(await freshReport(now.ws, PLAN));
  });

  it('ignores a corrupt cache file and writes a good one in its place', async () => {
    const own = await demoCopy();
    const ws = await open(own.configPath);
    const file = qualityCacheFile(ws.config, ws.dataset);
    mkdirSync(qualityCacheDir(ws.config), { recursive: true });
    for (const broken of ['{"format": 1, "key": "x", "rows": ', 'null', JSON.stringify({ format: 1, key: 'x', rows: -1 })]) {
      writeFileSync(file, broken);
      const r = recorded(ws);
      const report = await checkQuality(PLAN, r.ws);
      expect(r.queries).toHaveLength(2);
      expect(report).toEqual(await freshReport(ws, PLAN));
      expect(() => JSON.parse(readFileSync(file, 'utf8')) as unknown).not.toThrow();
      const hit = recorded(ws);
      expect(await checkQuality(PLAN, hit.ws)).toEqual(report);
      expect(hit.queries).toHaveLength(0);
    }
  });

  it('still answers when the cache cannot be written (its folder is a file)', async () => {
    const own = await demoCopy();
    writeFileSync(join(own.dir, 'threadcount-cache'), 'not a folder');
    const ws = await open(own.configPath);
    for (let i = 0; i < 2; i++) {
      const r = recorded(ws);
      expect(await checkQuality(PLAN, r.ws)).toEqual(await freshReport(ws, PLAN));
      expect(r.queries).toHaveLength(2);
    }
  });
});

describe('the quality report cache on CSV files', () => {
  it('checks again after a CSV file changes', async () => {
    const own = await demoCopy();
    const csv = join(own.dir, 'bookings.csv');
    const exportCsv = async (extra: string[]) => {
      await rewrite(own.databasePath, extra);
      const instance = await DuckDBInstance.create(own.databasePath, { access_mode: 'READ_ONLY' });
      const c = await instance.connect();
      await c.run(`COPY bookings TO '${csv.replaceAll("'", "''")}' (HEADER)`);
      c.closeSync();
      instance.closeSync();
    };
    await exportCsv([]);
    const text = readFileSync(own.configPath, 'utf8').replace(/source:\s*\n\s*kind: duckdb\s*\n\s*path: \S+/, 'source: { kind: csv, paths: [bookings.csv] }');
    expect(text).toContain('kind: csv');
    writeFileSync(own.configPath, text);

    const first = recorded(await open(own.configPath));
    const old = await checkQuality(PLAN, first.ws);
    expect(first.queries).toHaveLength(2);
    const hit = recorded(first.ws);
    expect(await checkQuality(PLAN, hit.ws)).toEqual(old);
    expect(hit.queries).toHaveLength(0);

    await exportCsv([REPEAT_A_BOOKING]);
    const after = recorded(first.ws);
    const report = await checkQuality(PLAN, after.ws);
    expect(after.queries).toHaveLength(2);
    expect(report.rows).toBe(old.rows + 1);
    expect(report).toEqual(await freshReport(first.ws, PLAN));
  });
});

describeWithPostgres('the quality report and coverage on PostgreSQL, kept per version of the table', (url) => {
  const schema = uniqueName('tc_quality_cache');
  const urlEnv = 'TC_QUALITY_CACHE_PG';
  const table = `${schema}.bookings`;
  afterAll(async () => {
    await dropSchema(url, schema);
  });
  // The catalog queries that read the version (never the rows), told apart from the checks.
  const isVersion = (q: CompiledQuery) => q.sql.includes('to_regclass');
  const checks = (qs: CompiledQuery[]) => qs.filter((q) => !isVersion(q));

  /** Waits until the table's version differs from `before` (a session's counts reach the statistics as it goes idle). */
  async function changedVersion(ws: Workspace, before: string | null): Promise<string> {
    for (let i = 0; i < 150; i++) {
      const now = await dataVersion(ws);
      if (now !== null && now !== before) return now;
      await new Promise((r) => setTimeout(r, 100));
    }
    throw new Error('the table\'s version did not change within 15 s of the write');
  }

  it('reuses the report while the write counters stand still, and checks again after an insert and an update', async () => {
    const own = await demoCopy();
    await copyDuckDbTableToPostgres({ duckdbPath: own.databasePath, table: 'bookings', url, schema });
    const config = onPostgres(loadConfig(own.configPath), urlEnv, schema);
    const ws = await openWorkspace(config, undefined, { [urlEnv]: url });
    opened.push(ws);
    const duck = await open(own.configPath);
    const version = await dataVersion(ws);
    expect(version).not.toBeNull();
    expect(version).toContain('"signal":"counters"');

    const first = recorded(ws);
    const report = await checkQuality(PLAN, first.ws);
    expect(checks(first.queries)).toHaveLength(2);
    // The same counts as DuckDB's on the same rows.
    expect(report).toEqual(await freshReport(duck, PLAN));
    const hit = recorded(ws);
    expect(await checkQuality(PLAN, hit.ws)).toEqual(report);
    expect(checks(hit.queries)).toHaveLength(0);
    expect(hit.queries.length).toBeGreaterThan(0);
    // The coverage too: kept when the workspace opened, read again without reading a row.
    const coverage = recorded(ws);
    expect(await keptCoverage(coverage.ws)).toEqual(ws.coverage);
    expect(checks(coverage.queries)).toHaveLength(0);
    expect(ws.coverage).toEqual(duck.coverage);

    await withClient(url, (c) => c.query(`INSERT INTO ${table} SELECT * FROM ${table} WHERE booking_id = (SELECT MIN(booking_id) FROM ${table} WHERE fare_total > 0)`));
    const afterInsert = await changedVersion(ws, version);
    const inserted = recorded(ws);
    const grown = await checkQuality(PLAN, inserted.ws);
    expect(checks(inserted.queries)).toHaveLength(2);
    expect(grown.rows).toBe(report.rows + 1);
    expect(grown.duplicateKeys!.extraRows).toBe(report.duplicateKeys!.extraRows + 1);
    expect(grown).toEqual(await freshReport(ws, PLAN));

    await withClient(url, (c) => c.query(`UPDATE ${table} SET fare_total = -fare_total WHERE booking_id = (SELECT MAX(booking_id) FROM ${table} WHERE fare_total > 0)`));
    await changedVersion(ws, afterInsert);
    const updated = recorded(ws);
    const negated = await checkQuality(PLAN, updated.ws);
    expect(checks(updated.queries)).toHaveLength(2);
    const negatives = (r: QualityReport) => r.negatives.find((n) => n.column === 'fare_total')!.count;
    expect(negatives(negated)).toBe(negatives(grown) + 1);
  });

  it('reads the version from a freshness column when the config names one, and sees a newer row', async () => {
    const own = await demoCopy();
    const freshSchema = `${schema}_f`;
    await copyDuckDbTableToPostgres({ duckdbPath: own.databasePath, table: 'bookings', url, schema: freshSchema });
    try {
      const base = onPostgres(loadConfig(own.configPath), urlEnv, freshSchema);
      const config = { ...base, datasets: base.datasets.map((d) => ({ ...d, quality: { duplicate_keys: 'auto' as const, full_key_count_max_rows: 20_000_000, freshness_column: 'booked_at' } })) };
      const ws = await openWorkspace(config, undefined, { [urlEnv]: url });
      opened.push(ws);
      const version = await dataVersion(ws);
      expect(version).toContain('"signal":"freshness"');
      const report = await checkQuality(PLAN, ws);
      const hit = recorded(ws);
      expect(await checkQuality(PLAN, hit.ws)).toEqual(report);
      expect(checks(hit.queries)).toHaveLength(0);
      await withClient(url, (c) =>
        c.query(`INSERT INTO ${freshSchema}.bookings SELECT * FROM ${freshSchema}.bookings WHERE booking_id = (SELECT MAX(booking_id) FROM ${freshSchema}.bookings)`).then(() =>
          c.query(`UPDATE ${freshSchema}.bookings SET booked_at = booked_at + INTERVAL '10 years' WHERE ctid = (SELECT MAX(ctid) FROM ${freshSchema}.bookings)`),
        ),
      );
      expect(await dataVersion(ws)).not.toBe(version);
      const after = recorded(ws);
      expect((await checkQuality(PLAN, after.ws)).rows).toBe(report.rows + 1);
      expect(checks(after.queries)).toHaveLength(2);
    } finally {
      await dropSchema(url, freshSchema);
    }
  });
});
