// The demo table copied from its DuckDB file into PostgreSQL, shared by the tests and the
// benchmark: into one table of a schema of its own, or into the sharded layout (a coordinator's
// table range-partitioned on the time column, each partition a postgres_fdw foreign table on a
// shard), with each column's type carried over; and the SELECT-only roles a warehouse would give.
import { randomBytes } from 'node:crypto';
import { mkdtemp, rm } from 'node:fs/promises';
import { createReadStream } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pipeline } from 'node:stream/promises';
import { DuckDBInstance } from '@duckdb/node-api';
import pg from 'pg';
import { from as copyFrom } from 'pg-copy-streams';
import { quoteIdentifier } from '../analysis/sql/dialect.js';

/** The role on every shard that the coordinator's user mapping logs in as. */
export const SHARD_READER_ROLE = 'tc_shard_reader';

export interface ShardedServers {
  /** The coordinator's superuser URL. */
  coordinatorUrl: string;
  /** Each shard: its foreign server's name on the coordinator and its own superuser URL. */
  shards: { server: string; url: string }[];
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

interface ExportedTable {
  columns: { name: string; type: string }[];
  /** One CSV file per part, in the order the parts were asked for. */
  files: string[];
}

/** Exports a DuckDB table as CSV (one file per `parts` condition, or the whole table), with its column types. */
async function exportDuckDbTable(duckdbPath: string, table: string, dir: string, parts: string[] = ['TRUE']): Promise<ExportedTable> {
  const instance = await DuckDBInstance.create(duckdbPath, { access_mode: 'READ_ONLY' });
  try {
    const c = await instance.connect();
    const reader = await c.runAndReadAll('SELECT column_name, data_type FROM information_schema.columns WHERE table_name = $1 ORDER BY ordinal_position', [table]);
    const columns = reader.getRowObjectsJson().map((r) => ({ name: String(r.column_name), type: String(r.data_type) }));
    const files: string[] = [];
    for (const [i, where] of parts.entries()) {
      const csv = join(dir, `${table}-${i}.csv`);
      await c.run(`COPY (SELECT * FROM ${quoteIdentifier(table)} WHERE ${where}) TO '${csv.replaceAll("'", "''")}' (FORMAT csv, HEADER true)`);
      files.push(csv);
    }
    c.closeSync();
    return { columns, files };
  } finally {
    instance.closeSync();
  }
}

function columnList(columns: ExportedTable['columns']): string {
  return columns.map((c) => `${quoteIdentifier(c.name)} ${postgresTypeOf(c.type)}`).join(', ');
}

/** Creates `schema.table` (dropping one of that name) and loads the CSV file into it with COPY ... FROM STDIN. */
async function loadCsv(client: pg.Client, schema: string, table: string, columns: ExportedTable['columns'], csv: string): Promise<void> {
  const target = `${quoteIdentifier(schema)}.${quoteIdentifier(table)}`;
  await client.query(`CREATE SCHEMA IF NOT EXISTS ${quoteIdentifier(schema)}`);
  await client.query(`DROP TABLE IF EXISTS ${target}`);
  await client.query(`CREATE TABLE ${target} (${columnList(columns)})`);
  await pipeline(createReadStream(csv), client.query(copyFrom(`COPY ${target} FROM STDIN WITH (FORMAT csv, HEADER true)`)));
  await client.query(`ANALYZE ${target}`);
}

/**
 * Copies a DuckDB table into `schema.table` on PostgreSQL: exported with DuckDB's COPY ... TO
 * (CSV) and loaded with COPY ... FROM STDIN, with each column's type carried over.
 */
export async function copyDuckDbTableToPostgres(opts: { duckdbPath: string; table: string; url: string; schema: string }): Promise<{ rows: number }> {
  const dir = await mkdtemp(join(tmpdir(), 'tc-pg-load-'));
  try {
    const exported = await exportDuckDbTable(opts.duckdbPath, opts.table, dir);
    return await withClient(opts.url, async (client) => {
      await loadCsv(client, opts.schema, opts.table, exported.columns, exported.files[0]!);
      const count = await client.query<{ n: string }>(`SELECT count(*) AS n FROM ${quoteIdentifier(opts.schema)}.${quoteIdentifier(opts.table)}`);
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

/**
 * Copies a DuckDB table to the sharded layout: `schema.table` on the coordinator, range-partitioned
 * on `partitionColumn` at `boundaries` (ascending; the first partition starts at MINVALUE and the
 * last ends at MAXVALUE), each partition a foreign table on shard i mod n holding
 * `schema.table_p<i>` there. Each shard's part is loaded straight into the shard with COPY.
 */
export async function copyDuckDbTableToShards(opts: {
  duckdbPath: string;
  table: string;
  servers: ShardedServers;
  schema: string;
  partitionColumn: string;
  boundaries: string[];
}): Promise<{ rows: number; partitions: { name: string; server: string; from: string; to: string }[] }> {
  const dir = await mkdtemp(join(tmpdir(), 'tc-pg-shard-load-'));
  const col = quoteIdentifier(opts.partitionColumn);
  const lows = ['MINVALUE', ...opts.boundaries.map((b) => `'${b}'`)];
  const highs = [...opts.boundaries.map((b) => `'${b}'`), 'MAXVALUE'];
  const parts = lows.map((low, i) => {
    const conds = [...(low === 'MINVALUE' ? [] : [`${col} >= ${low}`]), ...(highs[i] === 'MAXVALUE' ? [] : [`${col} < ${highs[i]}`])];
    return conds.length ? conds.join(' AND ') : 'TRUE';
  });
  const schema = quoteIdentifier(opts.schema);
  try {
    const exported = await exportDuckDbTable(opts.duckdbPath, opts.table, dir, parts);
    const partitions = parts.map((_, i) => ({ name: `${opts.table}_p${i}`, server: opts.servers.shards[i % opts.servers.shards.length]!.server, from: lows[i]!, to: highs[i]! }));
    for (const [i, p] of partitions.entries()) {
      const shard = opts.servers.shards.find((s) => s.server === p.server)!;
      await withClient(shard.url, async (c) => {
        await loadCsv(c, opts.schema, p.name, exported.columns, exported.files[i]!);
        await c.query(`GRANT USAGE ON SCHEMA ${schema} TO ${SHARD_READER_ROLE}`);
        await c.query(`GRANT SELECT ON ${schema}.${quoteIdentifier(p.name)} TO ${SHARD_READER_ROLE}`);
      });
    }
    return await withClient(opts.servers.coordinatorUrl, async (c) => {
      const parent = `${schema}.${quoteIdentifier(opts.table)}`;
      await c.query(`CREATE SCHEMA IF NOT EXISTS ${schema}`);
      await c.query(`CREATE TABLE ${parent} (${columnList(exported.columns)}) PARTITION BY RANGE (${col})`);
      for (const p of partitions) {
        await c.query(`CREATE FOREIGN TABLE ${schema}.${quoteIdentifier(p.name)} PARTITION OF ${parent}
          FOR VALUES FROM (${p.from}) TO (${p.to})
          SERVER ${quoteIdentifier(p.server)} OPTIONS (schema_name '${opts.schema}', table_name '${p.name}')`);
      }
      // Samples each shard's rows for the coordinator's own statistics.
      await c.query(`ANALYZE ${parent}`);
      const count = await c.query<{ n: string }>(`SELECT count(*) AS n FROM ${parent}`);
      return { rows: Number(count.rows[0]!.n), partitions };
    });
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

/** Removes a schema made by a test from the coordinator and every shard, and the coordinator's reader roles given to it. */
export async function dropShardedSchema(servers: ShardedServers, schema: string, roles: string[] = []): Promise<void> {
  await dropSchema(servers.coordinatorUrl, schema, roles);
  for (const s of servers.shards) await dropSchema(s.url, schema);
}
