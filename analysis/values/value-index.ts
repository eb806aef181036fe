// The values of each dimension, so a request that names one ("app vs web", "on the Saltreach
// route") is read as a filter: the most common values of every non-personal dimension, up to a
// cap each. Personal-data columns are never read. Kept beside the state file per version of the
// data, like the quality report, so a restart does not scan the table again.
import { createHash } from 'node:crypto';
import { dirname, join, resolve } from 'node:path';
import { z } from 'zod';
import type { LoadedConfig } from '../../config/load.js';
import type { DatasetConfig, Dimension } from '../../config/schema.js';
import { readJsonFile, writeJsonFile } from '../cache/json-file.js';
import { datasetRelation, localDateExpr, type CompileContext } from '../compile-context.js';
import { dataVersion } from '../quality/data-version.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { CompiledQuery, ResultTable } from '../types.js';
import type { Workspace } from '../workspace.js';

export interface IndexedValue {
  value: string;
  rows: number;
  /** Calendar months with a row of this value: how far it persists through the data (bot/brief-defaults.ts). */
  months?: number;
  /** Its first and last local day with a row (ISO dates): where its life in the data begins and ends (analysis/presence.ts). */
  first?: string;
  last?: string;
}

export interface DimensionValues {
  values: IndexedValue[];
  /** False when the dimension has more values than the cap: a value not listed may still exist. */
  complete: boolean;
}

/** By dimension name. */
export type ValueIndex = ReadonlyMap<string, DimensionValues>;

/** Values kept per dimension: enough for any dimension a person names values of by heart. */
export const VALUE_INDEX_CAP = 500;

/** Dimensions whose values are read: text breakdowns that are not personal data nor a group's true/false column. */
export function indexedDimensions(ds: DatasetConfig): Dimension[] {
  return ds.dimensions.filter((d) => !d.personal_data && !ds.comparison_groups.some((g) => g.column === d.column));
}

export function compileValueQuery(ctx: CompileContext, dim: Dimension, cap = VALUE_INDEX_CAP): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const col = q.ident(dim.column);
  const day = localDateExpr(q, ctx);
  const month = ctx.dialect.periodStart('month', day);
  return q.finish(`SELECT CAST(${col} AS VARCHAR) AS value, ${ctx.dialect.toDouble('COUNT(*)')} AS row_count, ${ctx.dialect.toDouble(`COUNT(DISTINCT ${month})`)} AS months,
  CAST(MIN(${day}) AS VARCHAR) AS first_day, CAST(MAX(${day}) AS VARCHAR) AS last_day
FROM ${datasetRelation(q, ctx.dataset)}
WHERE ${col} IS NOT NULL
GROUP BY 1
ORDER BY 2 DESC, 1
LIMIT ${cap + 1}`);
}

export function readValues(table: ResultTable, cap = VALUE_INDEX_CAP): DimensionValues {
  const values = table.rows
    .map((r) => ({
      value: String(r.value ?? ''),
      rows: Number(r.row_count ?? 0),
      ...(r.months !== undefined && r.months !== null ? { months: Number(r.months) } : {}),
      ...(isoDay(r.first_day) ? { first: isoDay(r.first_day)! } : {}),
      ...(isoDay(r.last_day) ? { last: isoDay(r.last_day)! } : {}),
    }))
    .filter((v) => v.value.trim().length > 0 && !/^(true|false)$/i.test(v.value));
  return { values: values.slice(0, cap), complete: table.rows.length <= cap };
}

/** The ISO day of a date read back as text (DuckDB and PostgreSQL both write '2001-05-04'). */
function isoDay(v: unknown): string | null {
  const m = /^(\d{4}-\d{2}-\d{2})/.exec(String(v ?? ''));
  return m ? m[1]! : null;
}

/** Builds the index from the data (one grouped query per dimension). */
export async function buildValueIndex(ws: Pick<Workspace, 'context' | 'source' | 'runOptions' | 'dataset'>, cap = VALUE_INDEX_CAP): Promise<ValueIndex> {
  const index = new Map<string, DimensionValues>();
  for (const dim of indexedDimensions(ws.dataset)) {
    index.set(dim.name, readValues(await ws.source.run(compileValueQuery(ws.context, dim, cap), ws.runOptions), cap));
  }
  return index;
}

// ---- kept between processes ----

const FORMAT = 3;
const entrySchema = z.object({
  format: z.literal(FORMAT),
  key: z.string(),
  dimensions: z.record(z.string(), z.object({ values: z.array(z.object({ value: z.string(), rows: z.number(), months: z.number().optional(), first: z.string().optional(), last: z.string().optional() })), complete: z.boolean() })),
});

function cacheFile(config: LoadedConfig, ds: DatasetConfig): string {
  const name = createHash('sha256').update(JSON.stringify([ds.name, ds.source, ds.table])).digest('hex').slice(0, 24);
  return join(dirname(resolve(config.baseDir, config.conversation.state_path)), 'threadcount-cache', 'values', `${name}.json`);
}

function definition(ds: DatasetConfig, cap: number): string {
  return JSON.stringify([cap, indexedDimensions(ds).map((d) => [d.name, d.column])]);
}

/**
 * The value index of a workspace: read from the cache while the data keeps its version, else
 * built and stored. A source with no cheap version (PostgreSQL) is indexed afresh each time.
 */
export async function loadValueIndex(ws: Workspace, cap = VALUE_INDEX_CAP): Promise<ValueIndex> {
  const version = await dataVersion(ws).catch(() => null);
  if (version === null) return buildValueIndex(ws, cap);
  const key = createHash('sha256').update(JSON.stringify([FORMAT, version, definition(ws.dataset, cap)])).digest('hex');
  const file = cacheFile(ws.config, ws.dataset);
  const parsed = entrySchema.safeParse(await readJsonFile(file));
  if (parsed.success && parsed.data.key === key) return new Map(Object.entries(parsed.data.dimensions));
  const index = await buildValueIndex(ws, cap);
  // Stored only if the data kept its version while it was read.
  if ((await dataVersion(ws).catch(() => null)) === version) await writeJsonFile(file, { format: FORMAT, key, dimensions: Object.fromEntries(index) });
  return index;
}
