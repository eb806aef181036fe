// The version of a PostgreSQL table's data, read cheaply from the server's catalog and statistics
// (never from the rows), so quality reports and coverage can be kept while it holds. Two signals:
//
// - A freshness column (config `quality.freshness_column`): its maximum, with the table's
//   identity. Sound when every load or change sets it (a load time, an updated_at); a delete or an
//   update that leaves it alone goes unseen. The only signal for a table whose partitions live on
//   other servers (postgres_fdw), whose write counters are kept there. Index it: on PostgreSQL the
//   maximum is then read from the index's end (on each shard, for foreign partitions).
// - Otherwise the write counters of pg_stat_user_tables (rows inserted, updated, deleted), summed
//   over the table's partitions, with each one's identity (its oid and file node: a TRUNCATE or a
//   rewrite gives a new file), the server's start time (counters restart after a crash) and the
//   database's statistics reset time (pg_stat_reset and its single-table form set it). None on a
//   standby (its counters do not follow replayed writes), with track_counts off, or when any
//   part of the table is a view or a foreign table. A session's counts reach the view when it
//   reports them, at the latest as it goes idle (normally within a second, at most about a
//   minute in PostgreSQL 15), so a report can outlive a change by that long.
import { quoteIdentifier } from '../sql/dialect.js';
import type { CompiledQuery, ResultTable } from '../types.js';
import type { Workspace } from '../workspace.js';

/** What the version needs from a workspace (it is also read while one opens). */
export type VersionSource = Pick<Workspace, 'dataset' | 'source' | 'runOptions'>;

// Kinds of relation (pg_class.relkind) whose writes the counters see: tables and materialized views.
const COUNTED_KINDS = new Set(['r', 'm']);

/** The server and database the table lives in: the same oid on another server is another table. */
const SERVER = `current_database() AS database_name, inet_server_port() AS server_port,
  CAST(pg_postmaster_start_time() AS TEXT) AS started_at`;

export function compileFreshnessVersion(table: string, column: string): CompiledQuery {
  return {
    sql: `SELECT CAST(MAX(${quoteIdentifier(column)}) AS TEXT) AS latest,
  CAST(CAST(to_regclass($1) AS OID) AS BIGINT) AS rel,
  ${SERVER}
FROM ${quoteIdentifier(table)}`,
    params: [quoteIdentifier(table)],
  };
}

export function compileCounterVersion(table: string): CompiledQuery {
  // pg_partition_tree lists a partitioned table's partitions (nothing for a plain table, which
  // the UNION adds as itself); the partitioned parent itself holds no rows.
  return {
    sql: `SELECT CAST(c.oid AS BIGINT) AS rel, CAST(c.relkind AS TEXT) AS kind, CAST(pg_relation_filenode(c.oid) AS BIGINT) AS file_node,
  s.n_tup_ins AS inserted, s.n_tup_upd AS updated, s.n_tup_del AS deleted,
  ${SERVER},
  CAST((SELECT stats_reset FROM pg_stat_database WHERE datname = current_database()) AS TEXT) AS stats_reset,
  pg_is_in_recovery() AS standby,
  current_setting('track_counts') AS track_counts
FROM (
  SELECT relid FROM pg_partition_tree(to_regclass($1)) WHERE isleaf
  UNION
  SELECT to_regclass($1)
) parts
JOIN pg_class c ON c.oid = parts.relid
LEFT JOIN pg_stat_user_tables s ON s.relid = c.oid
WHERE c.relkind <> 'p'
ORDER BY 1`,
    params: [quoteIdentifier(table)],
  };
}

/** The data's version as text, or null when this table gives no sound cheap signal. */
export async function postgresVersion(ws: VersionSource): Promise<string | null> {
  const ds = ws.dataset;
  const column = ds.quality?.freshness_column;
  if (column) {
    const t = await ws.source.run(compileFreshnessVersion(ds.table, column), ws.runOptions);
    const row = t.rows[0];
    if (!row || row.rel === null) return null;
    return JSON.stringify({ kind: 'postgres', signal: 'freshness', column, ...row });
  }
  return versionFromCounters(await ws.source.run(compileCounterVersion(ds.table), ws.runOptions));
}

export function versionFromCounters(t: ResultTable): string | null {
  if (t.truncated || t.rows.length === 0) return null;
  for (const r of t.rows) {
    if (r.standby !== false || r.track_counts !== 'on') return null;
    if (!COUNTED_KINDS.has(String(r.kind))) return null;
    if (typeof r.inserted !== 'number' || typeof r.updated !== 'number' || typeof r.deleted !== 'number' || r.file_node === null) return null;
  }
  const first = t.rows[0]!;
  return JSON.stringify({
    kind: 'postgres',
    signal: 'counters',
    server: [first.database_name, first.server_port, first.started_at, first.stats_reset],
    parts: t.rows.map((r) => [r.rel, r.file_node, r.inserted, r.updated, r.deleted]),
  });
}
