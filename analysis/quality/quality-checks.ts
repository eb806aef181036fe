// Data-quality checks run with every answer: missing values in the columns it used, repeated
// keys, negative amounts and how fresh the data is. One query over the whole table, read into
// a plain report; the caveats an answer carries are chosen from it in quality-caveats.ts.
import type { DatasetConfig } from '../../config/schema.js';
import { type CompileContext, localDateExpr, tableRef } from '../compile-context.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { CellValue, NamedQuery, ResultTable } from '../types.js';

export const QUALITY_QUERY = 'quality';

// Result column prefixes; the rest of the name is the checked column (a catalog identifier).
const NULLS = 'nulls__';
const NEGATIVE = 'negative__';

export interface QualityReport {
  rows: number;
  /** Per checked column: rows where it is missing, and that count over all rows (0 when the table is empty). */
  nulls: { column: string; count: number; share: number }[];
  /** Key values that occur more than once, and the rows beyond the first of each; null without a key column. */
  duplicateKeys: { column: string; keys: number; extraRows: number } | null;
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

export interface QualityCheckOptions {
  /**
   * Count repeated keys (default true). The count groups every key of the table, the costly part
   * of the check; a caller that already knows it for this data leaves it out.
   */
  duplicates?: boolean;
}

export function compileQualityChecks(ctx: CompileContext, columns: string[], opts: QualityCheckOptions = {}): NamedQuery[] {
  const ds = ctx.dataset;
  const known = catalogColumns(ds);
  const unknown = columns.filter((c) => !known.has(c));
  if (unknown.length > 0) throw new Error(`not a column of the ${ds.name} catalog: ${unknown.join(', ')}`);
  const q = new QueryBuilder(ctx.dialect);
  const d = ctx.dialect;
  const table = tableRef(q, ctx);
  const checks = [`    ${d.toDouble('COUNT(*)')} AS row_count`, `    MAX(${localDateExpr(q, ctx)}) AS last_date`];
  for (const c of [...new Set(columns)]) {
    checks.push(`    ${d.toDouble(`COUNT(*) FILTER (WHERE ${q.ident(c)} IS NULL)`)} AS ${q.ident(NULLS + c)}`);
  }
  for (const c of [...new Set(ds.amount_columns)]) {
    checks.push(`    ${d.toDouble(`COUNT(*) FILTER (WHERE ${q.ident(c)} < ${q.bind(0)})`)} AS ${q.ident(NEGATIVE + c)}`);
  }
  let dups = '';
  let join = '';
  if (ds.key_column && opts.duplicates !== false) {
    const key = q.ident(ds.key_column);
    dups = `,
repeated AS (
  SELECT COUNT(*) AS copies
  FROM ${table}
  WHERE ${key} IS NOT NULL
  GROUP BY ${key}
  HAVING COUNT(*) > ${q.bind(1)}
),
duplicates AS (
  SELECT ${d.toDouble('COUNT(*)')} AS duplicate_keys, ${d.toDouble(`COALESCE(SUM(copies - ${q.bind(1)}), ${q.bind(0)})`)} AS duplicate_extra_rows
  FROM repeated
)`;
    join = '\nCROSS JOIN duplicates';
  }
  const sql = q.finish(`WITH checks AS (
  SELECT
${checks.join(',\n')}
  FROM ${table}
)${dups}
SELECT *
FROM checks${join}`);
  return [{ name: QUALITY_QUERY, ...sql }];
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
  const duplicateKeys = key && 'duplicate_keys' in row ? { column: key, keys: num(row.duplicate_keys), extraRows: num(row.duplicate_extra_rows) } : null;
  const last = row.last_date;
  return { rows, nulls, duplicateKeys, negatives, lastDate: typeof last === 'string' ? last.slice(0, 10) : null };
}

function num(v: CellValue | undefined): number {
  return typeof v === 'number' && Number.isFinite(v) ? v : 0;
}
