// Template "growth_series": how fast a metric grows over the window (growth × time pattern).
// One grouped query returns the metric per period, per calendar year, and per year up to the
// same day and month as the last day with data (year to date), all aggregated in the database so
// ratio metrics stay ratios of sums. Growth rates are worked out in `read`.
import type { DatasetConfig } from '../../config/schema.js';
import { isAdditive, metricByName, metricPercentScale, quantityKind } from '../catalog.js';
import { type CompileContext, localDateExpr, periodScope, tableRef } from '../compile-context.js';
import type { Coverage } from '../coverage.js';
import { dataEnd } from '../coverage.js';
import type {
  GrowthCagrFinding,
  GrowthLevelRateFinding,
  GrowthPoint,
  GrowthSeriesFinding,
  GrowthYear,
  GrowthYearsFinding,
  GrowthYtdFinding,
} from '../findings/growth.js';
import { addDays, nextPeriod, periodStart, periodsBetween, periodsPerYear, sameIsoWeekLastYear } from '../periods.js';
import { finestGrain } from '../grains.js';
import { QueryBuilder } from '../sql/query-builder.js';
import { cagr, percentBaseUsable, percentChange, senSlope, slopesByDecade, trailingSum, type PercentScale } from '../stats/index.js';
import type { Caveat, CompiledQuery, Finding, ResultTable, SubQuestion } from '../types.js';
import { maxIso, minIso } from './growth-compare.js';
import type { Reading, Template } from './template.js';
import { emptyInsidePresence, firstMatchingStart } from './series.js';

// Working column names, prefixed so they cannot clash with a table's own columns.
const DAY = '__tc_day';
const PERIOD = '__tc_period';
const YEAR = '__tc_year';
const YTD = '__tc_ytd';
const LAST = '__tc_last';

export function compileGrowthSeries(sq: SubQuestion, ctx: CompileContext): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const d = ctx.dialect;
  const day = q.ident(DAY);
  const last = q.ident(LAST);
  const period = q.ident(PERIOD);
  const year = q.ident(YEAR);
  const ytd = q.ident(YTD);
  const dateExpr = localDateExpr(q, ctx);
  const scope = periodScope(q, ctx, sq.window, sq.filters);
  const where = scope.where;
  // `where` serves both reads of the table below: each reads the window's dates only.
  q.readsDates(sq.window);
  const measures = sq.metrics.map((name) => `  ${scope.measure(metricByName(ctx.dataset, name))} AS ${q.ident(name)}`);
  // Month*100 + day compares calendar positions across years: 29 February is only ever matched
  // in leap years, and a cut-off of 29 February counts the prior year to 28 February.
  const mmdd = (e: string) => `(EXTRACT(MONTH FROM ${e}) * 100 + EXTRACT(DAY FROM ${e}))`;
  // The last day is read from the table itself (same condition, same bound values) rather than
  // from `scoped`: a CTE read twice is materialised whole by DuckDB, every column of every row.
  // The values are bound once and their numbered placeholders ($n, in both dialects) used twice.
  return q.finish(`WITH scoped AS (
  SELECT *, ${dateExpr} AS ${day}
  FROM ${tableRef(q, ctx)}
  WHERE ${where}
),
tagged AS (
  SELECT scoped.*,
    ${d.periodStart(sq.grain, day)} AS ${period},
    ${d.periodStart('year', day)} AS ${year},
    ${mmdd(day)} <= ${mmdd(`bounds.${last}`)} AS ${ytd},
    bounds.${last} AS ${last}
  FROM scoped CROSS JOIN (SELECT MAX(${dateExpr}) AS ${last} FROM ${tableRef(q, ctx)} WHERE ${where}) AS bounds
)
SELECT GROUPING(${period}) AS g_period,
  GROUPING(${ytd}) AS g_ytd,
  ${period} AS period,
  ${year} AS year,
  ${ytd} AS ytd,
  MAX(${last}) AS through,
${measures.join(',\n')},
  ${d.toDouble(scope.rowCount())} AS row_count
FROM tagged
GROUP BY GROUPING SETS ((${period}), (${year}), (${year}, ${ytd}))
ORDER BY 1, 2, 4, 3`);
}

export const growthSeriesTemplate: Template = {
  compile: (sq, ctx) => [{ name: 'growth', ...compileGrowthSeries(sq, ctx) }],
  read: (sq, tables, ctx) => readGrowthSeries(sq, tables.growth ?? emptyTable(), ctx.coverage, ctx.dataset),
};

