// The dataset's time coverage (first and last date, rows): what partial-period and
// freshness checks compare against. Run once per plan.
import type { CompileContext } from './compile-context.js';
import { localDateExpr, measureSql, rowCountSql, tableRef } from './compile-context.js';
import { isAdditive, isBreakdownDimension, readsOwnLevel } from './catalog.js';
import type { DatasetConfig, Dimension, OwnLevelsReading } from '../config/schema.js';
import type { DataSource, RunOptions } from './sources/data-source.js';
import { QueryBuilder } from './sql/query-builder.js';
import { addDays, nextPeriod, periodStart } from './periods.js';
import { readStamps, stampColumns, stampGaps, type StampGranularity } from './stamps.js';
import type { CompiledQuery, ResultTable } from './types.js';

export interface Coverage {
  firstDate: string | null;
  lastDate: string | null;
  rows: number;
  /**
   * How often the data is stamped (analysis/stamps.ts), when it was read: data coarser than daily
   * has no daily grain and no day-of-week pattern, and its last stamped period is complete.
   */
  stamps?: StampGranularity;
  /**
   * Rows dated after the run's day (a two-digit year read in the wrong century, a date typed
   * ahead): left out of every answer by default, so the data ends on its last date up to that day
   * (`lastDate`), and said once. Absent when no row is dated after the day.
   */
  afterToday?: DatesAfter;
  /**
   * Trailing days that hold almost nothing (a few rows stamped just past the end, such as 6 flights
   * at 00:00 on 1 July after ~16,700 a day): `lastDate` is then the last full day, so no period
   * running past it counts as complete, and the tail is said once. Absent when the last day is full.
   */
  strayTail?: StrayTail;
  /**
   * The metrics (names) that are no sum or count and whose daily value over the whole data is
   * below zero on a material share of days (readSigns) (an average delay on a day of early flights):
   * no percentage of them is given in any answer (catalog.ts metricPercentScale, via
   * Metric.reachesZero). Read once per dataset beside the coverage (compileSigns); absent when not read.
   */
  reachZero?: string[];
}

/** Days after the last full day (`lastDate`), each under STRAY_DAY_SHARE of a typical day's rows. */
export interface StrayTail {
  firstDate: string;
  lastDate: string;
  rows: number;
  /** The median rows a day over the days the data has. */
  typicalDayRows: number;
}

/**
 * A day (or a period of a series) holding under 2% of a typical one's rows is stray, not a
 * period of data: a trailing day so thin is a stray tail, and a year of 2 films against a usual
 * ~175 (vega-datasets' movies.json, 2011) is left out of highs, lows and the latest complete
 * period (thinPeriods). Common practice for judging a period by its coverage, not a published
 * standard; the share is our own choice.
 */
export const STRAY_DAY_SHARE = 0.02;

/** Too few periods with rows to know what a typical one holds: none is judged thin. */
const MIN_PERIODS_FOR_THIN = 7;

/**
 * The periods of a series that hold under STRAY_DAY_SHARE of a typical period's rows, and that
 * typical count. Typical is where a typical row falls (the row-weighted median of the periods'
 * counts), so a catalogue that grew from 1 film a year in 1928 to ~175 in the 2000s judges its
 * years against ~175, not against the median year's 27. Empty when fewer than
 * MIN_PERIODS_FOR_THIN periods have rows.
 */
export function thinPeriods(rowsByPeriod: ReadonlyMap<string, number>): { periods: string[]; typical: number } {
  const held = [...rowsByPeriod].filter(([, n]) => Number.isFinite(n) && n > 0);
  if (held.length < MIN_PERIODS_FOR_THIN) return { periods: [], typical: 0 };
  const sorted = held.map(([, n]) => n).sort((a, b) => a - b);
  const total = sorted.reduce((a, b) => a + b, 0);
  let seen = 0;
  let typical = sorted[sorted.length - 1]!;
  for (const n of sorted) {
    seen += n;
    if (seen >= total / 2) { typical = n; break; }
  }
  return { periods: held.filter(([, n]) => n < STRAY_DAY_SHARE * typical).map(([p]) => p).sort(), typical };
}
/** Too few days to know what a typical day holds: no tail is judged. */
const MIN_DAYS_FOR_TAIL = 7;

