// The dataset's time coverage (first and last date, rows): what partial-period and
// freshness checks compare against. Run once per plan.
import type { CompileContext } from './compile-context.js';
import { localDateExpr, tableRef } from './compile-context.js';
import type { DataSource, RunOptions } from './sources/data-source.js';
import { QueryBuilder } from './sql/query-builder.js';
import { addDays, nextPeriod, periodStart } from './periods.js';
import { compileStamps, readStamps, type StampGranularity } from './stamps.js';
import type { CompiledQuery, ResultTable } from './types.js';

export interface Coverage {
  firstDate: string | null;
  lastDate: string | null;
  rows: number;
  /**
   * How often the data is stamped (analysis/stamps.ts), when it was read: data coarser than daily
   * has no daily grain and no day-of-week pattern, and its last stamped period is complete.
   */
  stamps?: StampGranularity;
}

/**
 * Rows counted per local day first, then the first and last day and the total: an engine that
 * sends work to where the data is (a table partitioned or sharded on the time column) counts
 * each day there and returns one row per day.
 */
export function compileCoverage(ctx: CompileContext): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const day = q.ident('tc_day');
  const rows = q.ident('tc_rows');
  return q.finish(`SELECT MIN(${day}) AS first_date, MAX(${day}) AS last_date, ${ctx.dialect.toDouble(`SUM(${rows})`)} AS row_count
FROM (
  SELECT ${localDateExpr(q, ctx)} AS ${day}, COUNT(*) AS ${rows}
  FROM ${tableRef(q, ctx)}
  GROUP BY 1
) tc_days`);
}

export function readCoverage(table: ResultTable): Coverage {
  const r = table.rows[0];
  return {
    firstDate: (r?.first_date as string | null) ?? null,
    lastDate: (r?.last_date as string | null) ?? null,
    rows: Number(r?.row_count ?? 0),
  };
}

/** The coverage and the stamp granularity, as a workspace keeps them. */
export async function readDataCoverage(source: DataSource, ctx: CompileContext, options: RunOptions): Promise<Coverage> {
  const coverage = readCoverage(await source.run(compileCoverage(ctx), options));
  return { ...coverage, stamps: readStamps(await source.run(compileStamps(ctx), options)) };
}

/**
 * The day after the last day the data covers (half-open end). Data stamped once a month (or
 * week, quarter, year) covers the whole of its last stamped period: a series stamped on the 1st
 * through 1 April is complete for April, not one day of it.
 */
export function dataEnd(coverage: Pick<Coverage, 'lastDate' | 'stamps'> & { lastDate: string }): string {
  const last = coverage.lastDate;
  switch (coverage.stamps) {
    case 'weekly':
      return addDays(last, 7);
    case 'monthly':
      return nextPeriod(periodStart(last, 'month'), 'month');
    case 'quarterly':
      return nextPeriod(periodStart(last, 'quarter'), 'quarter');
    case 'yearly':
      return nextPeriod(periodStart(last, 'year'), 'year');
    default:
      return addDays(last, 1);
  }
}
