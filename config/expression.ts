// Expressions over a table's columns, as a config may write a metric, a dimension, a condition or
// a time column (`ticket_eur + extras_eur`, `isodow(visit_day) <= 5`). The text is parsed by
// pgsql-ast-parser (a maintained PostgreSQL-grammar parser, so quoting, precedence and string
// escapes follow standard SQL), and its tree is then copied into our own small tree node by node:
// anything not on the allow-list below (sub-queries, parameters, qualified names, aggregates,
// unknown functions, ...) is refused with a message. SQL is written back from our tree only
// (analysis/sql/expression-sql.ts), never from the text, so what runs is what was checked.
import { parse, type Expr as PgExpr } from 'pgsql-ast-parser';
import { parseDateFormat } from './date-format.js';

export type Expr =
  | { type: 'column'; name: string }
  | { type: 'number'; value: number; text: string }
  | { type: 'string'; value: string }
  | { type: 'boolean'; value: boolean }
  | { type: 'null' }
  | { type: 'unary'; op: UnaryOp; operand: Expr }
  | { type: 'binary'; op: BinaryOp; left: Expr; right: Expr }
  | { type: 'in'; negated: boolean; value: Expr; list: Expr[] }
  | { type: 'between'; negated: boolean; value: Expr; low: Expr; high: Expr }
  | { type: 'case'; subject: Expr | null; whens: { when: Expr; then: Expr }[]; otherwise: Expr | null }
  | { type: 'cast'; operand: Expr; to: CastType }
  | { type: 'call'; fn: FunctionName; args: Expr[] };

export type UnaryOp = '-' | '+' | 'NOT' | 'IS NULL' | 'IS NOT NULL' | 'IS TRUE' | 'IS NOT TRUE' | 'IS FALSE' | 'IS NOT FALSE';
export type BinaryOp = '+' | '-' | '*' | '/' | '%' | '||' | '=' | '!=' | '<' | '<=' | '>' | '>=' | 'AND' | 'OR' | 'LIKE' | 'NOT LIKE';
export type CastType = 'integer' | 'double' | 'text' | 'date' | 'timestamp' | 'boolean';

/** The functions an expression may call, with how many arguments each takes. */
export const EXPRESSION_FUNCTIONS = {
  abs: [1, 1],
  round: [1, 2],
  floor: [1, 1],
  ceil: [1, 1],
  sqrt: [1, 1],
  ln: [1, 1],
  exp: [1, 1],
  power: [2, 2],
  coalesce: [1, 16],
  nullif: [2, 2],
  greatest: [1, 16],
  least: [1, 16],
  lower: [1, 1],
  upper: [1, 1],
  trim: [1, 1],
  length: [1, 1],
  substr: [2, 3],
  year: [1, 1],
  quarter: [1, 1],
  month: [1, 1],
  day: [1, 1],
  isodow: [1, 1],
  make_date: [3, 3],
  // A date read from text by a format of C strptime codes (config/date-format.ts).
  strptime: [2, 2],
} as const satisfies Record<string, readonly [number, number]>;
export type FunctionName = keyof typeof EXPRESSION_FUNCTIONS;

const FUNCTION_ALIASES: Record<string, FunctionName> = { ceiling: 'ceil', pow: 'power', substring: 'substr', dayofmonth: 'day', try_strptime: 'strptime' };

const CAST_TYPES: Record<string, CastType> = {
  int: 'integer',
  integer: 'integer',
  bigint: 'integer',
  smallint: 'integer',
  double: 'double',
  'double precision': 'double',
  float: 'double',
  real: 'double',
  numeric: 'double',
  decimal: 'double',
  text: 'text',
  varchar: 'text',
  string: 'text',
  date: 'date',
  timestamp: 'timestamp',
  boolean: 'boolean',
  bool: 'boolean',
};

const BINARY_OPS = new Set<string>(['+', '-', '*', '/', '%', '||', '=', '!=', '<', '<=', '>', '>=', 'AND', 'OR', 'LIKE', 'NOT LIKE']);
const UNARY_OPS = new Set<string>(['-', '+', 'NOT', 'IS NULL', 'IS NOT NULL', 'IS TRUE', 'IS NOT TRUE', 'IS FALSE', 'IS NOT FALSE']);
const EXTRACT_FIELDS: Record<string, FunctionName> = { year: 'year', quarter: 'quarter', month: 'month', day: 'day', isodow: 'isodow' };

export class ExpressionError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ExpressionError';
  }
}

const MAX_LENGTH = 2000;
const MAX_DEPTH = 40;

