// The warehouse's own floor: the plan's SQL statements, exactly as our run bound them, run one
// after another on one connection with the settings our source uses (partition-wise aggregation
// on, UTC), results read fully; then each once more under EXPLAIN (ANALYZE, VERBOSE) to count
// the rows each shard sent the coordinator (a foreign scan's actual rows) and whether every one
// of those scans was an aggregate computed on the shard.
import pg from 'pg';
import { quoteIdentifier } from '../analysis/sql/dialect.js';
import type { NamedQuery } from '../analysis/types.js';
import { distinctQueries } from './floor.js';

export interface WarehouseFloorArgs {
  url: string;
  schema: string;
  queries: NamedQuery[];
}

export interface StatementCount {
  name: string;
  ms: number;
  /** Rows the statement returned to us. */
  rowsReturned: number;
  /** Rows the shards sent the coordinator (0 on a plain server: no foreign scans). */
  rowsFromShards: number;
  /** Foreign scans, and how many of them were aggregates computed on a shard. */
  foreignScans: number;
  aggregatedScans: number;
}

export interface WarehouseFloorResult {
  statements: number;
  distinct: number;
  floorMs: number;
  perStatement: StatementCount[];
  maxRssKb: number;
}

interface PlanNode {
  'Node Type'?: string;
  Relations?: string;
  'Remote SQL'?: string;
  'Actual Rows'?: number;
  'Actual Loops'?: number;
  Plans?: PlanNode[];
}

function foreignScans(node: PlanNode): PlanNode[] {
  return [...(node['Node Type'] === 'Foreign Scan' ? [node] : []), ...(node.Plans ?? []).flatMap(foreignScans)];
}

export async function runWarehouseFloor(args: WarehouseFloorArgs): Promise<WarehouseFloorResult> {
  const client = new pg.Client({ connectionString: args.url });
  await client.connect();
  try {
    await client.query(`SET search_path = ${quoteIdentifier(args.schema)}; SET enable_partitionwise_aggregate = on; SET TimeZone = 'UTC'`);
    const distinct = distinctQueries(args.queries);
    const timed: { name: string; ms: number; rows: number }[] = [];
    const started = performance.now();
    for (const q of distinct) {
      const t = performance.now();
      const r = await client.query(q.sql, q.params);
      timed.push({ name: q.name, ms: performance.now() - t, rows: r.rowCount ?? r.rows.length });
    }
    const floorMs = performance.now() - started;
    const perStatement: StatementCount[] = [];
    for (const [i, q] of distinct.entries()) {
      const r = await client.query<{ 'QUERY PLAN': { Plan: PlanNode }[] }>(`EXPLAIN (ANALYZE, VERBOSE, FORMAT JSON) ${q.sql}`, q.params);
      const scans = foreignScans(r.rows[0]!['QUERY PLAN'][0]!.Plan);
      perStatement.push({
        name: timed[i]!.name,
        ms: timed[i]!.ms,
        rowsReturned: timed[i]!.rows,
        rowsFromShards: scans.reduce((n, s) => n + (s['Actual Rows'] ?? 0) * (s['Actual Loops'] ?? 1), 0),
        foreignScans: scans.length,
        aggregatedScans: scans.filter((s) => /\bGROUP BY\b/.test(s['Remote SQL'] ?? '') && (s.Relations ?? '').startsWith('Aggregate on')).length,
      });
    }
    return { statements: args.queries.length, distinct: distinct.length, floorMs, perStatement, maxRssKb: process.resourceUsage().maxRSS };
  } finally {
    await client.end();
  }
}