/** Rows dated after `day`: how many, and the first and last of their dates. */
export interface DatesAfter {
  day: string;
  rows: number;
  firstDate: string;
  lastDate: string;
}

/** The rows dated after `day` and the last date up to it, in one pass (run only when the data's last date is after `day`). */
export function compileDatesAfter(ctx: CompileContext, day: string): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const d = localDateExpr(q, ctx);
  const bound = ctx.dialect.timeParam(q.bind(day), 'date');
  const n = (e: string) => ctx.dialect.toDouble(e);
  return q.finish(`SELECT ${n(`COUNT(*) FILTER (WHERE ${d} > ${bound})`)} AS rows_after,
  MIN(${d}) FILTER (WHERE ${d} > ${bound}) AS first_after,
  MAX(${d}) FILTER (WHERE ${d} > ${bound}) AS last_after,
  MAX(${d}) FILTER (WHERE ${d} <= ${bound}) AS last_up_to
FROM ${tableRef(q, ctx)}`);
}

/**
 * The coverage as of `day`: when rows are dated after it, the data ends on its last date up to
 * `day`, and those rows are counted and dated in `afterToday`. Unchanged otherwise.
 */
export async function coverageAsOf(coverage: Coverage, day: string, source: DataSource, ctx: CompileContext, options: RunOptions): Promise<Coverage> {
  const { afterToday: _, ...plain } = coverage;
  if (plain.lastDate === null || plain.lastDate <= day) return plain;
  const r = (await source.run(compileDatesAfter(ctx, day), options)).rows[0] ?? {};
  const rows = Number(r.rows_after ?? 0);
  if (rows === 0 || typeof r.first_after !== 'string' || typeof r.last_after !== 'string') return plain;
  const lastUpTo = typeof r.last_up_to === 'string' ? r.last_up_to : null;
  return {
    ...plain,
    firstDate: lastUpTo === null ? null : plain.firstDate,
    lastDate: lastUpTo,
    rows: plain.rows - rows,
    afterToday: { day, rows, firstDate: r.first_after, lastDate: r.last_after },
  };
}


/**
 * Rows counted per local day first (an engine that sends work to where the data is, such as a
 * table partitioned or sharded on the time column, counts each day there and returns one row per
 * day); then, from those days, the first and last day, the total, and the gaps between the days
 * that tell how often the data is stamped (analysis/stamps.ts). One statement, one pass.
 */
export function compileCoverage(ctx: CompileContext): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const n = (e: string) => ctx.dialect.toDouble(e);
  return q.finish(`WITH tc_days AS (
  SELECT ${localDateExpr(q, ctx)} AS tc_d, COUNT(*) AS tc_day_rows
  FROM ${tableRef(q, ctx)}
  GROUP BY 1
), tc_typical AS (
  SELECT ${n('percentile_cont(0.5) WITHIN GROUP (ORDER BY tc_day_rows)')} AS tc_typical_rows FROM tc_days WHERE tc_d IS NOT NULL
), tc_full AS (
  SELECT MAX(tc_d) AS tc_last_full FROM tc_days, tc_typical WHERE tc_day_rows >= ${STRAY_DAY_SHARE} * tc_typical_rows
), ${stampGaps('tc_days')}
SELECT (SELECT MIN(tc_d) FROM tc_days) AS first_date,
  (SELECT MAX(tc_d) FROM tc_days) AS last_date,
  (SELECT ${n('SUM(tc_day_rows)')} FROM tc_days) AS row_count,
  (SELECT tc_typical_rows FROM tc_typical) AS typical_day_rows,
  (SELECT tc_last_full FROM tc_full) AS last_full_date,
  (SELECT MIN(tc_d) FROM tc_days, tc_full WHERE tc_d > tc_last_full) AS tail_first_date,
  (SELECT ${n('SUM(tc_day_rows)')} FROM tc_days, tc_full WHERE tc_d > tc_last_full) AS tail_rows,
  ${stampColumns(ctx.dialect).join(',\n  ')}
FROM tc_gaps`);
}

