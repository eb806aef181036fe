// SQL pieces the KPI templates share: the period expression and a WHERE that reads only the
// named periods (plus the sub-question's segment filters). Every date is a bound parameter.
import { type CompileContext, localDateExpr, whereClause } from '../compile-context.js';
import { nextPeriod } from '../periods.js';
import type { QueryBuilder } from '../sql/query-builder.js';
import type { CellValue, Grain, ResultTable, SegmentFilter } from '../types.js';

export function periodExpr(q: QueryBuilder, ctx: CompileContext, grain: Grain): string {
  return ctx.dialect.periodStart(grain, localDateExpr(q, ctx));
}

/**
 * Rows in exactly the given periods. The outer date range lets the engine skip whole blocks;
 * the IN list keeps only the periods asked for.
 */
export function periodsWhere(q: QueryBuilder, ctx: CompileContext, periods: string[], grain: Grain, filters: SegmentFilter[]): string {
  if (periods.length === 0) return 'FALSE';
  const sorted = [...periods].sort();
  const span = { start: sorted[0]!, end: nextPeriod(sorted[sorted.length - 1]!, grain) };
  const list = sorted.map((p) => ctx.dialect.dateParam(q.bind(p))).join(', ');
  return `${whereClause(q, ctx, span, filters)}\n  AND ${periodExpr(q, ctx, grain)} IN (${list})`;
}

export function numberOrNull(v: CellValue | undefined): number | null {
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

export const EMPTY_TABLE: ResultTable = { columns: [], rows: [], truncated: false };