interface GrowthRows {
  periods: Map<string, Record<string, unknown>>;
  years: Map<string, Record<string, unknown>>;
  ytd: Map<string, Record<string, unknown>>;
  through: string | null;
}

function splitRows(table: ResultTable): GrowthRows {
  const out: GrowthRows = { periods: new Map(), years: new Map(), ytd: new Map(), through: null };
  for (const r of table.rows) {
    if (typeof r.through === 'string' && (out.through === null || r.through > out.through)) out.through = r.through;
    if (Number(r.g_period) === 0 && typeof r.period === 'string') out.periods.set(r.period, r);
    else if (Number(r.g_ytd) === 1 && typeof r.year === 'string') out.years.set(r.year, r);
    else if (r.ytd === true && typeof r.year === 'string') out.ytd.set(r.year, r);
  }
  return out;
}

/**
 * Growth findings for each metric. A first or last period only partly covered by the window or the
 * data is kept as a value but takes no part in any rate (half a month against a whole month says
 * nothing about growth), and a `partial_period_excluded` caveat says so. A rate whose base is zero,
 * negative or missing is null with a `base_zero` caveat.
 */
export function readGrowthSeries(
  sq: SubQuestion,
  table: ResultTable,
  coverage: Coverage,
  dataset: DatasetConfig,
): Reading {
  const caveats: Caveat[] = [];
  if (table.truncated) caveats.push({ code: 'truncated', data: { rows: table.rows.length } });
  const rows = splitRows(table);
  // A stamp stands for its whole period: monthly readings stamped 1 April run to 30 April, so the
  // year so far ends there (and a December stamp ends the year).
  const stamp = finestGrain(coverage.stamps);
  if (rows.through !== null && stamp !== 'day') rows.through = addDays(nextPeriod(periodStart(rows.through, stamp), stamp), -1);
  if (coverage.firstDate === null || coverage.lastDate === null || rows.periods.size === 0) {
    return { findings: [], caveats: [...caveats, { code: 'no_data', data: { start: sq.window.start, end: sq.window.end } }] };
  }
  const effectiveEnd = minIso(sq.window.end, dataEnd({ ...coverage, lastDate: coverage.lastDate }));
  const matched = firstMatchingStart(sq.grain, maxIso(sq.window.start, coverage.firstDate), effectiveEnd, (p) => rows.periods.get(p));
  if (matched.caveat) caveats.push(matched.caveat);
  const effectiveStart = matched.start;
  if (effectiveStart >= effectiveEnd) {
    return { findings: [], caveats: [...caveats, { code: 'no_data', data: { start: sq.window.start, end: sq.window.end } }] };
  }
  const starts = periodsBetween(effectiveStart, effectiveEnd, sq.grain);
  const partial = new Set<string>();
  const first = starts[0];
  const last = starts[starts.length - 1];
  if (first !== undefined && first < effectiveStart) partial.add(first);
  if (last !== undefined && nextPeriod(last, sq.grain) > effectiveEnd) partial.add(last);
  for (const p of partial) {
    const coveredFrom = maxIso(p, effectiveStart);
    const coveredTo = addDays(minIso(nextPeriod(p, sq.grain), effectiveEnd), -1);
    caveats.push({ code: 'partial_period_excluded', data: { period: p, grain: sq.grain, coveredFrom, coveredTo } });
  }

  const lag = sq.grain === 'day' ? null : periodsPerYear(sq.grain);
  const yearEarlier = yearEarlierIndex(starts, sq.grain, lag);
  const findings: Finding[] = [];
  for (const metric of sq.metrics) {
    const catalogMetric = metricByName(dataset, metric);
    const additive = isAdditive(catalogMetric);
    // The one rule for percentages of a metric (catalog.ts metricPercentScale): an interval scale
    // (°C) or a signed window gives none.
    const scaleOf = (v: readonly (number | null)[]) => metricPercentScale(catalogMetric, v, additive);
    // A filtered count's period with no rows at all inside the segment's presence is 0 (series.ts emptyInsidePresence).
    const zeroed = new Set(emptyInsidePresence(sq, starts, rows.periods, dataset, metric));
    const raw = starts.map((p) => numberOrNull(rows.periods.get(p)?.[metric]) ?? (zeroed.has(p) ? 0 : null));
    if (raw.every((v) => v === null)) {
      caveats.push({ code: 'all_null', data: { metric } });
      continue;
    }
    // Partial periods are blanked before any rate, so no rate uses them as a value or as a base.
    const values = raw.map((v, i) => (partial.has(starts[i]!) ? null : v));
    const complete = values.filter((v) => v !== null).length;
    if (complete <= 1) caveats.push({ code: 'single_period', data: { metric, periods: complete } });
    const gaps = starts.filter((p, i) => raw[i] === null && !partial.has(p));
    if (gaps.length > 0) caveats.push({ code: 'series_gap', data: { metric, periods: gaps.length, firstGap: gaps[0]!, grain: sq.grain } });
    const zeroes = starts.filter((p) => zeroed.has(p) && !partial.has(p));
    if (zeroes.length > 0) caveats.push({ code: 'series_gap', data: { metric, periods: zeroes.length, firstGap: zeroes[0]!, grain: sq.grain, zero: true } });

    // Percentages only where the base allows one (stats/growth percentScale): never for a quantity
    // that is signed in this window or on an interval scale, never off a base below a tenth of its typical level.
    const scale = scaleOf(values);
    const pop = values.map((v, i) => (i === 0 ? null : percentChange(values[i - 1] ?? null, v, scale)));
    const yoy = lag === null ? values.map(() => null) : values.map((v, i) => percentChange(values[yearEarlier(i)] ?? null, v, scale));
    const trailingWindow = lag !== null && lag > 1 && additive ? lag : null;
    const sums = trailingWindow === null ? [] : trailingSum(values, trailingWindow);
    const sumScale = scaleOf(sums);
    const trailing = trailingWindow === null ? values.map(() => null) : sums.map((v, i) => (i < trailingWindow ? null : percentChange(sums[i - trailingWindow] ?? null, v, sumScale)));
    const points: GrowthPoint[] = starts.map((period, i) => ({
      period,
      value: raw[i]!,
      partial: partial.has(period),
      pop: pop[i]!,
      yoy: yoy[i]!,
      trailing: trailing[i]!,
    }));
    const series: GrowthSeriesFinding = { type: 'growth_series', metric, grain: sq.grain, points, yoyLag: lag, trailingWindow, ...(scale.signed || scale.interval ? { inUnits: true } : {}) };
    findings.push(series);

    // A rate is undefined by its base (not by the window's start) when the base period exists but
    // its value is zero, negative or missing; a partial base is already explained by its own caveat.
    const undefinedBase = (j: number) => j >= 0 && (values[j] === null ? !partial.has(starts[j]!) : !percentBaseUsable(values[j]!, scale));
    const undefinedAt: string[] = [];
    values.forEach((v, i) => {
      if (v !== null && (undefinedBase(i - 1) || (lag !== null && undefinedBase(yearEarlier(i))))) undefinedAt.push(starts[i]!);
    });

    const years = readYears(metric, rows, effectiveStart, effectiveEnd, scaleOf);
    const yearScale = yearsScale(years, scaleOf);
    findings.push(years);
    const completeYears = years.years.filter((y) => y.complete && y.value !== null);
    years.years.forEach((y, i) => {
      const prev = years.years[i - 1];
      if (y.complete && prev?.complete && y.value !== null && !percentBaseUsable(prev.value, yearScale)) undefinedAt.push(y.year);
    });
    if (completeYears.length >= 2) {
      const from = completeYears[0]!;
      const to = completeYears[completeYears.length - 1]!;
      const span = Number(to.year.slice(0, 4)) - Number(from.year.slice(0, 4));
      const c: GrowthCagrFinding = {
        type: 'growth_cagr',
        metric,
        from: { year: from.year, value: from.value! },
        to: { year: to.year, value: to.value! },
        years: span,
        rate: percentBaseUsable(from.value, yearScale) ? cagr(from.value, to.value, span) : null,
      };
      if (c.rate === null) undefinedAt.push(from.year);
      findings.push(c);
    }
    if (quantityKind(metricByName(dataset, metric)) === 'level' && completeYears.length >= 2) findings.push(levelRate(metric, completeYears));
    const ytd = readYtd(metric, rows, effectiveStart, effectiveEnd, scaleOf);
    if (ytd) {
      if (ytd.relative === null && ytd.current.value !== null) undefinedAt.push(ytd.prior.year);
      findings.push(ytd);
    }
    // On an interval scale no percentage is missing for want of a base: none was ever to be given.
    if (undefinedAt.length > 0 && !scale.interval) {
      // Signed in this window's own values, or only by the dataset's reading of its days (Metric.reachesZero).
      const own = metricPercentScale({ ...catalogMetric, reachesZero: false }, values, additive).signed;
      const reason = scale.signed ? (own ? 'signed' : 'signed_days') : values.some((v) => v !== null && v > 0 && !percentBaseUsable(v, scale)) ? 'tiny' : 'zero';
      caveats.push({ code: 'base_zero', data: { metric, count: undefinedAt.length, first: [...undefinedAt].sort()[0]!, reason } });
    }
  }
  return { findings, caveats };
}

