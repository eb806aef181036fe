// SQL pieces the KPI templates share: the period expression and a WHERE that reads only the
// named periods (plus the sub-question's segment filters). Every date is a bound parameter.
import { type CompileContext, dateRanges, localDateExpr, type PeriodScope, periodScope, segmentConditions } from '../compile-context.js';
import { nextPeriod } from '../periods.js';
import type { QueryBuilder } from '../sql/query-builder.js';
import type { CellValue, Grain, ResultTable, SegmentFilter } from '../types.js';

export function periodExpr(q: QueryBuilder, ctx: CompileContext, grain: Grain): string {
  return ctx.dialect.periodStart(grain, localDateExpr(q, ctx));
}

/**
 * Rows in exactly the given periods: one date range per run of adjacent periods (a latest month
 * and the one before read as one range), each on the time column itself.
 */
export function periodsWhere(q: QueryBuilder, ctx: CompileContext, periods: string[], grain: Grain, filters: SegmentFilter[]): string {
  if (periods.length === 0) return 'FALSE';
  const ranges = dateRanges(
    q,
    ctx,
    periods.map((p) => ({ start: p, end: nextPeriod(p, grain) })),
  );
  return [ranges, ...segmentConditions(q, ctx, filters)].join('\n  AND ');
}

/** The named periods read as a period scope (compile-context.ts): a filtered count of a period with rows but none matching is 0. */
export function periodsScope(q: QueryBuilder, ctx: CompileContext, periods: string[], grain: Grain, filters: SegmentFilter[]): PeriodScope {
  return periodScope(q, ctx, periods.map((p) => ({ start: p, end: nextPeriod(p, grain) })), filters);
}

export function numberOrNull(v: CellValue | undefined): number | null {
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

export const EMPTY_TABLE: ResultTable = { columns: [], rows: [], truncated: false };
