// PostgreSQL for tests: the server .ci/run starts (.ci/postgres.sh exports its superuser URL as
// THREADCOUNT_TEST_PG_URL), the demo table copied into a schema of its own with its column types
// kept, and a SELECT-only role to read it the way a warehouse user would.
import { randomBytes } from 'node:crypto';
import { mkdtemp, rm } from 'node:fs/promises';
import { createReadStream } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pipeline } from 'node:stream/promises';
import { DuckDBInstance } from '@duckdb/node-api';
import pg from 'pg';
import { from as copyFrom } from 'pg-copy-streams';
import { describe, it } from 'vitest';
import type { LoadedConfig } from '../../config/load.js';
import { quoteIdentifier } from '../../analysis/sql/dialect.js';

export const PG_URL_ENV = 'THREADCOUNT_TEST_PG_URL';

/** The superuser URL of the test server, or undefined when none is configured. */
export function testPostgresUrl(): string | undefined {
  const url = process.env[PG_URL_ENV];
  return url ? url : undefined;
}

/**
 * A describe block that needs PostgreSQL. Without THREADCOUNT_TEST_PG_URL it is skipped with a
 * message saying so, except under CI=true, where the missing server is a failure.
 */
export function describeWithPostgres(name: string, body: (url: string) => void): void {
  const url = testPostgresUrl();
  if (url) {
    describe(name, () => body(url));
    return;
  }
  if (process.env.CI === 'true') {
    describe(name, () => {
      it('has a PostgreSQL server to test against', () => {
        throw new Error(`${PG_URL_ENV} is not set: .ci/run starts a throwaway PostgreSQL with .ci/postgres.sh and exports it`);
      });
    });
    return;
  }
  console.warn(`[${name}] skipped: set ${PG_URL_ENV} to a PostgreSQL superuser URL to run these tests (.ci/postgres.sh starts one)`);
  describe.skip(`${name} [skipped: set ${PG_URL_ENV} to a PostgreSQL superuser URL to run these]`, () => {
    it('needs PostgreSQL', () => undefined);
  });
}

/** A fresh name that is safe as a PostgreSQL identifier (lower case, letters, digits, underscore). */
export function uniqueName(prefix: string): string {
  return `${prefix}_${process.pid}_${randomBytes(4).toString('hex')}`;
}

export async function withClient<T>(url: string, work: (c: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    return await work(client);
  } finally {
    await client.end();
  }
}

/** DuckDB column type -> the PostgreSQL type with the same values. */
function postgresTypeOf(duckType: string): string {
  const t = duckType.toUpperCase();
  const decimal = /^DECIMAL\((\d+),\s*(\d+)\)$/.exec(t);
  if (decimal) return `NUMERIC(${decimal[1]},${decimal[2]})`;
  const known: Record<string, string> = {
    VARCHAR: 'TEXT',
    BOOLEAN: 'BOOLEAN',
    INTEGER: 'INTEGER',
    BIGINT: 'BIGINT',
    SMALLINT: 'SMALLINT',
    DOUBLE: 'DOUBLE PRECISION',
    DATE: 'DATE',
    TIMESTAMP: 'TIMESTAMP',
    'TIMESTAMP WITH TIME ZONE': 'TIMESTAMPTZ',
  };
  const pgType = known[t];
  if (!pgType) throw new Error(`no PostgreSQL type for the DuckDB type ${duckType}`);
  return pgType;
}

/**
 * Copies a DuckDB table into `schema.table` on PostgreSQL: exported with DuckDB's COPY ... TO
 * (CSV) and loaded with COPY ... FROM STDIN, with each column's type carried over.
 */
export async function copyDuckDbTableToPostgres(opts: { duckdbPath: string; table: string; url: string; schema: string }): Promise<{ rows: number }> {
  const dir = await mkdtemp(join(tmpdir(), 'tc-pg-load-'));
  const csv = join(dir, `${opts.table}.csv`);
  try {
    const instance = await DuckDBInstance.create(opts.duckdbPath, { access_mode: 'READ_ONLY' });
    let columns: { name: string; type: string }[];
    try {
      const c = await instance.connect();
      const reader = await c.runAndReadAll(
        'SELECT column_name, data_type FROM information_schema.columns WHERE table_name = $1 ORDER BY ordinal_position',
        [opts.table],
      );
      columns = reader.getRowObjectsJson().map((r) => ({ name: String(r.column_name), type: String(r.data_type) }));
      await c.run(`COPY ${quoteIdentifier(opts.table)} TO '${csv.replaceAll("'", "''")}' (FORMAT csv, HEADER true)`);
      c.closeSync();
    } finally {
      instance.closeSync();
    }
    const target = `${quoteIdentifier(opts.schema)}.${quoteIdentifier(opts.table)}`;
    return await withClient(opts.url, async (client) => {
      await client.query(`CREATE SCHEMA IF NOT EXISTS ${quoteIdentifier(opts.schema)}`);
      await client.query(`DROP TABLE IF EXISTS ${target}`);
      await client.query(`CREATE TABLE ${target} (${columns.map((c) => `${quoteIdentifier(c.name)} ${postgresTypeOf(c.type)}`).join(', ')})`);
      await pipeline(createReadStream(csv), client.query(copyFrom(`COPY ${target} FROM STDIN WITH (FORMAT csv, HEADER true)`)));
      await client.query(`ANALYZE ${target}`);
      const count = await client.query<{ n: string }>(`SELECT count(*) AS n FROM ${target}`);
      return { rows: Number(count.rows[0]!.n) };
    });
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

/** A login role that may only read the tables of `schema` (what a warehouse user would give threadcount). */
export async function createReaderRole(url: string, schema: string): Promise<{ url: string; role: string }> {
  const role = uniqueName('tc_reader');
  const password = randomBytes(12).toString('hex');
  await withClient(url, async (c) => {
    await c.query(`CREATE ROLE ${quoteIdentifier(role)} LOGIN PASSWORD '${password}' NOSUPERUSER NOCREATEDB NOCREATEROLE`);
    await c.query(`GRANT USAGE ON SCHEMA ${quoteIdentifier(schema)} TO ${quoteIdentifier(role)}`);
    await c.query(`GRANT SELECT ON ALL TABLES IN SCHEMA ${quoteIdentifier(schema)} TO ${quoteIdentifier(role)}`);
  });
  const u = new URL(url);
  u.username = role;
  u.password = password;
  return { url: u.toString(), role };
}

/** Removes a schema made by a test, and the reader roles given to it. */
export async function dropSchema(url: string, schema: string, roles: string[] = []): Promise<void> {
  await withClient(url, async (c) => {
    await c.query(`DROP SCHEMA IF EXISTS ${quoteIdentifier(schema)} CASCADE`);
    for (const r of roles) {
      await c.query(`DROP OWNED BY ${quoteIdentifier(r)}`).catch(() => undefined);
      await c.query(`DROP ROLE IF EXISTS ${quoteIdentifier(r)}`);
    }
  });
}

/** The config with its first dataset read from PostgreSQL (URL from `urlEnv`) instead of its files. */
export function onPostgres(config: LoadedConfig, urlEnv: string, schema: string): LoadedConfig {
  const [first, ...rest] = config.datasets;
  if (!first) throw new Error('the config has no dataset');
  return { ...config, datasets: [{ ...first, source: { kind: 'postgres', url_env: urlEnv, schema } }, ...rest] };
}
