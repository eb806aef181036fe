// PostgreSQL for tests: the servers .ci/run starts (.ci/postgres.sh exports a plain server's
// superuser URL as THREADCOUNT_TEST_PG_URL, and the sharded layout's), describe blocks that need
// them, and a config pointed at a PostgreSQL copy of its dataset.
import { describe, it } from 'vitest';
import type { LoadedConfig } from '../../config/load.js';
import type { ShardedServers } from '../../bench/warehouse-load.js';

// The loaders are shared with the benchmark (bench/warehouse-load.ts).
export {
  copyDuckDbTableToPostgres,
  copyDuckDbTableToShards,
  createReaderRole,
  dropSchema,
  dropShardedSchema,
  SHARD_READER_ROLE,
  type ShardedServers,
  uniqueName,
  withClient,
} from '../../bench/warehouse-load.js';

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
  describeWithServer(name, testPostgresUrl(), PG_URL_ENV, 'a PostgreSQL superuser URL', body);
}

function describeWithServer<T>(name: string, found: T | undefined, env: string, what: string, body: (found: T) => void): void {
  if (found !== undefined) {
    describe(name, () => body(found));
    return;
  }
  if (process.env.CI === 'true') {
    describe(name, () => {
      it('has the PostgreSQL servers it needs to test against', () => {
        throw new Error(`${env} is not set: .ci/run starts throwaway PostgreSQL servers with .ci/postgres.sh and exports it`);
      });
    });
    return;
  }
  console.warn(`[${name}] skipped: set ${env} to ${what} to run these tests (.ci/postgres.sh starts one)`);
  describe.skip(`${name} [skipped: set ${env} to ${what} to run these]`, () => {
    it('needs PostgreSQL', () => undefined);
  });
}

// ---- the sharded layout ----------------------------------------------------------------------
// .ci/postgres.sh also starts a coordinator and two shard servers: the coordinator reaches each
// shard through a postgres_fdw foreign server (user mapping for PUBLIC, as the shards' read-only
// role tc_shard_reader), and tests build a partitioned table on it whose partitions are foreign
// tables on the shards.

export const PG_SHARDED_URL_ENV = 'THREADCOUNT_TEST_PG_SHARDED_URL';
export const PG_SHARDS_ENV = 'THREADCOUNT_TEST_PG_SHARDS';
export function testShardedPostgres(): ShardedServers | undefined {
  const coordinatorUrl = process.env[PG_SHARDED_URL_ENV];
  const list = process.env[PG_SHARDS_ENV]?.trim();
  if (!coordinatorUrl || !list) return undefined;
  const shards = list.split(/\s+/).map((pair) => {
    const at = pair.indexOf('=');
    return { server: pair.slice(0, at), url: pair.slice(at + 1) };
  });
  return { coordinatorUrl, shards };
}

/** A describe block that needs the sharded layout; skipped locally without it, a failure under CI=true. */
export function describeWithShardedPostgres(name: string, body: (servers: ShardedServers) => void): void {
  describeWithServer(name, testShardedPostgres(), PG_SHARDED_URL_ENV, `a coordinator's superuser URL (and ${PG_SHARDS_ENV})`, body);
}

/** The config with its first dataset read from PostgreSQL (URL from `urlEnv`) instead of its files. */
export function onPostgres(config: LoadedConfig, urlEnv: string, schema: string): LoadedConfig {
  const [first, ...rest] = config.datasets;
  if (!first) throw new Error('the config has no dataset');
  return { ...config, datasets: [{ ...first, source: { kind: 'postgres', url_env: urlEnv, schema } }, ...rest] };
}
