// The warehouse path measured: the same demo request answered from PostgreSQL, plain and sharded.
// Throwaway servers come from .ci/postgres.sh (a plain server; a coordinator with postgres_fdw and
// two shards), held by a bash child that stops them when its stdin closes, so they go with this
// process however it ends. The demo data is loaded into each layout: plain, one table with a BRIN
// index on the time column (the rows arrive in date order); sharded, bookings range-partitioned
// by year over the shards, each part with an index on the freshness column.
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseDocument } from 'yaml';
import { quoteIdentifier } from '../analysis/sql/dialect.js';
import type { BenchData } from './data.js';
import { packageRoot } from './data.js';
import { copyDuckDbTableToPostgres, copyDuckDbTableToShards, createReaderRole, type ShardedServers, withClient } from './warehouse-load.js';

export type Layout = 'plain' | 'sharded';

export interface WarehouseServers {
  plainUrl: string;
  sharded: ShardedServers;
  stop(): Promise<void>;
}

/** The environment variable our runs read the warehouse's URL from (the configs name it). */
export const WAREHOUSE_URL_ENV: Record<Layout, string> = { plain: 'THREADCOUNT_BENCH_PLAIN_URL', sharded: 'THREADCOUNT_BENCH_SHARDED_URL' };
export const WAREHOUSE_SCHEMA = 'bench';
/** Partition bounds of the sharded layout: one partition per calendar year of the demo data. */
const YEARS = ['2023-01-01', '2024-01-01', '2025-01-01'];
/** The sharded layout's freshness column (config quality.freshness_column): when a booking was made. */
const FRESHNESS_COLUMN = 'booked_at';

export async function startWarehouseServers(log: (line: string) => void): Promise<WarehouseServers> {
  log('warehouse: starting PostgreSQL (plain, coordinator, two shards) with .ci/postgres.sh...');
  const script = [
    'source .ci/postgres.sh',
    'tc_pg_start >&2',
    `node -e 'const e = process.env; console.log(JSON.stringify({ plain: e.THREADCOUNT_TEST_PG_URL, coordinator: e.THREADCOUNT_TEST_PG_SHARDED_URL, shards: e.THREADCOUNT_TEST_PG_SHARDS }))'`,
    // Hold the servers until our end of stdin closes; the EXIT trap then stops them.
    'read -r _ || true',
  ].join(' && ');
  const child = spawn('bash', ['-c', script], { cwd: packageRoot(), stdio: ['pipe', 'pipe', 'inherit'] });
  const line = await firstLine(child);
  const found = JSON.parse(line) as { plain?: string; coordinator?: string; shards?: string };
  if (!found.plain || !found.coordinator || !found.shards) throw new Error('.ci/postgres.sh did not export the servers\' URLs');
  const shards = found.shards.split(/\s+/).map((pair) => ({ server: pair.slice(0, pair.indexOf('=')), url: pair.slice(pair.indexOf('=') + 1) }));
  return {
    plainUrl: found.plain,
    sharded: { coordinatorUrl: found.coordinator, shards },
    stop: () =>
      new Promise<void>((resolve) => {
        if (child.exitCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.stdin?.end();
      }),
  };
}

function firstLine(child: ChildProcess): Promise<string> {
  return new Promise((resolve, reject) => {
    let buffered = '';
    child.stdout!.on('data', (chunk: Buffer) => {
      buffered += chunk.toString('utf8');
      const nl = buffered.indexOf('\n');
      if (nl >= 0) resolve(buffered.slice(0, nl));
    });
    child.once('exit', (code) => reject(new Error(`the PostgreSQL servers did not start (exit ${code})`)));
    child.once('error', reject);
  });
}

export interface LoadedLayout {
  layout: Layout;
  /** The config our runs use (its dataset reads the warehouse; quality cache beside it). */
  configPath: string;
  /** A SELECT-only role's URL, what our runs connect as; and the superuser's, for the floor. */
  readerUrl: string;
  adminUrl: string;
  rows: number;
  loadSeconds: number;
  /** Partitions and the shard each lives on (sharded only). */
  partitions: { name: string; server: string }[];
}

/** Loads the size's demo data into the layout, and writes a config that reads it. */
export async function loadLayout(layout: Layout, data: BenchData, servers: WarehouseServers, log: (line: string) => void): Promise<LoadedLayout> {
  const started = performance.now();
  const schema = quoteIdentifier(WAREHOUSE_SCHEMA);
  log(`warehouse: loading ${data.rows.toLocaleString('en')} rows into the ${layout} layout...`);
  let rows: number;
  let partitions: LoadedLayout['partitions'] = [];
  let adminUrl: string;
  if (layout === 'plain') {
    adminUrl = servers.plainUrl;
    rows = (await copyDuckDbTableToPostgres({ duckdbPath: data.databasePath, table: 'bookings', url: adminUrl, schema: WAREHOUSE_SCHEMA })).rows;
    // BRIN: a few pages that tell which blocks hold which dates, so a window reads only its blocks.
    await withClient(adminUrl, (c) => c.query(`CREATE INDEX ON ${schema}.bookings USING brin (sail_date)`));
  } else {
    adminUrl = servers.sharded.coordinatorUrl;
    const loaded = await copyDuckDbTableToShards({ duckdbPath: data.databasePath, table: 'bookings', servers: servers.sharded, schema: WAREHOUSE_SCHEMA, partitionColumn: 'sail_date', boundaries: YEARS });
    rows = loaded.rows;
    partitions = loaded.partitions.map((p) => ({ name: p.name, server: p.server }));
    for (const p of loaded.partitions) {
      const shard = servers.sharded.shards.find((s) => s.server === p.server)!;
      await withClient(shard.url, (c) => c.query(`CREATE INDEX ON ${schema}.${quoteIdentifier(p.name)} (${quoteIdentifier(FRESHNESS_COLUMN)})`));
    }
  }
  const reader = await createReaderRole(adminUrl, WAREHOUSE_SCHEMA);
  const dir = join(data.dir, `warehouse-${layout}`);
  mkdirSync(dir, { recursive: true });
  const configPath = join(dir, 'threadcount.yaml');
  writeFileSync(configPath, warehouseConfig(readFileSync(data.configPath, 'utf8'), layout));
  return { layout, configPath, readerUrl: reader.url, adminUrl, rows, loadSeconds: (performance.now() - started) / 1000, partitions };
}

/** The demo config with its dataset read from the warehouse (the sharded one names its freshness column). */
function warehouseConfig(text: string, layout: Layout): string {
  const doc = parseDocument(text);
  doc.setIn(['datasets', 0, 'source'], doc.createNode({ kind: 'postgres', url_env: WAREHOUSE_URL_ENV[layout], schema: WAREHOUSE_SCHEMA }));
  if (layout === 'sharded') doc.setIn(['datasets', 0, 'quality'], doc.createNode({ freshness_column: FRESHNESS_COLUMN }));
  return doc.toString();
}
