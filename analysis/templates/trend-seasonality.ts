// Template "trend_seasonality": the calendar pattern of a metric. Monthly series → classical
// seasonal indices (period 12; multiplicative, or additive in units for a level), the busiest and quietest months and in how many
// full years each held, plus the day-of-week pattern from a second grouped query.
import { stableSeasonalityTest } from '../stats/stable-seasonality.js';
import { isAdditive, metricByName, percentsApplyTo, quantityKind, seasonalModel } from '../catalog.js';
import { type CompileContext, localDateExpr, measureSql, rowCountSql, tableRef, whereClause } from '../compile-context.js';
import type { Coverage } from '../coverage.js';
import type { CalendarMonthPattern, MonthTotalsPerDay, TrendSeasonalityFinding, WeekdayValue } from '../findings/segments.js';
import { daysInMonth, parseIsoDate } from '../periods.js';
import { seasonalIndices, type SeasonalModel } from '../stats/index.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { Caveat, CompiledQuery, Finding, PeriodPoint, ResultTable, SubQuestion } from '../types.js';
import { compileSeries, readSeries } from './series.js';
import type { ReadContext, Reading, Template } from './template.js';
import { coveredWindow, EMPTY_TABLE, isoMonth, isoYear, numberOrNull, seriesFinding } from './trend-points.js';

const PERIOD = 12;

export const trendSeasonalityTemplate: Template = {
  compile: (sq, ctx) => [
    { name: 'monthly', ...compileSeries(monthlyQuestion(sq), ctx) },
    // Data stamped once a week or coarser has no day of the week to compare.
    ...(stampedDaily(ctx.coverage) ? [{ name: 'weekday', ...compileWeekday(sq, ctx) }] : []),
    // An average's months and weekdays can all sit above zero while its days cross it (an average
    // delay of −5 min on a quiet day): the days decide whether percentages of it apply at all.
    ...(stampedDaily(ctx.coverage) && !isAdditive(metricByName(ctx.dataset, sq.metrics[0]!)) ? [{ name: 'daily', ...compileSeries(dailyQuestion(sq), ctx) }] : []),
  ],
  read: (sq, tables, ctx) => readSeasonality(sq, tables.monthly ?? EMPTY_TABLE, tables.weekday ?? EMPTY_TABLE, ctx, tables.daily),
};

/** The metric day by day over the window, read only for its signs (catalog.ts metricPercentScale). */
function dailyQuestion(sq: SubQuestion): SubQuestion {
  return { ...sq, grain: 'day', metrics: sq.metrics.slice(0, 1) };
}

/** True unless the data is known to be stamped once a week or less often. */
export function stampedDaily(coverage: Coverage | undefined): boolean {
  const s = coverage?.stamps;
  return s === undefined || s === 'daily' || s === 'irregular';
}

/** Seasonality is read from months whatever grain the sub-question asked for. */
function monthlyQuestion(sq: SubQuestion): SubQuestion {
  return { ...sq, grain: 'month', metrics: sq.metrics.slice(0, 1) };
}

/** The metric by ISO day of week (1 = Monday) over the window; EXTRACT(ISODOW …) reads the same in DuckDB and PostgreSQL. */
export function compileWeekday(sq: SubQuestion, ctx: CompileContext): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const date = localDateExpr(q, ctx);
  const where = whereClause(q, ctx, sq.window, sq.filters);
  return q.finish(`SELECT ${ctx.dialect.toDouble(`EXTRACT(ISODOW FROM ${date})`)} AS iso_dow,
  ${measureSql(q, ctx, metric)} AS ${q.ident('value')},
  ${ctx.dialect.toDouble(rowCountSql(q, ctx))} AS row_count
FROM ${tableRef(q, ctx)}
WHERE ${where}
GROUP BY 1
ORDER BY 1`);
}

