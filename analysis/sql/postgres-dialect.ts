// PostgreSQL (and warehouses that speak its dialect). Same standard SQL as DuckDB; the
// differences are how a date is truncated and how a zoned timestamp becomes a local date.
import type { Grain } from '../types.js';
import { quoteIdentifier, TIME_TYPE, type Dialect } from './dialect.js';

const GRAIN_UNIT: Record<Grain, string> = { day: 'day', week: 'week', month: 'month', quarter: 'quarter', year: 'year' };

export const postgresDialect: Dialect = {
  name: 'postgres',
  quoteIdent: quoteIdentifier,
  placeholder: (i) => `$${i}`,
  // date_trunc has no DATE form: given a DATE, PostgreSQL picks the timestamptz form, which
  // truncates in the session's time zone. Truncating a zone-less TIMESTAMP avoids that; weeks
  // start on Monday (ISO), as in DuckDB.
  periodStart: (grain, e) =>
    grain === 'day' ? `CAST(${e} AS DATE)` : `CAST(date_trunc('${GRAIN_UNIT[grain]}', CAST(${e} AS TIMESTAMP)) AS DATE)`,
  // `AT TIME ZONE` on a timestamptz gives the wall-clock time in that zone; the zone name is a
  // bound parameter, cast so PostgreSQL need not guess between its text and interval forms.
  localDate: (e, type, tz, bind) =>
    type === 'date' ? e : type === 'timestamptz' ? `CAST((${e} AT TIME ZONE CAST(${bind(tz)} AS TEXT)) AS DATE)` : `CAST(${e} AS DATE)`,
  toDouble: (e) => `CAST(${e} AS DOUBLE PRECISION)`,
  dateParam: (p) => `CAST(${p} AS DATE)`,
  timeParam: (p, type) => `CAST(${p} AS ${TIME_TYPE[type]})`,
};
