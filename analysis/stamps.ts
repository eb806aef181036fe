// How often the data is stamped: one row a day, a week, a month... Read from the gaps between the
// distinct local dates, so monthly data stamped on the 1st is known to be monthly (its last month is
// complete, and it has no day-of-week pattern to find) however many rows each stamp holds.
import type { CompileContext } from './compile-context.js';
import { localDateExpr, tableRef } from './compile-context.js';
import type { Dialect } from './sql/dialect.js';
import { QueryBuilder } from './sql/query-builder.js';
import type { CompiledQuery, ResultTable } from './types.js';

export type StampGranularity = 'daily' | 'weekly' | 'monthly' | 'quarterly' | 'yearly' | 'irregular';

/** One row: distinct dates, the periods they fall in, and how many gaps between them have each length. */
export function compileStamps(ctx: CompileContext): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const date = localDateExpr(q, ctx);
  // Grouped rather than DISTINCT: the same rows, and a warehouse partitioned by the time column
  // groups each partition where it lives.
  return q.finish(`WITH tc_dates AS (
  SELECT ${date} AS tc_d FROM ${tableRef(q, ctx)} GROUP BY 1
), ${stampGaps('tc_dates')}
SELECT ${stampColumns(ctx.dialect).join(',\n  ')}
FROM tc_gaps`);
}

/** The CTE `tc_gaps`: each distinct date (`tc_d` of `dates`, one row per date) and the days since the one before. */
export function stampGaps(dates: string): string {
  return `tc_gaps AS (
  SELECT tc_d, tc_d - LAG(tc_d) OVER (ORDER BY tc_d) AS tc_gap FROM ${dates} WHERE tc_d IS NOT NULL
)`;
}

/** The columns readStamps reads, aggregated over `tc_gaps`. */
export function stampColumns(d: Dialect): string[] {
  const n = (e: string) => d.toDouble(e);
  const gap = (lo: number, hi: number) => n(`COUNT(*) FILTER (WHERE tc_gap BETWEEN ${lo} AND ${hi})`);
  return [
    `${n('COUNT(*)')} AS dates`,
    `${n(`COUNT(DISTINCT ${d.periodStart('week', 'tc_d')})`)} AS weeks`,
    `${n(`COUNT(DISTINCT ${d.periodStart('month', 'tc_d')})`)} AS months`,
    `${n(`COUNT(DISTINCT ${d.periodStart('quarter', 'tc_d')})`)} AS quarters`,
    `${n(`COUNT(DISTINCT ${d.periodStart('year', 'tc_d')})`)} AS years`,
    `${n('COUNT(tc_gap)')} AS gaps`,
    `${gap(1, 1)} AS gaps_day`,
    `${gap(7, 7)} AS gaps_week`,
    `${gap(28, 31)} AS gaps_month`,
    `${gap(89, 92)} AS gaps_quarter`,
    `${gap(365, 366)} AS gaps_year`,
  ];
}

/**
 * The granularity whose gap length most of the gaps have, when each of its periods holds at most
 * one stamp; daily when most gaps are one day (weekends or holidays missing still count as daily).
 */
export function readStamps(table: ResultTable): StampGranularity {
  const r = table.rows[0] ?? {};
  const v = (k: string) => Number(r[k] ?? 0);
  const dates = v('dates');
  const gaps = v('gaps');
  if (dates < 2 || gaps === 0) return 'irregular';
  const most = (k: string) => v(k) / gaps >= 0.5;
  if (dates === v('years') && most('gaps_year')) return 'yearly';
  if (dates === v('quarters') && most('gaps_quarter')) return 'quarterly';
  if (dates === v('months') && most('gaps_month')) return 'monthly';
  if (dates === v('weeks') && most('gaps_week')) return 'weekly';
  if (most('gaps_day')) return 'daily';
  return 'irregular';
}