/** The metrics whose signs are read: averages, ratios, rates and levels (a sum's or count's zero is "none"). */
function signedCandidates(ds: DatasetConfig) {
  return ds.metrics.filter((m) => !isAdditive(m) && m.definition.type !== 'distinct_count');
}

/**
 * Each candidate metric's days below zero and days with a value, over the whole data, in one pass; with a minimum
 * group size, only days with that many rows count. One segment's odd day (a small airport's early
 * flights) does not make the whole measure a signed one: the day of the whole data decides, and
 * an answer on one segment still judges by the values it compares. Null when no metric needs it.
 */
export function compileSigns(ctx: CompileContext): CompiledQuery | null {
  const metrics = signedCandidates(ctx.dataset);
  if (metrics.length === 0) return null;
  const q = new QueryBuilder(ctx.dialect);
  const day = localDateExpr(q, ctx);
  const min = ctx.dataset.min_group_size && ctx.dataset.min_group_size > 1 ? ctx.dataset.min_group_size : null;
  const cols = metrics.map((m, i) => `${ctx.dialect.toDouble(measureSql(q, ctx, m))} AS tc_m${i}`);
  return q.finish(`WITH tc_cells AS (
  SELECT ${day} AS tc_d,
  ${cols.join(',\n  ')}
  FROM ${tableRef(q, ctx)}
  GROUP BY 1${min === null ? '' : `\n  HAVING ${rowCountSql(q, ctx)} >= ${q.bind(min)}`}
)
SELECT ${metrics.map((_, i) => `${ctx.dialect.toDouble(`COUNT(*) FILTER (WHERE tc_m${i} < 0)`)} AS tc_m${i}, ${ctx.dialect.toDouble(`COUNT(tc_m${i})`)} AS tc_n${i}`).join(', ')}
FROM tc_cells
WHERE tc_d IS NOT NULL`);
}

/**
 * Days below zero, as a share of the days with a value, from which a measure counts as signed: one
 * stray day (a day whose refunds outran its takings) leaves a measure's zero its floor, while an
 * average delay below zero on a tenth of the days (flights-3m: 20 of 182) has none. The cut-off is
 * our own choice, not a published rule.
 */
export const SIGNED_DAY_SHARE = 0.01;

/**
 * The names of the metrics below zero on at least SIGNED_DAY_SHARE of their days (compileSigns). A
 * day at exactly zero (a platform's day with sign-ups but no revenue) is a ratio's floor, not a crossing.
 */
export function readSigns(ds: DatasetConfig, table: ResultTable): string[] {
  const r = table.rows[0] ?? {};
  return signedCandidates(ds).flatMap((m, i) => {
    const [below, days] = [r[`tc_m${i}`], r[`tc_n${i}`]];
    return typeof below === 'number' && typeof days === 'number' && days > 0 && below > 0 && below / days >= SIGNED_DAY_SHARE ? [m.name] : [];
  });
}

/**
 * The dataset with each metric's reading of its signs set (Metric.reachesZero): what the catalog's
 * one rule for percentages consults in every answer. Unchanged without a reading.
 */
export function withSigns(ds: DatasetConfig, coverage: Coverage): DatasetConfig {
  const read = coverage.reachZero;
  if (!read) return ds;
  return { ...ds, metrics: ds.metrics.map((m) => (read.includes(m.name) ? { ...m, reachesZero: true } : m)) };
}

/** Past this many members a breakdown is not read for levels of their own (its members are not judged one by one). */
export const OWN_LEVELS_MEMBER_CAP = 1000;