/** Parses and checks one expression; throws ExpressionError with a message for a person. */
export function parseExpression(text: string): Expr {
  if (text.length > MAX_LENGTH) throw new ExpressionError(`is longer than ${MAX_LENGTH} characters`);
  if (text.trim() === '') throw new ExpressionError('is empty');
  let tree: PgExpr;
  try {
    const parsed = parse(text, { entry: 'expr', locationTracking: true }) as unknown;
    tree = (Array.isArray(parsed) ? parsed[0] : parsed) as PgExpr;
  } catch (err) {
    const first = (err instanceof Error ? err.message : String(err)).split('\n')[0] ?? '';
    const at = /line (\d+) col (\d+)/.exec(first);
    throw new ExpressionError(`is not a valid expression${at ? ` (near column ${at[2]}: "${nearText(text, Number(at[2]))}")` : ''}`);
  }
  return convert(tree, text, 0);
}

function nearText(text: string, col: number): string {
  return text.slice(Math.max(0, col - 1), col + 11).trim();
}

function convert(node: PgExpr, text: string, depth: number): Expr {
  if (depth > MAX_DEPTH) throw new ExpressionError(`nests deeper than ${MAX_DEPTH} levels`);
  const sub = (n: PgExpr) => convert(n, text, depth + 1);
  const n = node as PgExpr & { _location?: { start: number; end: number } };
  switch (n.type) {
    case 'ref': {
      if (n.table) throw new ExpressionError(`names "${n.table.name}.${n.name}": write the column name alone (the table is the dataset's)`);
      if (n.name === '*') throw new ExpressionError('uses "*": name the columns');
      // The parser folds unquoted names to lower case (PostgreSQL's rule); a config names columns
      // as they are written, so an unquoted name keeps its own case.
      const raw = n._location ? text.slice(n._location.start, n._location.end) : n.name;
      const name = raw.startsWith('"') && raw.endsWith('"') ? raw.slice(1, -1).replaceAll('""', '"') : raw.startsWith('"') ? n.name : raw;
      return { type: 'column', name };
    }
    case 'integer':
    case 'numeric': {
      if (!Number.isFinite(n.value)) throw new ExpressionError(`has a number out of range`);
      return { type: 'number', value: n.value, text: String(n.value) };
    }
    case 'string':
      return { type: 'string', value: n.value };
    case 'boolean':
      return { type: 'boolean', value: n.value };
    case 'null':
      return { type: 'null' };
    case 'unary': {
      if (!UNARY_OPS.has(n.op)) throw new ExpressionError(`uses the operator ${n.op}, which is not allowed`);
      return { type: 'unary', op: n.op as UnaryOp, operand: sub(n.operand) };
    }
    case 'binary': {
      if (n.op === 'IN' || n.op === 'NOT IN') {
        if (n.right.type !== 'list') throw new ExpressionError(`uses ${n.op} with something other than a list of values`);
        return { type: 'in', negated: n.op === 'NOT IN', value: sub(n.left), list: n.right.expressions.map(sub) };
      }
      if (!BINARY_OPS.has(n.op)) throw new ExpressionError(`uses the operator ${n.op}, which is not allowed`);
      return { type: 'binary', op: n.op as BinaryOp, left: sub(n.left), right: sub(n.right) };
    }
    case 'ternary':
      return { type: 'between', negated: n.op === 'NOT BETWEEN', value: sub(n.value), low: sub(n.lo), high: sub(n.hi) };
    case 'case':
      return {
        type: 'case',
        subject: n.value ? sub(n.value) : null,
        whens: n.whens.map((w) => ({ when: sub(w.when), then: sub(w.value) })),
        otherwise: n.else ? sub(n.else) : null,
      };
    case 'cast': {
      const to = 'name' in n.to ? CAST_TYPES[n.to.name.toLowerCase()] : undefined;
      if (!to) throw new ExpressionError(`casts to a type that is not allowed (use one of ${[...new Set(Object.keys(CAST_TYPES))].join(', ')})`);
      // DATE '2024-01-01' arrives as a cast of a string: a date literal.
      return { type: 'cast', operand: sub(n.operand), to };
    }
    case 'extract': {
      const fn = EXTRACT_FIELDS[n.field.name.toLowerCase()];
      if (!fn) throw new ExpressionError(`extracts "${n.field.name}", which is not allowed (use year, quarter, month, day or isodow)`);
      return { type: 'call', fn, args: [sub(n.from)] };
    }
    case 'call': {
      const raw = n.function.name.toLowerCase();
      if (n.function.schema) throw new ExpressionError(`calls ${n.function.schema}.${n.function.name}: only the listed functions are allowed`);
      const fn = (raw in EXPRESSION_FUNCTIONS ? raw : FUNCTION_ALIASES[raw]) as FunctionName | undefined;
      if (!fn) {
        throw new ExpressionError(
          `calls the function ${n.function.name}, which is not allowed (allowed: ${Object.keys(EXPRESSION_FUNCTIONS).join(', ')}${isAggregate(raw) ? '; the metric itself says how rows are added up' : ''})`,
        );
      }
      if (n.distinct || n.filter || n.over || n.orderBy || n.withinGroup) throw new ExpressionError(`calls ${fn} with a clause that is not allowed`);
      const [min, max] = EXPRESSION_FUNCTIONS[fn];
      if (n.args.length < min || n.args.length > max) {
        throw new ExpressionError(`calls ${fn} with ${n.args.length} argument${n.args.length === 1 ? '' : 's'} (it takes ${min === max ? min : `${min} to ${max}`})`);
      }
      const args = n.args.map(sub);
      if (fn === 'strptime') {
        const format = args[1]!;
        if (format.type !== 'string') throw new ExpressionError(`calls strptime with a format that is not a quoted text ('%b %d %Y')`);
        const parsed = parseDateFormat(format.value);
        if (typeof parsed === 'string') throw new ExpressionError(parsed);
      }
      return { type: 'call', fn, args };
    }
    default:
      throw new ExpressionError(`uses ${describeNode(n.type)}, which is not allowed in an expression`);
  }
}

