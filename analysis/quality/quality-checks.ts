// Data-quality checks run with every answer: missing values in the columns it used, repeated
// keys, negative amounts and how fresh the data is. One query counting by day over the whole
// table, and one for repeated keys, read into a plain report; the caveats an answer carries are
// chosen from it in quality-caveats.ts.
import type { DatasetConfig } from '../../config/schema.js';
import { type CompileContext, localDateExpr, tableRef } from '../compile-context.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { CellValue, CompiledQuery, NamedQuery, ResultTable } from '../types.js';

export const QUALITY_QUERY = 'quality';
/** The repeated-key count, a query of its own: it groups by the key, which nothing else does. */
export const DUPLICATES_QUERY = 'quality_keys';
/** A sampled key count reads the keys whose md5 starts with this hex digit: 1 key in 16. */
export const KEY_SAMPLE_ONE_IN = 16;

// Result column prefixes; the rest of the name is the checked column (a catalog identifier).
const NULLS = 'nulls__';
const NEGATIVE = 'negative__';

export interface QualityReport {
  rows: number;
  /** Per checked column: rows where it is missing, and that count over all rows (0 when the table is empty). */
  nulls: { column: string; count: number; share: number }[];
  /**
   * Key values that occur more than once, and the rows beyond the first of each; null without a
   * key column or when not counted. `sampledOneIn`: 1 for a count over every key, N when counted
   * over the keys of a fixed 1-in-N sample (by their md5) and scaled up, so an estimate.
   */
  duplicateKeys: { column: string; keys: number; extraRows: number; sampledOneIn: number } | null;
  /** Per configured amount column: rows below zero. */
  negatives: { column: string; count: number }[];
  /** The latest date of the time column in the dataset's time zone; null when the table is empty. */
  lastDate: string | null;
}

/** Every column the catalog names; only these may be checked, so no identifier comes from elsewhere. */
export function catalogColumns(ds: DatasetConfig): Set<string> {
  const cols = new Set<string>([ds.time_column, ...ds.amount_columns]);
  if (ds.key_column) cols.add(ds.key_column);
  for (const d of ds.dimensions) cols.add(d.column);
  for (const g of ds.comparison_groups) {
    cols.add(g.column);
    if (g.unit_column) cols.add(g.unit_column);
  }
  for (const m of ds.metrics) {
    const def = m.definition;
    if ('column' in def) cols.add(def.column);
    if ('where' in def && def.where) cols.add(def.where.column);
  }
  return cols;
}

/** How repeated keys are counted: over every key, over a fixed sample of keys, or not at all this time. */
export type DuplicateCount = 'full' | 'sampled' | 'none';

export interface QualityCheckOptions {
  /**
   * Count repeated keys (default 'full'). The count groups every key of the table, the costly
   * part of the check: 'sampled' groups 1 key in 16; a caller that already knows it for this data
   * passes 'none'.
   */
  duplicates?: DuplicateCount;
}

/**
 * The checks as SQL. Counts are made per local day first and then added up, so an engine that
 * sends work to where the data is (a table partitioned or sharded on the time column) counts each
 * day there and returns one row per day; the repeated-key count is a query of its own.
 */
