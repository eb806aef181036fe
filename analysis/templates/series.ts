// Template "series": each metric at a time grain over the window. Answers the time-pattern
// lens of a trend request (and feeds growth and snapshot templates later).
import { isAdditive, metricByName, seasonalModel } from '../catalog.js';
import type { DatasetConfig } from '../../config/schema.js';
import { type CompileContext, localDateExpr, periodScope, tableRef } from '../compile-context.js';
import type { Coverage } from '../coverage.js';
import { dataEnd, thinPeriods } from '../coverage.js';
import { addDays, daysBetween, nextPeriod, periodsBetween } from '../periods.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { Caveat, CompiledQuery, Finding, PeriodPoint, ResultTable, SubQuestion } from '../types.js';
import { seriesOutliers } from '../quality/series-outliers.js';
import type { SeasonalModel } from '../stats/decomposition.js';
import type { Template } from './template.js';

export function compileSeries(sq: SubQuestion, ctx: CompileContext): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const date = localDateExpr(q, ctx);
  const period = ctx.dialect.periodStart(sq.grain, date);
  const scope = periodScope(q, ctx, sq.window, sq.filters);
  const measures = sq.metrics.map((name) => `  ${scope.measure(metricByName(ctx.dataset, name))} AS ${q.ident(name)}`);
  return q.finish(`SELECT ${period} AS period,
${measures.join(',\n')},
  ${ctx.dialect.toDouble(scope.rowCount())} AS row_count
FROM ${tableRef(q, ctx)}
WHERE ${scope.where}
GROUP BY 1
ORDER BY 1`);
}

export interface SeriesReading {
  findings: Finding[];
  caveats: Caveat[];
}

export const seriesTemplate: Template = {
  compile: (sq, ctx) => [{ name: 'series', ...compileSeries(sq, ctx) }],
  // "Orders per day, monthly": each period's total over its days (of the window and the data).
  read: (sq, tables, ctx) => readSeries(sq, tables.series ?? { columns: [], rows: [], truncated: false }, ctx.coverage, { perDay: perDayOf(sq, ctx.dataset), dataset: ctx.dataset }),
};

/** The metrics of `sq` to state per day: asked per day, a total that adds up over days, at a grain coarser than a day. */
export function perDayOf(sq: SubQuestion, ds: DatasetConfig): Set<string> {
  if (!sq.perDay || sq.grain === 'day') return new Set();
  return new Set(sq.metrics.filter((m) => isAdditive(metricByName(ds, m))));
}

/**
 * Turns the grouped rows into findings. Periods the window covers but the data does not
 * (a gap) become null points; a first or last period only partly covered is marked partial
 * and left out of the high and low, since half a month is not comparable with a whole one.
 */
export function readSeries(
  sq: SubQuestion,
  table: ResultTable,
  coverage: Coverage,
  // The dataset, when known, says how each metric's cycle behaves for the outlier screen (catalog.ts seasonalModel).
  opts: { perDay?: ReadonlySet<string>; dataset?: DatasetConfig } = {},
): SeriesReading {
  const caveats: Caveat[] = [];
  if (table.truncated) caveats.push({ code: 'truncated', data: { rows: table.rows.length } });
  if (coverage.firstDate === null || coverage.lastDate === null || table.rows.length === 0) {
    return { findings: [], caveats: [...caveats, { code: 'no_data', data: { start: sq.window.start, end: sq.window.end } }] };
  }
  const byPeriod = new Map(table.rows.map((r) => [String(r.period), r]));
  const effectiveEnd = minIso(sq.window.end, dataEnd({ ...coverage, lastDate: coverage.lastDate }));
  const matched = firstMatchingStart(sq.grain, maxIso(sq.window.start, coverage.firstDate), effectiveEnd, (p) => byPeriod.get(p));
  if (matched.caveat) caveats.push(matched.caveat);
  const effectiveStart = matched.start;
  const starts = periodsBetween(effectiveStart, effectiveEnd, sq.grain);

  const partialStarts = new Set<string>();
  const first = starts[0];
  const last = starts[starts.length - 1];
  if (first !== undefined && first < effectiveStart) partialStarts.add(first);
  if (last !== undefined && nextPeriod(last, sq.grain) > effectiveEnd) partialStarts.add(last);
  for (const p of partialStarts) {
    const coveredFrom = maxIso(p, effectiveStart);
    const coveredTo = addDays(minIso(nextPeriod(p, sq.grain), effectiveEnd), -1);
    caveats.push({ code: 'partial_period', data: { period: p, grain: sq.grain, coveredFrom, coveredTo } });
  }

  // Periods holding a sliver of the usual rows (2 films in a year against ~175) are read like
  // partial ones: left out of the highs, lows and the latest complete period, and said once.
  const thin = thinPeriods(new Map(starts.filter((p) => !partialStarts.has(p)).map((p) => [p, Number(byPeriod.get(p)?.row_count ?? 0)])));
  if (thin.periods.length > 0) {
    const counts = thin.periods.map((p) => Number(byPeriod.get(p)?.row_count ?? 0));
    caveats.push({ code: 'thin_period', data: { periods: thin.periods.join(','), grain: sq.grain, fewest: Math.min(...counts), most: Math.max(...counts), typical: thin.typical } });
    for (const p of thin.periods) partialStarts.add(p);
  }

  const findings: Finding[] = [];
  for (const metric of sq.metrics) {
    const perDay = opts.perDay?.has(metric) === true;
    // Per day: the period's total over the days of it the window and the data cover.
    const days = (p: string) => daysBetween(maxIso(p, effectiveStart), minIso(nextPeriod(p, sq.grain), effectiveEnd));
    const zeroed = new Set(emptyInsidePresence(sq, starts, byPeriod, opts.dataset, metric));
    const points: PeriodPoint[] = starts.map((p) => {
      const v = byPeriod.get(p)?.[metric];
      const value = typeof v === 'number' ? (perDay ? v / days(p) : v) : zeroed.has(p) ? 0 : null;
      return { period: p, value, partial: partialStarts.has(p) };
    });
    findings.push({ type: 'series', metric, grain: sq.grain, points, ...(perDay ? { perDay: true as const } : {}) });
    caveats.push(...seriesOutliers(points, sq.grain, modelOf(opts.dataset, metric)).map((c) => ({ ...c, data: { ...c.data, metric } })));
    // A period with rows but none that pass the filters (row count 0; periodScope keeps its row)
    // is empty, not a hole in the data: additive metrics read 0 there, others have no value.
    const empty = points.filter((p) => p.value === null && !p.partial && isEmptyPeriod(byPeriod.get(p.period)));
    if (empty.length > 0) caveats.push({ code: 'empty_period', data: { metric, periods: empty.length, firstEmpty: empty[0]!.period, grain: sq.grain } });
    const gaps = points.filter((p) => p.value === null && !p.partial && !empty.includes(p));
    if (gaps.length > 0 && gaps.length < points.length) {
      caveats.push({ code: 'series_gap', data: { metric, periods: gaps.length, firstGap: gaps[0]!.period, grain: sq.grain } });
    }
    if (zeroed.size > 0) caveats.push({ code: 'series_gap', data: { metric, periods: zeroed.size, firstGap: [...zeroed][0]!, grain: sq.grain, zero: true } });
    const complete = points.filter((p): p is PeriodPoint & { value: number } => p.value !== null && !p.partial);
    if (complete.length === 0) {
      caveats.push({ code: points.some((p) => p.value !== null) ? 'single_period' : 'all_null', data: { metric } });
      continue;
    }
    if (complete.length === 1) caveats.push({ code: 'single_period', data: { metric, period: complete[0]!.period } });
    let hi = complete[0]!;
    let lo = complete[0]!;
    for (const p of complete) {
      // Ties keep the earliest period, so the result does not depend on row order.
      if (p.value > hi.value) hi = p;
      if (p.value < lo.value) lo = p;
    }
    findings.push({ type: 'peak', metric, period: hi.period, value: hi.value });
    findings.push({ type: 'trough', metric, period: lo.period, value: lo.value });
    const latest = complete[complete.length - 1]!;
    findings.push({ type: 'latest', metric, period: latest.period, value: latest.value, partial: false });
  }
  return { findings, caveats };
}

