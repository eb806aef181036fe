// Data quality for one run: one query over the columns the plan uses (or its report kept from
// an earlier run on the same data, quality-cache.ts), then each answer gets the caveats for the
// columns it used.
import { dimensionByName, metricByName, metricColumns } from '../catalog.js';
import { isDayFilter } from '../day-of-week.js';
import type { Caveat, NamedQuery, SubQuestion } from '../types.js';
import type { Workspace } from '../workspace.js';
import { dataVersion } from './data-version.js';
import { entryKey, qualityCacheFile, readEntry, type QualityEntry, writeEntry } from './quality-cache.js';
import { catalogColumns, compileQualityChecks, type DuplicateCount, readQuality, type QualityCheckOptions, type QualityReport } from './quality-checks.js';
import { qualityCaveats } from './quality-caveats.js';

// Data older than this is flagged as stale (common practice for monthly reporting).
const STALE_AFTER_DAYS = 35;

export function columnsUsed(sq: SubQuestion, ws: Workspace): string[] {
  const ds = ws.dataset;
  const cols = new Set<string>([ds.time_column]);
  for (const m of sq.metrics) for (const c of metricColumns(ds, metricByName(ds, m))) cols.add(c);
  if (sq.dimension) cols.add(dimensionByName(ds, sq.dimension).column);
  for (const f of sq.filters) if (!isDayFilter(f)) cols.add(dimensionByName(ds, f.dimension).column);
  const group = ds.comparison_groups.find((g) => g.name === sq.comparisonGroup);
  if (group) {
    cols.add(group.column);
    if (group.unit_column) cols.add(group.unit_column);
  }
  return [...cols];
}

/**
 * The quality report for the columns the plan's sub-questions use. Reused from the cache while
 * the data's version (data-version.ts) and the check's definition are unchanged; columns not
 * yet checked for this version are checked alone, without counting repeated keys again.
 */
export async function checkQuality(items: SubQuestion[], ws: Workspace, opts: { onQuery?: (q: NamedQuery) => void } = {}): Promise<QualityReport> {
  const columns = [...new Set(items.flatMap((sq) => columnsUsed(sq, ws)))];
  const version = await dataVersion(ws).catch(() => null);
  if (version === null) return runChecks(ws, columns, { duplicates: duplicateCount(ws) }, opts.onQuery);
  const key = entryKey(version, checkDefinition(ws));
  const file = qualityCacheFile(ws.config, ws.dataset);
  const cached = await readEntry(file, key);
  const known = new Set(cached?.nulls.map((n) => n.column));
  const missing = columns.filter((c) => !known.has(c));
  if (cached && missing.length === 0) return reportFor(cached, columns);
  const fresh = await runChecks(ws, missing, { duplicates: cached === null ? duplicateCount(ws) : 'none' }, opts.onQuery);
  const entry: QualityEntry = cached
    ? { ...cached, nulls: [...cached.nulls, ...fresh.nulls.map(({ column, count }) => ({ column, count }))] }
    : { key, rows: fresh.rows, lastDate: fresh.lastDate, duplicateKeys: fresh.duplicateKeys, negatives: fresh.negatives, nulls: fresh.nulls.map(({ column, count }) => ({ column, count })) };
  // Stored only if the data kept its version while the check ran: otherwise the report may
  // describe either version, and belongs to neither.
  if ((await dataVersion(ws).catch(() => null)) === version) await writeEntry(file, entry);
  return reportFor(entry, columns);
}

/**
 * The check once more with a smaller plan, after it failed for resources: repeated keys counted on
 * a 1-in-16 sample instead of every key, or not at all when already sampled (that count groups
 * every key, the check's one large grouping). Not kept: it is not the check the data's version
 * asks for. Null when there is nothing smaller to run.
 */
export async function checkQualitySmaller(items: SubQuestion[], ws: Workspace, opts: { onQuery?: (q: NamedQuery) => void } = {}): Promise<{ report: QualityReport; change: string } | null> {
  const columns = [...new Set(items.flatMap((sq) => columnsUsed(sq, ws)))];
  const before = duplicateCount(ws);
  if (before === 'none' || !ws.dataset.key_column) return null;
  const duplicates: DuplicateCount = before === 'full' ? 'sampled' : 'none';
  const report = await runChecks(ws, columns, { duplicates }, opts.onQuery);
  const key = ws.dataset.key_column;
  return { report, change: duplicates === 'sampled' ? `repeated ${key} values counted on a sample of 1 ${key} in 16 instead of every one` : `no count of repeated ${key} values` };
}