/** A level's change in units a year over its complete years, and decade by decade. */
function levelRate(metric: string, years: readonly GrowthYear[]): GrowthLevelRateFinding {
  const at = years.map((y) => ({ year: Number(y.year.slice(0, 4)), value: y.value! }));
  const sen = senSlope(at.map((y) => y.value), at.map((y) => y.year));
  const byDecade = slopesByDecade(at);
  return { type: 'growth_level_rate', metric, from: years[0]!.year, to: years[years.length - 1]!.year, perYear: sen?.slope ?? 0, byDecade: byDecade.length >= 2 ? byDecade : [] };
}

/**
 * The index of the same period a year earlier, or -1 when it is outside the series (or does not
 * exist). Weeks pair by ISO 8601 week number, which is 52 or 53 periods back; other grains are a
 * fixed number of periods back.
 */
function yearEarlierIndex(starts: readonly string[], grain: SubQuestion['grain'], lag: number | null): (i: number) => number {
  if (lag === null) return () => -1;
  if (grain !== 'week') return (i) => i - lag;
  const at = new Map(starts.map((p, i) => [p, i]));
  return (i) => {
    const base = sameIsoWeekLastYear(starts[i]!);
    return base === null ? -1 : (at.get(base) ?? -1);
  };
}

/** The scale of a metric's complete years, the base of every yearly percentage. */
type ScaleOf = (values: readonly (number | null)[]) => PercentScale;