/**
 * Where a filtered series starts: before the first period with a matching row (a channel that
 * opened after the data starts) it starts where the rows do, with a caveat that says so. A run
 * of zeros there would make "the lowest month" a month before the thing existed, and a year it
 * joined part-way a full base year for growth.
 */
export function firstMatchingStart(
  grain: SubQuestion['grain'],
  start: string,
  end: string,
  rowOf: (period: string) => Record<string, unknown> | undefined,
): { start: string; caveat?: Caveat } {
  const all = periodsBetween(start, end, grain);
  const lead = all.findIndex((p) => !isEmptyPeriod(rowOf(p)));
  if (lead <= 0) return { start };
  return { start: all[lead]!, caveat: { code: 'empty_period', data: { leading: true, periods: lead, firstEmpty: maxIso(all[0]!, start), firstMatch: all[lead]!, grain } } };
}

/**
 * The periods of a filtered count or sum (additive: matches, goals) that have no rows at all in the
 * data but lie between the segment's first and last periods with matching rows: inside the segment's
 * presence a period with nothing is none of it (a league's summer break is 0 matches), so it reads 0.
 * An average, rate or ratio there has nothing to divide and stays without a value; outside the
 * presence (before a team's first match, after its last) the series does not reach. Unfiltered, a
 * period with no rows is a hole in the data, which a count cannot tell from a quiet period, so it
 * stays blank (said once for the thread: thread-notes.ts measureNotes).
 */
export function emptyInsidePresence(
  sq: Pick<SubQuestion, 'filters'>,
  starts: readonly string[],
  byPeriod: ReadonlyMap<string, Record<string, unknown>>,
  ds: DatasetConfig | undefined,
  metric: string,
): string[] {
  if (sq.filters.length === 0 || !ds) return [];
  const m = ds.metrics.find((x) => x.name === metric);
  if (!m || !isAdditive(m)) return [];
  const present = starts.map((p) => {
    const n = byPeriod.get(p)?.row_count;
    return typeof n === 'number' && n > 0;
  });
  const first = present.indexOf(true);
  const last = present.lastIndexOf(true);
  if (first < 0) return [];
  return starts.filter((p, i) => i > first && i < last && !byPeriod.has(p));
}

/** A grouped row whose rows all failed the filters: it is there, with a row count of 0. */
export function isEmptyPeriod(row: Record<string, unknown> | undefined): boolean {
  return row !== undefined && row.row_count === 0;
}

function maxIso(a: string, b: string): string {
  return a > b ? a : b;
}
function minIso(a: string, b: string): string {
  return a < b ? a : b;
}

/** How `metric`'s cycle behaves, when the dataset is known and holds it; undefined leaves the screen to decide. */
export function modelOf(ds: DatasetConfig | undefined, metric: string): SeasonalModel | undefined {
  const m = ds?.metrics.find((x) => x.name === metric);
  return m ? seasonalModel(m) : undefined;
}
