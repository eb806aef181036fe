// The PostgreSQL source against a real server: explicit type conversion, the row cap, read-only
// transactions, the statement timeout, and each failure mapped to its SourceError code.
import { createServer } from 'node:net';
import pg from 'pg';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { SourceError, type RunOptions } from '../../analysis/sources/data-source.js';
import { PostgresSource } from '../../analysis/sources/postgres-source.js';
import type { CompiledQuery } from '../../analysis/types.js';
import { describeWithPostgres, dropSchema, uniqueName, withClient } from '../helpers/postgres.js';

const OPTS: RunOptions = { maxRows: 1000, timeoutMs: 10_000 };

async function failure(p: Promise<unknown>): Promise<SourceError> {
  try {
    await p;
  } catch (err) {
    if (err instanceof SourceError) return err;
    throw err;
  }
  throw new Error('expected the query to fail');
}

/** A port nothing listens on: bound, read, and released again. */
async function closedPort(): Promise<number> {
  const server = createServer();
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const port = (server.address() as { port: number }).port;
  await new Promise<void>((resolve) => server.close(() => resolve()));
  return port;
}

describeWithPostgres('PostgresSource', (url) => {
  const schema = uniqueName('tc_source');
  let source: PostgresSource;
  const run = (sql: string, params: CompiledQuery['params'] = [], opts: RunOptions = OPTS) => source.run({ sql, params }, opts);

  beforeAll(async () => {
    await withClient(url, async (c) => {
      await c.query(`CREATE SCHEMA ${schema}`);
      await c.query(`CREATE TABLE ${schema}.trips (day DATE, amount NUMERIC(10,2), label TEXT)`);
      await c.query(`INSERT INTO ${schema}.trips VALUES ('2024-01-31', 12.50, 'a'), ('2024-02-01', NULL, NULL)`);
    });
    source = PostgresSource.open({ url, schema, timeoutMs: 10_000 });
  });
  afterAll(async () => {
    await source?.close();
    await dropSchema(url, schema);
  });

  it('converts every column type explicitly into plain values', async () => {
    const t = await run(`SELECT DATE '2024-02-29' AS d,
      CAST(1234.50 AS NUMERIC(10,2)) AS num,
      CAST(9007199254740993 AS BIGINT) AS big,
      CAST(42 AS INTEGER) AS i,
      CAST(0.1 AS DOUBLE PRECISION) AS f,
      CAST('NaN' AS DOUBLE PRECISION) AS f_nan,
      CAST('Infinity' AS DOUBLE PRECISION) AS f_inf,
      CAST('NaN' AS NUMERIC) AS num_nan,
      TRUE AS yes, FALSE AS no,
      TIMESTAMP '2024-03-31 01:30:00.25' AS ts,
      CAST('2024-03-31 01:30:00+01' AS TIMESTAMPTZ) AS tstz,
      CAST('infinity' AS DATE) AS d_inf,
      'héllo "x"' AS txt,
      CAST(NULL AS NUMERIC) AS nothing`);
    expect(t.truncated).toBe(false);
    expect(t.rows).toEqual([
      {
        d: '2024-02-29',
        num: 1234.5,
        // INT8 past 2^53 cannot be exact in a JS number; it is the nearest double, not a string.
        big: 9007199254740992,
        i: 42,
        f: 0.1,
        f_nan: null,
        f_inf: null,
        num_nan: null,
        yes: true,
        no: false,
        ts: '2024-03-31T01:30:00.25',
        tstz: '2024-03-31T00:30:00.000Z',
        d_inf: null,
        txt: 'héllo "x"',
        nothing: null,
      },
    ]);
    const types = Object.fromEntries(t.columns.map((c) => [c.name, c.type]));
    expect(types).toMatchObject({ d: 'date', num: 'number', big: 'number', i: 'number', f: 'number', yes: 'boolean', ts: 'text', tstz: 'text', txt: 'text' });
  });

  it('leaves the pg driver\'s global type parsers alone', async () => {
    await run('SELECT DATE \'2024-01-01\' AS d');
    // A plain pg client still gets the driver's default (a JS Date for DATE): the source's parsers are its own.
    const value = await withClient(url, async (c) => (await c.query('SELECT DATE \'2024-01-01\' AS d')).rows[0].d);
    expect(value).toBeInstanceOf(Date);
    expect(pg.types.getTypeParser(1700)('1.5')).toBe('1.5');
  });

  it('binds parameters and keeps the ORDER BY while capping rows at maxRows (+1 fetched to know)', async () => {
    const sql = 'SELECT n FROM generate_series(1, $1::int) AS g(n) ORDER BY n DESC';
    const capped = await run(sql, [25], { maxRows: 10, timeoutMs: 10_000 });
    expect(capped.truncated).toBe(true);
    expect(capped.rows.map((r) => r.n)).toEqual([25, 24, 23, 22, 21, 20, 19, 18, 17, 16]);
    const exact = await run(sql, [10], { maxRows: 10, timeoutMs: 10_000 });
    expect(exact.truncated).toBe(false);
    expect(exact.rows).toHaveLength(10);
    const none = await run('SELECT n FROM generate_series(1, 0) AS g(n)');
    expect(none).toEqual({ columns: [{ name: 'n', type: 'number' }], rows: [], truncated: false });
  });

  it('describes the table in its schema, and reports a missing one as missing_table', async () => {
    expect(await source.describe('trips')).toEqual([
      { name: 'day', type: 'DATE' },
      { name: 'amount', type: 'NUMERIC' },
      { name: 'label', type: 'TEXT' },
    ]);
    expect((await failure(source.describe('nowhere'))).code).toBe('missing_table');
    expect((await failure(run('SELECT * FROM nowhere'))).code).toBe('missing_table');
  });

  it('runs every query read-only: writes are refused and leave nothing behind', async () => {
    const e = await failure(run(`CREATE TABLE ${schema}.written (a int)`));
    expect(e.code).toBe('query_failed');
    expect(e.message).toMatch(/read-only transaction/);
    const w = await failure(run(`WITH x AS (DELETE FROM ${schema}.trips RETURNING 1) SELECT count(*) FROM x`));
    expect(w.message).toMatch(/read-only transaction/);
    const left = await withClient(url, async (c) => (await c.query(`SELECT count(*)::int AS n FROM ${schema}.trips`)).rows[0].n);
    expect(left).toBe(2);
    const tables = await withClient(url, async (c) => (await c.query('SELECT count(*)::int AS n FROM information_schema.tables WHERE table_schema = $1', [schema])).rows[0].n);
    expect(tables).toBe(1);
  });

  it('stops a query at the statement timeout, reports it as timeout, and keeps the pool usable', async () => {
    const started = Date.now();
    const e = await failure(run('SELECT pg_sleep(5)', [], { maxRows: 10, timeoutMs: 200 }));
    expect(e.code).toBe('timeout');
    expect(e.message).toContain('200 ms');
    expect(Date.now() - started).toBeLessThan(3000);
    // The limit is per transaction (SET LOCAL): the next query on the same pool has its own.
    expect((await run('SELECT 1 AS one')).rows).toEqual([{ one: 1 }]);
  });

  it('reports a column that is not there as dataset_changed', async () => {
    const e = await failure(run('SELECT gone FROM trips'));
    expect(e.code).toBe('dataset_changed');
    expect(e.message).toMatch(/^column gone is missing from the table/);
  });

  it('reports other SQL errors as query_failed', async () => {
    expect((await failure(run('SELECT 1 / 0'))).code).toBe('query_failed');
  });

  it('reports a closed port and a wrong password as unreachable, never repeating the password', async () => {
    const closed = new URL(url);
    closed.port = String(await closedPort());
    const down = PostgresSource.open({ url: closed.toString(), timeoutMs: 1000 });
    try {
      const e = await failure(down.run({ sql: 'SELECT 1', params: [] }, OPTS));
      expect(e.code).toBe('unreachable');
      expect(e.message).toMatch(/ECONNREFUSED|connect/);
    } finally {
      await down.close();
    }
    const wrong = new URL(url);
    wrong.password = 'not-the-password-4f1c';
    const denied = PostgresSource.open({ url: wrong.toString(), timeoutMs: 1000 });
    try {
      const e = await failure(denied.describe('trips'));
      expect(e.code).toBe('unreachable');
      expect(e.message).toMatch(/password authentication failed/);
      expect(e.message).not.toContain('not-the-password-4f1c');
    } finally {
      await denied.close();
    }
  });
});