export function readSeasonality(sq: SubQuestion, monthly: ResultTable, weekday: ResultTable, ctx: ReadContext, daily?: ResultTable): Reading {
  const one = monthlyQuestion(sq);
  const metricName = one.metrics[0]!;
  const metric = metricByName(ctx.dataset, metricName);
  const base = readSeries(one, monthly, ctx.coverage, { dataset: ctx.dataset });
  const dailyValues = (daily?.rows ?? []).map((r) => numberOrNull(r[metricName]));
  const findings: Finding[] = [...base.findings];
  // Unusual periods are said under the answer that draws or lists the periods (the series, the
  // summary), not again under the pattern across the year.
  const caveats: Caveat[] = base.caveats.filter((c) => c.code !== 'outlier');
  if (weekday.truncated) caveats.push({ code: 'truncated', data: { rows: weekday.rows.length } });
  const series = seriesFinding(base.findings, metricName);
  if (!series) return { findings, caveats };

  const points = completeSpan(series.points);
  if (points.length > 0) {
    const model = seasonalModel(metric, [...points.map((p) => p.value), ...dailyValues]);
    const seasonal = seasonalityOf(metricName, points, model, isAdditive(metric) && quantityKind(metric) === 'flow');
    if (seasonal.kind === 'ok') findings.push(seasonal.finding);
    else caveats.push(seasonal.caveat);
  } else if (!caveats.some((c) => c.code === 'all_null' || c.code === 'single_period')) {
    caveats.push({ code: 'too_few_cycles', data: { metric: metricName, fullCycles: 0, required: 2, months: 0 } });
  }

  const covered = coveredWindow(sq.window, ctx.coverage);
  if (covered && weekday.rows.length > 0 && stampedDaily(ctx.coverage)) {
    const additive = isAdditive(metric);
    const days = weekdayValues(weekday, covered, additive);
    // A weekday's distance from the average is a ratio only where percentages of the metric apply
    // (catalog.ts metricPercentScale); else a difference in its units (points for a rate).
    const levels = days.map((d) => d.level);
    const inUnits = metric.unit === 'percent' || !percentsApplyTo(metric, [...levels, ...series.points.map((p) => p.value), ...dailyValues], additive);
    findings.push({ type: 'trend_weekday', metric: metricName, additive, ...(inUnits ? { inUnits } : {}), days: inUnits ? days.map((d) => ({ ...d, index: null })) : days });
  }
  return { findings, caveats };
}

/** The run from the first to the last complete month; nulls inside it stay as gaps. */
function completeSpan(points: readonly PeriodPoint[]): PeriodPoint[] {
  const first = points.findIndex((p) => !p.partial && p.value !== null);
  if (first < 0) return [];
  let last = points.length - 1;
  while (last > first && (points[last]!.partial || points[last]!.value === null)) last--;
  return points.slice(first, last + 1).map((p) => (p.partial ? { ...p, value: null } : p));
}

type SeasonalOutcome = { kind: 'ok'; finding: TrendSeasonalityFinding } | { kind: 'caveat'; caveat: Caveat };

function seasonalityOf(metric: string, points: readonly PeriodPoint[], model: SeasonalModel, flow: boolean): SeasonalOutcome {
  const result = seasonalIndices(points.map((p) => ({ season: isoMonth(p.period), value: p.value })), PERIOD, model);
  if (result.kind === 'too_few_cycles') {
    return { kind: 'caveat', caveat: { code: 'too_few_cycles', data: { metric, fullCycles: result.fullCycles, required: result.required, months: result.points } } };
  }
  if (result.kind === 'negative_values') {
    return { kind: 'caveat', caveat: { code: 'negative_amounts', data: { column: metric, count: result.positions.length, periods: true } } };
  }
  if (result.kind === 'uncovered_seasons') {
    // Gaps left some calendar month without a single detrended value: too little to measure it.
    return { kind: 'caveat', caveat: { code: 'too_few_cycles', data: { metric, uncoveredMonths: result.seasons.length, required: 2, months: points.length } } };
  }

  const firstYear = isoYear(points[0]!.period);
  const min = new Array<number | null>(PERIOD).fill(null);
  const max = new Array<number | null>(PERIOD).fill(null);
  const rangeYears: number[] = [];
  for (const cycle of result.cycles) {
    let used = false;
    cycle.ratios.forEach((r, k) => {
      if (r === null) return;
      used = true;
      min[k] = min[k] === null ? r : Math.min(min[k]!, r);
      max[k] = max[k] === null ? r : Math.max(max[k]!, r);
    });
    // Cycles start at January (seasons are calendar months), so cycle c is calendar year firstYear + c.
    if (used) rangeYears.push(firstYear + cycle.cycle);
  }

  const fullYears = fullCalendarYears(points);
  const months: CalendarMonthPattern[] = result.indices.map((index, k) => ({
    month: k + 1,
    index,
    min: min[k]!,
    max: max[k]!,
    highestIn: 0,
    topTwoIn: 0,
    lowestIn: 0,
    bottomTwoIn: 0,
  }));
  for (const values of fullYears.values()) {
    const order = values.map((v, k) => ({ v, k })).sort((a, b) => b.v - a.v || a.k - b.k);
    months[order[0]!.k]!.highestIn++;
    months[order[1]!.k]!.topTwoIn++;
    months[order[0]!.k]!.topTwoIn++;
    months[order[PERIOD - 1]!.k]!.lowestIn++;
    months[order[PERIOD - 1]!.k]!.bottomTwoIn++;
    months[order[PERIOD - 2]!.k]!.bottomTwoIn++;
  }
  const byIndex = months.map((m) => m.month).sort((a, b) => result.indices[b - 1]! - result.indices[a - 1]! || a - b);
  // Whether the months differ by more than the year-to-year noise (X-11's stable-seasonality F-test).
  const bySeason = Array.from({ length: PERIOD }, (_, k) => result.cycles.map((c) => c.ratios[k]).filter((r): r is number => r !== null && r !== undefined));
  const stable = stableSeasonalityTest(bySeason);
  return {
    kind: 'ok',
    finding: {
      type: 'trend_seasonality',
      metric,
      model,
      firstPeriod: points[0]!.period,
      lastPeriod: points[points.length - 1]!.period,
      months,
      fullYears: [...fullYears.keys()],
      rangeFromYear: rangeYears[0] ?? null,
      rangeToYear: rangeYears[rangeYears.length - 1] ?? null,
      busiest: [byIndex[0]!, byIndex[1]!],
      quietest: [byIndex[PERIOD - 1]!, byIndex[PERIOD - 2]!],
      ...(model === 'additive' ? { swing: result.indices[byIndex[0]! - 1]! - result.indices[byIndex[PERIOD - 1]! - 1]! } : {}),
      ...(stable ? { stable } : {}),
      ...(flow && fullYears.size > 0 ? { perDay: totalsPerDay(fullYears) } : {}),
    },
  };
}