function yearsScale(years: GrowthYearsFinding, scaleOf: ScaleOf): PercentScale {
  return scaleOf(years.years.filter((y) => y.complete).map((y) => y.value));
}

function readYears(metric: string, rows: GrowthRows, effectiveStart: string, effectiveEnd: string, scaleOf: ScaleOf): GrowthYearsFinding {
  const keys = [...rows.years.keys()].sort();
  const years: GrowthYear[] = keys.map((year) => ({
    year,
    value: numberOrNull(rows.years.get(year)?.[metric]),
    complete: year >= effectiveStart && nextPeriod(year, 'year') <= effectiveEnd,
    yoy: null,
  }));
  const found: GrowthYearsFinding = { type: 'growth_years', metric, years };
  const scale = yearsScale(found, scaleOf);
  for (let i = 1; i < years.length; i++) {
    const y = years[i]!;
    const prev = years[i - 1]!;
    const consecutive = nextPeriod(prev.year, 'year') === y.year;
    if (consecutive && y.complete && prev.complete) y.yoy = percentChange(prev.value, y.value, scale);
  }
  return found;
}

/**
 * The last year against the year before, both counted to the same day and month. Given only when
 * the last year is unfinished (otherwise the year totals say it) and both years are covered from 1 January.
 */
function readYtd(metric: string, rows: GrowthRows, effectiveStart: string, effectiveEnd: string, scaleOf: ScaleOf): GrowthYtdFinding | null {
  const through = rows.through;
  if (through === null || through.slice(5) === '12-31') return null;
  const year = `${through.slice(0, 4)}-01-01`;
  // A year the window and data cover in full (its last days merely without rows) is a whole year, not a year so far.
  if (nextPeriod(year, 'year') <= effectiveEnd) return null;
  const priorYear = `${Number(through.slice(0, 4)) - 1}-01-01`;
  if (priorYear < effectiveStart) return null;
  const current = numberOrNull(rows.ytd.get(year)?.[metric]);
  const prior = numberOrNull(rows.ytd.get(priorYear)?.[metric]);
  return {
    type: 'growth_ytd',
    metric,
    through,
    current: { year, value: current },
    prior: { year: priorYear, value: prior },
    relative: percentChange(prior, current, scaleOf([prior, current])),
    absolute: current !== null && prior !== null ? current - prior : null,
  };
}

function numberOrNull(v: unknown): number | null {
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

function emptyTable(): ResultTable {
  return { columns: [], rows: [], truncated: false };
}