function isAggregate(name: string): boolean {
  return ['sum', 'count', 'avg', 'min', 'max', 'median', 'stddev', 'array_agg', 'string_agg'].includes(name);
}

function describeNode(type: string): string {
  if (type === 'select' || type === 'union' || type === 'union all' || type === 'with' || type === 'values') return 'a sub-query';
  if (type === 'parameter') return 'a parameter';
  return `a ${type} expression`;
}

/** Every column the expression reads, in order of first use. */
export function expressionColumns(e: Expr): string[] {
  const out = new Set<string>();
  const walk = (x: Expr): void => {
    switch (x.type) {
      case 'column':
        out.add(x.name);
        return;
      case 'unary':
        walk(x.operand);
        return;
      case 'binary':
        walk(x.left);
        walk(x.right);
        return;
      case 'in':
        walk(x.value);
        x.list.forEach(walk);
        return;
      case 'between':
        walk(x.value);
        walk(x.low);
        walk(x.high);
        return;
      case 'case':
        if (x.subject) walk(x.subject);
        for (const w of x.whens) {
          walk(w.when);
          walk(w.then);
        }
        if (x.otherwise) walk(x.otherwise);
        return;
      case 'cast':
        walk(x.operand);
        return;
      case 'call':
        x.args.forEach(walk);
        return;
      default:
        return;
    }
  };
  walk(e);
  return [...out];
}

/** The bare column an expression is, when it is nothing more than a column. */
export function bareColumn(e: Expr): string | null {
  return e.type === 'column' ? e.name : null;
}

/**
 * The expression written back in one canonical form, for people (captions, messages) and as the
 * name of the column it adds to the dataset's rows: plain names bare, others double-quoted.
 */
export function expressionText(e: Expr): string {
  const t = expressionText;
  switch (e.type) {
    case 'column':
      return /^[A-Za-z_][A-Za-z0-9_]*$/.test(e.name) ? e.name : `"${e.name.replaceAll('"', '""')}"`;
    case 'number':
      return e.text;
    case 'string':
      return `'${e.value.replaceAll("'", "''")}'`;
    case 'boolean':
      return e.value ? 'true' : 'false';
    case 'null':
      return 'null';
    case 'unary':
      return e.op === '-' || e.op === '+' ? `${e.op}${wrap(e.operand)}` : e.op === 'NOT' ? `not ${wrap(e.operand)}` : `${wrap(e.operand)} ${e.op.toLowerCase()}`;
    case 'binary':
      return `${wrap(e.left)} ${e.op.toLowerCase()} ${wrap(e.right)}`;
    case 'in':
      return `${wrap(e.value)} ${e.negated ? 'not in' : 'in'} (${e.list.map(t).join(', ')})`;
    case 'between':
      return `${wrap(e.value)} ${e.negated ? 'not between' : 'between'} ${wrap(e.low)} and ${wrap(e.high)}`;
    case 'case':
      return `case${e.subject ? ` ${t(e.subject)}` : ''}${e.whens.map((w) => ` when ${t(w.when)} then ${t(w.then)}`).join('')}${e.otherwise ? ` else ${t(e.otherwise)}` : ''} end`;
    case 'cast':
      return `cast(${t(e.operand)} as ${e.to})`;
    case 'call':
      return `${e.fn}(${e.args.map(t).join(', ')})`;
  }
}

function wrap(e: Expr): string {
  return e.type === 'binary' || e.type === 'in' || e.type === 'between' || (e.type === 'unary' && e.op !== '-' && e.op !== '+') ? `(${expressionText(e)})` : expressionText(e);
}