/**
 * For the level metrics averaged across rows (catalog.ts readsOwnLevel), one breakdown's members
 * as readings of their own, in one pass: per member, its cells (stamps of the time column it has
 * rows at), how many of them hold exactly one row (a member's one reading at that stamp), its
 * first and last day, and the median of each metric over its cells; and the distinct stamps.
 * Null when no metric is a level averaged across rows.
 */
export function compileOwnLevels(ctx: CompileContext, dim: Dimension): CompiledQuery | null {
  const metrics = ctx.dataset.metrics.filter(readsOwnLevel);
  if (metrics.length === 0) return null;
  const q = new QueryBuilder(ctx.dialect);
  const n = (e: string) => ctx.dialect.toDouble(e);
  const col = q.ident(dim.column);
  const stamp = q.ident(ctx.dataset.time_column);
  const day = localDateExpr(q, ctx);
  const cols = metrics.map((m, i) => `${n(measureSql(q, ctx, m))} AS tc_m${i}`);
  return q.finish(`WITH tc_cells AS (
  SELECT CAST(${col} AS VARCHAR) AS tc_v, ${stamp} AS tc_t, MIN(${day}) AS tc_d, COUNT(*) AS tc_rows,
  ${cols.join(',\n  ')}
  FROM ${tableRef(q, ctx)}
  WHERE ${col} IS NOT NULL AND ${stamp} IS NOT NULL
  GROUP BY 1, 2
)
SELECT tc_v, ${n('COUNT(*)')} AS tc_cells, ${n('COUNT(*) FILTER (WHERE tc_rows = 1)')} AS tc_single, MIN(tc_d) AS tc_first, MAX(tc_d) AS tc_last,
  (SELECT ${n('COUNT(DISTINCT tc_t)')} FROM tc_cells) AS tc_stamps,
  ${metrics.map((_, i) => `${n(`percentile_cont(0.5) WITHIN GROUP (ORDER BY tc_m${i})`)} AS tc_med${i}`).join(',\n  ')}
FROM tc_cells
GROUP BY 1
ORDER BY 1
LIMIT ${OWN_LEVELS_MEMBER_CAP + 1}`);
}

/** Each level metric's reading of one breakdown (compileOwnLevels), by metric name; empty past the member cap. */
export function readOwnLevels(ds: DatasetConfig, dimension: string, table: ResultTable): Record<string, OwnLevelsReading> {
  if (table.rows.length === 0 || table.rows.length > OWN_LEVELS_MEMBER_CAP) return {};
  const stamps = Number(table.rows[0]!.tc_stamps ?? 0);
  const out: Record<string, OwnLevelsReading> = {};
  ds.metrics.filter(readsOwnLevel).forEach((m, i) => {
    const members = table.rows.map((r) => ({
      value: String(r.tc_v ?? ''),
      cells: Number(r.tc_cells ?? 0),
      single: Number(r.tc_single ?? 0),
      first: String(r.tc_first ?? ''),
      last: String(r.tc_last ?? ''),
      median: typeof r[`tc_med${i}`] === 'number' && Number.isFinite(r[`tc_med${i}`]) ? (r[`tc_med${i}`] as number) : null,
    }));
    out[m.name] = { dimension, stamps, members };
  });
  return out;
}

/**
 * The dataset with each level metric's readings of the breakdowns set (Metric.ownLevels): one pass
 * per breakdown, only when a metric is a level averaged across rows (none on a table of flights,
 * whose delay is a mean per flight). A breakdown the engine could not read is left unread.
 */
