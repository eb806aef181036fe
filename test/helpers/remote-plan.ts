// Reads PostgreSQL's EXPLAIN (VERBOSE, FORMAT JSON) of a statement on the sharded coordinator:
// every Foreign Scan is a request postgres_fdw sends to a shard, and its "Remote SQL" is what the
// shard runs. A scan whose remote SQL groups (GROUP BY) returns aggregated rows; one without
// returns the shard's rows themselves, for the coordinator to aggregate.
import type { DataSource, RunOptions } from '../../analysis/sources/data-source.js';
import type { CompiledQuery } from '../../analysis/types.js';

export interface ForeignScan {
  /** What the scan covers, e.g. "Aggregate on (schema.bookings_p0 bookings)", or the relation's name. */
  relations: string;
  remoteSql: string;
}

interface PlanNode {
  'Node Type'?: string;
  Relations?: string;
  'Relation Name'?: string;
  Schema?: string;
  'Remote SQL'?: string;
  Plans?: PlanNode[];
}

/** The statement's plan, explained through the source (so with the settings its own queries run with). */
export async function explain(source: DataSource, q: CompiledQuery, options: RunOptions): Promise<PlanNode> {
  const t = await source.run({ sql: `EXPLAIN (VERBOSE, FORMAT JSON) ${q.sql}`, params: q.params }, options);
  const cell = t.rows[0]?.['QUERY PLAN'];
  const parsed = (typeof cell === 'string' ? JSON.parse(cell) : cell) as { Plan: PlanNode }[];
  return parsed[0]!.Plan;
}

export function foreignScans(node: PlanNode): ForeignScan[] {
  const own: ForeignScan[] =
    node['Node Type'] === 'Foreign Scan'
      ? [{ relations: node.Relations ?? `${node.Schema ?? ''}.${node['Relation Name'] ?? '?'}`, remoteSql: node['Remote SQL'] ?? '' }]
      : [];
  return [...own, ...(node.Plans ?? []).flatMap(foreignScans)];
}

/** The scans that fetch rows rather than aggregates; empty when every shard aggregates its own part. */
export function rowFetchingScans(scans: ForeignScan[]): ForeignScan[] {
  return scans.filter((s) => !/\bGROUP BY\b/.test(s.remoteSql) || !s.relations.startsWith('Aggregate on'));
}
