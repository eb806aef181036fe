// The seam between sub-question templates and SQL engines. Templates write SQL only through
// a Dialect, so the same template compiles for DuckDB now and PostgreSQL later.
import type { Grain } from '../types.js';

export interface Dialect {
  readonly name: 'duckdb' | 'postgres';
  /** The only way an identifier enters SQL; identifiers come from the catalog, never from chat text. */
  quoteIdent(name: string): string;
  /** Positional placeholder for the 1-based parameter `index`. */
  placeholder(index: number): string;
  /** The first day of the period at `grain` that contains the date expression, as a DATE. */
  periodStart(grain: Grain, dateExpr: string): string;
  /** A timestamp (with or without zone) expression turned into a calendar date in `timeZone`. */
  localDate(expr: string, columnType: TimeColumnType, timeZone: string, bind: (v: string) => string): string;
  /** Cast to double precision so aggregates arrive as plain floating point numbers. */
  toDouble(expr: string): string;
  /** A bound parameter read as a DATE. */
  dateParam(placeholder: string): string;
  /** A bound parameter read as a value of the time column's type (a window's end, see sql/time-range.ts). */
  timeParam(placeholder: string, type: TimeColumnType): string;
}

export type TimeColumnType = 'date' | 'timestamp' | 'timestamptz';

const GRAIN_UNIT: Record<Grain, string> = { day: 'day', week: 'week', month: 'month', quarter: 'quarter', year: 'year' };

/** The SQL standard names of the time column types, which both engines take in a CAST. */
export const TIME_TYPE: Record<TimeColumnType, string> = { date: 'DATE', timestamp: 'TIMESTAMP', timestamptz: 'TIMESTAMP WITH TIME ZONE' };

/**
 * The continuous quantile `p` of a column (interpolated between the two nearest values, as both
 * engines define it): quantile_cont in DuckDB, the SQL standard ordered-set aggregate
 * percentile_cont(p) WITHIN GROUP in PostgreSQL. `p` is a number the code chose (a statistic the
 * reader parsed, checked to lie in (0, 1)), written as a literal: DuckDB takes only a constant.
 */
export function quantileAggregate(dialect: Pick<Dialect, 'name'>, expr: string, p: number): string {
  if (!(p > 0 && p < 1)) throw new Error(`quantile ${p} is not between 0 and 1`);
  const lit = String(p);
  return dialect.name === 'duckdb' ? `quantile_cont(${expr}, ${lit})` : `percentile_cont(${lit}) WITHIN GROUP (ORDER BY ${expr})`;
}

export function quoteIdentifier(name: string): string {
  // Doubling the quote character is the SQL standard escape for delimited identifiers.
  return `"${name.replaceAll('"', '""')}"`;
}

export const duckdbDialect: Dialect = {
  name: 'duckdb',
  quoteIdent: quoteIdentifier,
  placeholder: (i) => `$${i}`,
  // date_trunc on a DATE returns a TIMESTAMP in DuckDB; cast back so periods stay calendar dates.
  periodStart: (grain, e) => (grain === 'day' ? `CAST(${e} AS DATE)` : `CAST(date_trunc('${GRAIN_UNIT[grain]}', ${e}) AS DATE)`),
  localDate: (e, type, tz, bind) =>
    type === 'date' ? e : type === 'timestamptz' ? `CAST(timezone(${bind(tz)}, ${e}) AS DATE)` : `CAST(${e} AS DATE)`,
  toDouble: (e) => `CAST(${e} AS DOUBLE)`,
  dateParam: (p) => `CAST(${p} AS DATE)`,
  timeParam: (p, type) => `CAST(${p} AS ${TIME_TYPE[type]})`,
};