export async function withOwnLevels(ds: DatasetConfig, source: DataSource, ctx: CompileContext, options: RunOptions): Promise<DatasetConfig> {
  if (!ds.metrics.some(readsOwnLevel)) return ds;
  const read: Record<string, OwnLevelsReading[]> = {};
  for (const dim of ds.dimensions.filter((d) => isBreakdownDimension(ds, d.name))) {
    const query = compileOwnLevels({ ...ctx, dataset: ds }, dim);
    if (!query) break;
    try {
      const got = readOwnLevels(ds, dim.name, await source.run(query, options));
      for (const [metric, reading] of Object.entries(got)) (read[metric] ??= []).push(reading);
    } catch {
      // Unread: the metric is answered as before, without the per-member reading.
    }
  }
  return { ...ds, metrics: ds.metrics.map((m) => (read[m.name] ? { ...m, ownLevels: read[m.name] } : m)) };
}

export function readCoverage(table: ResultTable): Coverage {
  const r = table.rows[0];
  return {
    firstDate: (r?.first_date as string | null) ?? null,
    lastDate: (r?.last_date as string | null) ?? null,
    rows: Number(r?.row_count ?? 0),
  };
}

/**
 * The coverage and the stamp granularity, as a workspace keeps them. Daily (or irregular) data
 * whose last days hold under STRAY_DAY_SHARE of a typical day ends on its last full day; the tail
 * is kept in `strayTail`. Data stamped weekly or coarser has whole last periods by its stamp.
 */
export async function readDataCoverage(source: DataSource, ctx: CompileContext, options: RunOptions): Promise<Coverage> {
  const table = await source.run(compileCoverage(ctx), options);
  const coverage: Coverage = { ...readCoverage(table), stamps: readStamps(table), ...(await readDataSigns(source, ctx, options)) };
  const tail = readStrayTail(table, coverage);
  return tail ? { ...coverage, lastDate: tail.lastFull, strayTail: tail.strayTail } : coverage;
}

/** The signs of the metrics' days (compileSigns), or nothing when the engine could not read them (said in no answer: the answers' own values still decide). */
async function readDataSigns(source: DataSource, ctx: CompileContext, options: RunOptions): Promise<Pick<Coverage, 'reachZero'>> {
  const query = compileSigns(ctx);
  if (query === null) return { reachZero: [] };
  try {
    return { reachZero: readSigns(ctx.dataset, await source.run(query, options)) };
  } catch {
    return {};
  }
}

function readStrayTail(table: ResultTable, coverage: Coverage): { lastFull: string; strayTail: StrayTail } | null {
  const r = table.rows[0] ?? {};
  if (coverage.stamps !== 'daily' && coverage.stamps !== 'irregular') return null;
  if (Number(r.dates ?? 0) < MIN_DAYS_FOR_TAIL || coverage.lastDate === null) return null;
  const lastFull = r.last_full_date;
  const first = r.tail_first_date;
  if (typeof lastFull !== 'string' || typeof first !== 'string' || lastFull >= coverage.lastDate) return null;
  return { lastFull, strayTail: { firstDate: first, lastDate: coverage.lastDate, rows: Number(r.tail_rows ?? 0), typicalDayRows: Number(r.typical_day_rows ?? 0) } };
}

/**
 * The day after the last day the data covers (half-open end). Data stamped once a month (or
 * week, quarter, year) covers the whole of its last stamped period: a series stamped on the 1st
 * through 1 April is complete for April, not one day of it.
 */
export function dataEnd(coverage: Pick<Coverage, 'lastDate' | 'stamps'> & { lastDate: string }): string {
  const last = coverage.lastDate;
  switch (coverage.stamps) {
    case 'weekly':
      return addDays(last, 7);
    case 'monthly':
      return nextPeriod(periodStart(last, 'month'), 'month');
    case 'quarterly':
      return nextPeriod(periodStart(last, 'quarter'), 'quarter');
    case 'yearly':
      return nextPeriod(periodStart(last, 'year'), 'year');
    default:
      return addDays(last, 1);
  }
}

/** The last day the data stands for: its last date, or the last day of its last stamped period (31 December for a yearly stamp of 1 January). */
export function lastCoveredDay(coverage: Pick<Coverage, 'lastDate' | 'stamps'> & { lastDate: string }): string {
  return addDays(dataEnd(coverage), -1);
}