async function runChecks(ws: Workspace, columns: string[], opts: QualityCheckOptions = {}, onQuery?: (q: NamedQuery) => void): Promise<QualityReport> {
  const tables: Record<string, Awaited<ReturnType<Workspace['source']['run']>>> = {};
  for (const q of compileQualityChecks(ws.context, columns, opts)) {
    onQuery?.(q);
    tables[q.name] = await ws.source.run(q, ws.runOptions);
  }
  return readQuality(tables, { dataset: ws.dataset });
}

/** The check over every column the catalog names, as SQL: a change to the dataset's config or to the check changes it. */
function checkDefinition(ws: Workspace): string {
  const qs = compileQualityChecks(ws.context, [...catalogColumns(ws.dataset)].sort(), { duplicates: duplicateCount(ws) });
  return JSON.stringify([ws.context.timeColumnType, qs.map((q) => [q.sql, q.params])]);
}

/**
 * How repeated keys are counted for this dataset (config `quality.duplicate_keys`): on a table
 * larger than `full_key_count_max_rows` rows, `auto` counts a fixed 1-in-16 sample of keys, since
 * the full count groups every key of the table (and on a table sharded by date, fetches them all).
 */
export function duplicateCount(ws: Workspace): DuplicateCount {
  const settings = ws.dataset.quality ?? { duplicate_keys: 'auto', full_key_count_max_rows: 20_000_000 };
  switch (settings.duplicate_keys) {
    case 'full':
      return 'full';
    case 'sampled':
      return 'sampled';
    case 'off':
      return 'none';
    case 'auto':
      return ws.coverage.rows > settings.full_key_count_max_rows ? 'sampled' : 'full';
  }
}

/** The report a fresh check of `columns` gives, from the kept parts: the same columns, in the same order. */
function reportFor(entry: QualityEntry, columns: string[]): QualityReport {
  const nulls = new Map(entry.nulls.map((n) => [n.column, n.count]));
  return {
    rows: entry.rows,
    nulls: columns.map((column) => {
      const count = nulls.get(column) ?? 0;
      return { column, count, share: entry.rows > 0 ? count / entry.rows : 0 };
    }),
    duplicateKeys: entry.duplicateKeys,
    negatives: entry.negatives,
    lastDate: entry.lastDate,
  };
}

export function qualityCaveatsFor(sq: SubQuestion, report: QualityReport, ws: Workspace, now: Date): Caveat[] {
  // Rows past the last full day (a stray tail, coverage.ts) do not make the data fresher: the data
  // ends where every other answer of the thread says it does.
  const ended = ws.coverage.strayTail && ws.coverage.lastDate ? { ...report, lastDate: ws.coverage.lastDate } : report;
  // A breakdown the config computes (`expr`) is named in a note by its label, never by its SQL.
  const derived = new Set((ws.dataset.derived ?? []).map((d) => d.name));
  const labels = new Map(ws.dataset.dimensions.filter((d) => derived.has(d.column)).map((d) => [d.column, d.label] as const));
  // So is a measure's own expression, by the measure that sums or averages it, with the expression
  // beside: "Goals (home_score + away_score)", not the bare SQL.
  for (const m of sq.metrics.map((name) => metricByName(ws.dataset, name))) {
    const cols = metricColumns(ws.dataset, m);
    const col = cols[0];
    if (cols.length !== 1 || col === undefined || /^[\p{L}_][\p{L}\d_]*$/u.test(col) || labels.has(col)) continue;
    const owner = ws.dataset.metrics.find((x) => (x.definition.type === 'sum' || x.definition.type === 'average') && metricColumns(ws.dataset, x).join() === col) ?? m;
    labels.set(col, `${owner.label} (${col})`);
  }
  return qualityCaveats(ended, columnsUsed(sq, ws), { now, staleAfterDays: STALE_AFTER_DAYS, ...(ws.coverage.stamps ? { stamps: ws.coverage.stamps } : {}), ...(labels.size > 0 ? { labels } : {}) });
}