/**
 * Month-of-year totals against per-day averages over the full years: a 31-day month can lead on
 * totals and trail per day. Ties keep calendar order, so no pair swaps on a tie.
 */
export function totalsPerDay(fullYears: ReadonlyMap<number, readonly number[]>): MonthTotalsPerDay {
  const totals = new Array<number>(PERIOD).fill(0);
  const days = new Array<number>(PERIOD).fill(0);
  for (const [year, values] of fullYears) {
    values.forEach((v, k) => {
      totals[k]! += v;
      days[k]! += daysInMonth(year, k + 1);
    });
  }
  const perDay = totals.map((t, k) => t / days[k]!);
  const meanTotals = totals.map((t) => t / fullYears.size);
  const order = (values: number[]) => values.map((v, k) => ({ v, m: k + 1 })).sort((a, b) => b.v - a.v || a.m - b.m).map((x) => x.m);
  const byTotal = order(meanTotals);
  const byDay = order(perDay);
  const rankByDay = new Map(byDay.map((m, i) => [m, i]));
  const swaps: [number, number][] = [];
  byTotal.forEach((above, i) => {
    for (const below of byTotal.slice(i + 1)) if (rankByDay.get(below)! < rankByDay.get(above)!) swaps.push([below, above]);
  });
  return { totals: meanTotals, perDay, byTotal, byDay, swaps };
}

/** Calendar years whose twelve months are all complete and present, with their values January first. */
function fullCalendarYears(points: readonly PeriodPoint[]): Map<number, number[]> {
  const years = new Map<number, (number | null)[]>();
  for (const p of points) {
    const y = isoYear(p.period);
    const row = years.get(y) ?? new Array<number | null>(PERIOD).fill(null);
    row[isoMonth(p.period) - 1] = p.partial ? null : p.value;
    years.set(y, row);
  }
  const full = new Map<number, number[]>();
  for (const [y, row] of years) if (row.every((v) => v !== null)) full.set(y, row as number[]);
  return full;
}

function weekdayValues(table: ResultTable, covered: { start: string; end: string }, additive: boolean): WeekdayValue[] {
  const counts = weekdayCounts(covered.start, covered.end);
  const byDay = new Map<number, number | null>();
  for (const r of table.rows) {
    const d = numberOrNull(r.iso_dow);
    if (d !== null) byDay.set(d, numberOrNull(r.value));
  }
  const days = [1, 2, 3, 4, 5, 6, 7].map((isoDay) => {
    const value = byDay.get(isoDay) ?? (additive ? 0 : null);
    const dayCount = counts[isoDay - 1]!;
    const level = value === null ? null : additive ? (dayCount > 0 ? value / dayCount : null) : value;
    return { isoDay, value, dayCount, level };
  });
  const levels = days.flatMap((d) => (d.level === null ? [] : [d.level]));
  const meanLevel = levels.length > 0 ? levels.reduce((a, b) => a + b, 0) / levels.length : null;
  const values = days.flatMap((d) => (d.value === null ? [] : [d.value]));
  const total = values.reduce((a, b) => a + b, 0);
  const sharesApply = additive && total > 0 && values.every((v) => v >= 0);
  return days.map((d) => ({
    ...d,
    index: d.level !== null && meanLevel !== null && meanLevel > 0 ? d.level / meanLevel : null,
    deviation: d.level !== null && meanLevel !== null ? d.level - meanLevel : null,
    share: sharesApply && d.value !== null ? d.value / total : null,
  }));
}

/** How many Mondays … Sundays fall in [start, end). */
export function weekdayCounts(start: string, end: string): number[] {
  const counts = new Array<number>(7).fill(0);
  const days = Math.round((parseIsoDate(end).getTime() - parseIsoDate(start).getTime()) / 86_400_000);
  if (days <= 0) return counts;
  const firstIso = ((parseIsoDate(start).getUTCDay() + 6) % 7) + 1;
  const weeks = Math.floor(days / 7);
  for (let k = 0; k < 7; k++) counts[k] = weeks;
  for (let i = 0; i < days % 7; i++) counts[(firstIso - 1 + i) % 7]!++;
  return counts;
}
