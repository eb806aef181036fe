// A config expression (config/expression.ts) written as SQL for one engine. Every identifier is
// quoted, every literal is written from its parsed value (strings with their quotes doubled,
// numbers from finite numbers), and each function is spelled the way both engines agree on, so the
// same expression gives the same values on DuckDB and PostgreSQL.
import type { CastType, Expr } from '../../config/expression.js';
import type { Dialect } from './dialect.js';
import { dateFormatPattern, parseDateFormat, postgresDateFormat } from '../../config/date-format.js';

const CAST_SQL: Record<Dialect['name'], Record<CastType, string>> = {
  duckdb: { integer: 'BIGINT', double: 'DOUBLE', text: 'VARCHAR', date: 'DATE', timestamp: 'TIMESTAMP', boolean: 'BOOLEAN' },
  postgres: { integer: 'BIGINT', double: 'DOUBLE PRECISION', text: 'TEXT', date: 'DATE', timestamp: 'TIMESTAMP', boolean: 'BOOLEAN' },
};

export function expressionSql(e: Expr, dialect: Dialect): string {
  const s = (x: Expr) => expressionSql(x, dialect);
  const dbl = (x: Expr) => `CAST(${s(x)} AS ${CAST_SQL[dialect.name].double})`;
  switch (e.type) {
    case 'column':
      return dialect.quoteIdent(e.name);
    case 'number':
      // Written from the parsed number; a float literal is typed double on both engines.
      return Number.isInteger(e.value) ? String(e.value) : `CAST(${JSON.stringify(e.value)} AS ${CAST_SQL[dialect.name].double})`;
    case 'string':
      return `'${e.value.replaceAll("'", "''")}'`;
    case 'boolean':
      return e.value ? 'TRUE' : 'FALSE';
    case 'null':
      return 'NULL';
    case 'unary':
      if (e.op === '-' || e.op === '+') return `(${e.op}${s(e.operand)})`;
      if (e.op === 'NOT') return `(NOT ${s(e.operand)})`;
      return `(${s(e.operand)} ${e.op})`;
    case 'binary':
      switch (e.op) {
        // Integer division truncates on PostgreSQL and not on DuckDB, and PostgreSQL stops on a
        // zero divisor: both engines divide as doubles, and a zero divisor gives no value.
        case '/':
          return `(${dbl(e.left)} / NULLIF(${dbl(e.right)}, 0))`;
        case '!=':
          return `(${s(e.left)} <> ${s(e.right)})`;
        default:
          return `(${s(e.left)} ${e.op} ${s(e.right)})`;
      }
    case 'in':
      return `(${s(e.value)} ${e.negated ? 'NOT IN' : 'IN'} (${e.list.map(s).join(', ')}))`;
    case 'between':
      return `(${s(e.value)} ${e.negated ? 'NOT BETWEEN' : 'BETWEEN'} ${s(e.low)} AND ${s(e.high)})`;
    case 'case':
      return `(CASE${e.subject ? ` ${s(e.subject)}` : ''}${e.whens.map((w) => ` WHEN ${s(w.when)} THEN ${s(w.then)}`).join('')}${e.otherwise ? ` ELSE ${s(e.otherwise)}` : ''} END)`;
    case 'cast':
      return `CAST(${s(e.operand)} AS ${CAST_SQL[dialect.name][e.to]})`;
    case 'call':
      return callSql(e.fn, e.args, dialect, s, dbl);
  }
}

function callSql(fn: Extract<Expr, { type: 'call' }>['fn'], args: Expr[], dialect: Dialect, s: (x: Expr) => string, dbl: (x: Expr) => string): string {
  const a = args.map(s);
  const int = (x: string) => `CAST(${x} AS INTEGER)`;
  switch (fn) {
    case 'year':
    case 'quarter':
    case 'month':
    case 'day':
    case 'isodow':
      // EXTRACT is numeric on PostgreSQL and BIGINT on DuckDB; both become whole numbers.
      return `CAST(EXTRACT(${fn.toUpperCase()} FROM ${a[0]}) AS INTEGER)`;
    case 'strptime': {
      // The format was checked at load (config/expression.ts); each engine's spelling is built
      // from its parsed codes and written as a quoted literal.
      const format = args[1]!.type === 'string' ? args[1]!.value : '';
      const parts = parseDateFormat(format);
      if (typeof parts === 'string') throw new Error(parts);
      const quote = (t: string) => `'${t.replaceAll("'", "''")}'`;
      if (dialect.name === 'duckdb') return `try_strptime(CAST(${a[0]} AS VARCHAR), ${quote(format)})`;
      const text = `CAST(${a[0]} AS TEXT)`;
      return `(CASE WHEN trim(${text}) ~ ${quote(dateFormatPattern(parts))} THEN CAST(to_timestamp(trim(${text}), ${quote(postgresDateFormat(parts))}) AS TIMESTAMP) END)`;
    }
    case 'make_date':
      return `make_date(${a.map(int).join(', ')})`;
    case 'round':
      // PostgreSQL rounds to places only on NUMERIC.
      if (a.length === 1) return `ROUND(${dbl(args[0]!)})`;
      return dialect.name === 'postgres'
        ? `CAST(ROUND(CAST(${a[0]} AS NUMERIC), ${int(a[1]!)}) AS DOUBLE PRECISION)`
        : `ROUND(${dbl(args[0]!)}, ${int(a[1]!)})`;
    case 'sqrt':
    case 'ln':
    case 'exp':
      return `${fn.toUpperCase()}(${dbl(args[0]!)})`;
    case 'power':
      return `POWER(${dbl(args[0]!)}, ${dbl(args[1]!)})`;
    case 'substr':
      return `SUBSTR(${a[0]}, ${a.slice(1).map(int).join(', ')})`;
    default:
      return `${fn.toUpperCase()}(${a.join(', ')})`;
  }
}
