// The database's own floor: the plan's SQL statements, as our run bound them, executed one after
// another straight on DuckDB with the same settings our source opens it with; and a reference of
// what one shared scan would cost: a single GROUP BY at the plan's finest grain and dimensions; and
// the per-customer question's own reference: a bare GROUP BY customer over its window.
import { type DuckDBConnection, DuckDBInstance, type DuckDBValue } from '@duckdb/node-api';
import { executedStatements } from '../analysis/rollup/rollup.js';
import type { CompiledQuery } from '../analysis/types.js';

export interface FloorArgs {
  databasePath: string;
  queries: CompiledQuery[];
  threads?: number;
  memoryLimit?: string;
  /** The per-customer question's window [from, to), when the plan has one. */
  perCustomerWindow?: [string, string];
}

export interface FloorResult {
  /** Statements the plan ran, and how many of them were different. */
  statements: number;
  distinct: number;
  /** Every distinct statement once, in order, on one connection. */
  floorMs: number;
  /** Every statement as the plan ran it, repeats included. */
  allStatementsMs: number;
  perStatementMs: number[];
  /** The floor's statements that make or read the run's rollup (the shared scan), and the rest (reading the table). */
  sharedScanMs: number;
  tableScanMs: number;
  groupByMs: number;
  groupByRows: number;
  /** A bare GROUP BY customer (a count each) over the per-customer question's window; null without one. */
  customerGroupByMs: number | null;
  customerGroups: number | null;
  openMs: number;
  /** CPU time (user + system, every thread of the process) while the floor's statements ran. */
  floorCpuMs: number;
  /** Peak resident memory after the floor's statements, before the references ran. */
  maxRssKb: number;
}

/** month x route x channel x fare_class x pass_holder, with the sums, counts and sums of squares a rollup would keep. */
export const SINGLE_GROUP_BY = `SELECT CAST(date_trunc('month', sail_date) AS DATE) AS month, route, channel, fare_class, pass_holder,
  COUNT(*) AS n,
  SUM(fare_total) AS fare_total, SUM(CAST(fare_total AS DOUBLE) * CAST(fare_total AS DOUBLE)) AS fare_total_sq,
  SUM(passengers) AS passengers, SUM(CAST(passengers AS DOUBLE) * CAST(passengers AS DOUBLE)) AS passengers_sq,
  SUM(refund_amount) AS refund_amount, SUM(CAST(refund_amount AS DOUBLE) * CAST(refund_amount AS DOUBLE)) AS refund_amount_sq,
  COUNT(*) FILTER (WHERE refunded) AS refunded
FROM bookings
GROUP BY ALL`;

/** Bookings per customer and nothing else: what any per-customer question must at least do. */
export const CUSTOMER_GROUP_BY = `SELECT customer_id, COUNT(*) AS n
FROM bookings
WHERE sail_date >= CAST($1 AS DATE) AND sail_date < CAST($2 AS DATE) AND customer_id IS NOT NULL
GROUP BY customer_id`;

export function distinctQueries<T extends CompiledQuery>(queries: T[]): T[] {
  const seen = new Map<string, T>();
  for (const q of queries) {
    const key = `${q.sql}\u0000${JSON.stringify(q.params)}`;
    if (!seen.has(key)) seen.set(key, q);
  }
  return [...seen.values()];
}

async function dropStoredRollups(connection: DuckDBConnection): Promise<void> {
  const reader = await connection.runAndReadAll("SELECT table_name FROM duckdb_tables() WHERE database_name = 'memory'");
  for (const [name] of reader.getRows()) await connection.run(`DROP TABLE memory.main.${String(name)}`);
}

export async function runFloor(args: FloorArgs): Promise<FloorResult> {
  const settings: Record<string, string> = {};
  if (args.threads) settings.threads = String(args.threads);
  if (args.memoryLimit) settings.memory_limit = args.memoryLimit;
  const opened = performance.now();
  // Opened as our source opens it: an in-memory catalog (where rollups are stored) with the data
  // file attached read-only as the default database.
  const instance = await DuckDBInstance.create(':memory:', settings);
  const connection = await instance.connect();
  await connection.run(`ATTACH '${args.databasePath.replaceAll("'", "''")}' AS tc_data (READ_ONLY)`);
  await connection.run('USE tc_data');
  const openMs = performance.now() - opened;
  try {
    const run = async (q: CompiledQuery) => {
      const reader = await connection.runAndReadAll(q.sql, q.params as DuckDBValue[]);
      return reader.currentRowCount;
    };
    // What our engine executes: each distinct rollup stored once, then every statement as it ran
    // (queries over the rollup read the stored copy).
    const distinct = executedStatements(distinctQueries(args.queries));
    const perStatementMs: number[] = [];
    const cpuBefore = process.cpuUsage();
    const started = performance.now();
    for (const q of distinct) {
      const t = performance.now();
      await run(q);
      perStatementMs.push(performance.now() - t);
    }
    const floorMs = performance.now() - started;
    const cpu = process.cpuUsage(cpuBefore);
    await dropStoredRollups(connection);
    const allStarted = performance.now();
    for (const q of executedStatements(args.queries)) await run(q);
    const allStatementsMs = performance.now() - allStarted;
    const maxRssKb = process.resourceUsage().maxRSS;
    await dropStoredRollups(connection);
    const g = performance.now();
    const groupByRows = await run({ sql: SINGLE_GROUP_BY, params: [] });
    const groupByMs = performance.now() - g;
    let customerGroupByMs: number | null = null;
    let customerGroups: number | null = null;
    if (args.perCustomerWindow) {
      const c = performance.now();
      customerGroups = await run({ sql: CUSTOMER_GROUP_BY, params: args.perCustomerWindow });
      customerGroupByMs = performance.now() - c;
    }
    const shared = distinct.map((q) => q.sql.includes('memory.main.tc_rollup_'));
    const sum = (pick: boolean) => perStatementMs.reduce((t, ms, i) => t + (shared[i] === pick ? ms : 0), 0);
    return {
      statements: args.queries.length,
      distinct: distinct.length,
      floorMs,
      allStatementsMs,
      perStatementMs,
      sharedScanMs: sum(true),
      tableScanMs: sum(false),
      groupByMs,
      groupByRows,
      customerGroupByMs,
      customerGroups,
      openMs,
      floorCpuMs: (cpu.user + cpu.system) / 1000,
      maxRssKb,
    };
  } finally {
    connection.closeSync();
    instance.closeSync();
  }
}