export function compileQualityChecks(ctx: CompileContext, columns: string[], opts: QualityCheckOptions = {}): NamedQuery[] {
  const ds = ctx.dataset;
  const known = catalogColumns(ds);
  const unknown = columns.filter((c) => !known.has(c));
  if (unknown.length > 0) throw new Error(`not a column of the ${ds.name} catalog: ${unknown.join(', ')}`);
  const q = new QueryBuilder(ctx.dialect);
  const d = ctx.dialect;
  const day = q.ident('tc_day');
  const perDay = [`COUNT(*) AS ${q.ident('tc_day_rows')}`];
  const totals = [`${d.toDouble(`SUM(${q.ident('tc_day_rows')})`)} AS row_count`, `MAX(${day}) AS last_date`];
  const count = (name: string, condition: string) => {
    perDay.push(`COUNT(*) FILTER (WHERE ${condition}) AS ${q.ident(name)}`);
    totals.push(`${d.toDouble(`SUM(${q.ident(name)})`)} AS ${q.ident(name)}`);
  };
  for (const c of [...new Set(columns)]) count(NULLS + c, `${q.ident(c)} IS NULL`);
  for (const c of [...new Set(ds.amount_columns)]) count(NEGATIVE + c, `${q.ident(c)} < ${q.bind(0)}`);
  const checks = q.finish(`SELECT ${totals.join(',\n  ')}
FROM (
  SELECT ${localDateExpr(q, ctx)} AS ${day},
    ${perDay.join(',\n    ')}
  FROM ${tableRef(q, ctx)}
  GROUP BY 1
) tc_days`);
  const out: NamedQuery[] = [{ name: QUALITY_QUERY, ...checks }];
  const mode = opts.duplicates ?? 'full';
  if (ds.key_column && mode !== 'none') out.push({ name: DUPLICATES_QUERY, ...compileDuplicates(ctx, ds.key_column, mode === 'sampled') });
  return out;
}

/**
 * Keys that occur more than once, and the rows beyond the first of each. Sampled: only the keys
 * whose md5 starts with one hex digit (every copy of a key is in or out together, so the count
 * is exact for the sample and is scaled up by 16); the condition is a plain function of the key
 * alone, so a partitioned or sharded warehouse applies it where the rows are.
 */
function compileDuplicates(ctx: CompileContext, keyColumn: string, sampled: boolean): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const d = ctx.dialect;
  const key = q.ident(keyColumn);
  // Bound in the order they appear, so the numbered placeholders read in order.
  const select = `SELECT ${d.toDouble('COUNT(*)')} AS duplicate_keys,
  ${d.toDouble(`COALESCE(SUM(copies - ${q.bind(1)}), ${q.bind(0)})`)} AS duplicate_extra_rows,
  ${d.toDouble(q.bind(sampled ? KEY_SAMPLE_ONE_IN : 1))} AS sampled_one_in`;
  const sample = sampled ? `\n    AND substr(md5(CAST(${key} AS VARCHAR)), 1, 1) = ${q.bind('0')}` : '';
  return q.finish(`${select}
FROM (
  SELECT COUNT(*) AS copies
  FROM ${tableRef(q, ctx)}
  WHERE ${key} IS NOT NULL${sample}
  GROUP BY ${key}
  HAVING COUNT(*) > ${q.bind(1)}
) repeated`);
}

export function readQuality(tables: Record<string, ResultTable>, ctx: { dataset: DatasetConfig }): QualityReport {
  const table = tables[QUALITY_QUERY];
  const row: Record<string, CellValue> = table?.rows[0] ?? {};
  const rows = num(row.row_count);
  const nulls: QualityReport['nulls'] = [];
  const negatives: QualityReport['negatives'] = [];
  for (const [name, v] of Object.entries(row)) {
    if (name.startsWith(NULLS)) {
      const count = num(v);
      nulls.push({ column: name.slice(NULLS.length), count, share: rows > 0 ? count / rows : 0 });
    } else if (name.startsWith(NEGATIVE)) {
      negatives.push({ column: name.slice(NEGATIVE.length), count: num(v) });
    }
  }
  const key = ctx.dataset.key_column;
  const dup: Record<string, CellValue> | undefined = tables[DUPLICATES_QUERY]?.rows[0];
  const sampledOneIn = Math.max(1, num(dup?.sampled_one_in));
  const duplicateKeys =
    key && dup ? { column: key, keys: num(dup.duplicate_keys) * sampledOneIn, extraRows: num(dup.duplicate_extra_rows) * sampledOneIn, sampledOneIn } : null;
  const last = row.last_date;
  return { rows, nulls, duplicateKeys, negatives, lastDate: typeof last === 'string' ? last.slice(0, 10) : null };
}

function num(v: CellValue | undefined): number {
  return typeof v === 'number' && Number.isFinite(v) ? v : 0;
}
