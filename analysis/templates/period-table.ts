// Template "period_table": several metrics side by side, one row per period of the window, each
// with its change on the period before and on the same period a year earlier, a totals row, and
// each metric's best and worst periods. One grouped query reads the window and the year before it
// (so the first rows have their bases) and the window's totals, aggregated in the database so a
// ratio stays a ratio of sums; the changes, marks and cross-metric findings are worked out in `read`.
import type { DatasetConfig, Metric, MetricKind } from '../../config/schema.js';
import { changeBasisOf, metricByName, metricKind, metricDirection } from '../catalog.js';
import { type CompileContext, localDateExpr, periodScope, tableRef } from '../compile-context.js';
import type { Coverage } from '../coverage.js';
import type {
  ChangeBasis,
  PeriodExtreme,
  PeriodTableCell,
  PeriodTableColumn,
  PeriodTableFinding,
  PeriodTableRow,
  TableLatestFinding,
  TableQuotientFinding,
  TotalRule,
} from '../findings/table.js';
import { addDays, addMonths, nextPeriod, periodStart, sameIsoWeekLastYear } from '../periods.js';
import { QueryBuilder } from '../sql/query-builder.js';
import { relativeChange } from '../stats/index.js';
import type { Caveat, CompiledQuery, DateWindow, Finding, Grain, ResultTable, SubQuestion } from '../types.js';
import type { Reading, Template } from './template.js';
import { coveredWindow, EMPTY_TABLE, numberOrNull, windowPeriods } from './trend-points.js';

// Working column names, prefixed so they cannot clash with a table's own columns.
const PERIOD = '__tc_period';
const IN_WINDOW = '__tc_in_window';

/**
 * Percent for flows and ratios of amounts, points for rates and shares (unit percent), units for
 * levels, interval scales and values that reach or cross zero: catalog.ts changeBasisOf, the one rule.
 */
export function columnBasis(metric: Metric, kind: MetricKind, values: readonly (number | null)[]): ChangeBasis {
  return kind === 'level' && metric.unit !== 'percent' ? 'units' : changeBasisOf(metric, values);
}

/** What the totals row holds: a flow's sum where it adds up, a level's mean, otherwise the metric over the whole window. */
export function totalRuleOf(metric: Metric, kind: MetricKind): TotalRule {
  if (kind === 'level') return 'mean';
  const t = metric.definition.type;
  return t === 'sum' || t === 'count' ? 'sum' : 'overall';
}

/** The period before the one starting at `period`. */
export function previousPeriod(period: string, grain: Grain): string {
  switch (grain) {
    case 'day':
      return addDays(period, -1);
    case 'week':
      return addDays(period, -7);
    case 'month':
      return addMonths(period, -1);
    case 'quarter':
      return addMonths(period, -3);
    case 'year':
      return addMonths(period, -12);
  }
}

/**
 * The same period a year earlier: the same calendar month, quarter or year; the same ISO week
 * number (null for a week 53 whose year before has none); for days, 52 weeks back, so a Monday is
 * compared with a Monday.
 */
export function yearEarlierPeriod(period: string, grain: Grain): string | null {
  if (grain === 'week') return sameIsoWeekLastYear(period);
  if (grain === 'day') return addDays(period, -364);
  return addMonths(period, -12);
}

/** The first period the query reads: early enough for the window's first row to have both its bases. */
export function lookbackStart(window: DateWindow, grain: Grain): string {
  const first = periodStart(window.start, grain);
  const yearBack = yearEarlierPeriod(first, grain) ?? addDays(first, -371);
  const prev = previousPeriod(first, grain);
  return periodStart(yearBack < prev ? yearBack : prev, grain);
}

export function compilePeriodTable(sq: SubQuestion, ctx: CompileContext): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const d = ctx.dialect;
  const period = q.ident(PERIOD);
  const inWindow = q.ident(IN_WINDOW);
  const span = { start: lookbackStart(sq.window, sq.grain), end: sq.window.end };
  const date = () => localDateExpr(q, ctx);
  const scope = periodScope(q, ctx, span, sq.filters);
  const measures = sq.metrics.map((name) => `  ${scope.measure(metricByName(ctx.dataset, name))} AS ${q.ident(name)}`);
  // Three groupings of the same rows: each whole period (the bases of the changes), each period's
  // part inside the window (what a row shows: a window starting mid-month shows only its own days
  // of that month), and the window as a whole (the totals row).
  return q.finish(`SELECT GROUPING(${period}) AS g_period,
  GROUPING(${inWindow}) AS g_window,
  ${period} AS period,
  ${inWindow} AS in_window,
${measures.join(',\n')},
  ${d.toDouble(scope.rowCount())} AS row_count
FROM (
  SELECT *,
    ${d.periodStart(sq.grain, date())} AS ${period},
    ${date()} >= ${d.dateParam(q.bind(sq.window.start))} AS ${inWindow}
  FROM ${tableRef(q, ctx)}
  WHERE ${scope.where}
) AS tagged
GROUP BY GROUPING SETS ((${period}), (${period}, ${inWindow}), (${inWindow}))
ORDER BY 1, 2, 3, 4`);
}

export const periodTableTemplate: Template = {
  compile: (sq, ctx) => [{ name: 'by_period', ...compilePeriodTable(sq, ctx) }],
  read: (sq, tables, ctx) => readPeriodTable(sq, tables.by_period ?? EMPTY_TABLE, ctx.coverage, ctx.dataset),
};

/** Relative tolerance of the quotient check: the database's sums against their quotient in doubles. */
const QUOTIENT_TOLERANCE = 1e-9;

export function readPeriodTable(sq: SubQuestion, table: ResultTable, coverage: Coverage, dataset: DatasetConfig): Reading {
  const caveats: Caveat[] = [];
  if (table.truncated) caveats.push({ code: 'truncated', data: { rows: table.rows.length } });
  const noData = (): Reading => ({ findings: [], caveats: [...caveats, { code: 'no_data', data: { start: sq.window.start, end: sq.window.end } }] });
  const grain = sq.grain;
  const firstPeriod = periodStart(sq.window.start, grain);
  const fetched = coveredWindow({ start: lookbackStart(sq.window, grain), end: sq.window.end }, coverage);
  const shown = coveredWindow(sq.window, coverage);
  if (!fetched || !shown || table.rows.length === 0) return noData();
  // Periods the data covers only in part are never a base; a row is partial as well when the
  // window starts inside its period (it shows the window's days, while the whole period stays a base).
  const { starts, partial: uncovered } = windowPeriods(fetched, grain);
  const partial = new Set(uncovered);
  if (shown.start > firstPeriod) partial.add(periodStart(shown.start, grain));
  const known = new Set(starts);
  const whole = new Map<string, Record<string, unknown>>();
  const inside = new Map<string, Record<string, unknown>>();
  let totals: Record<string, unknown> | undefined;
  for (const r of table.rows) {
    const [gPeriod, gWindow] = [Number(r.g_period), Number(r.g_window)];
    if (gPeriod === 0 && gWindow === 1 && typeof r.period === 'string') whole.set(r.period, r);
    else if (gPeriod === 0 && gWindow === 0 && r.in_window === true && typeof r.period === 'string') inside.set(r.period, r);
    else if (gPeriod === 1 && gWindow === 0 && r.in_window === true) totals = r;
  }
  const rowsShown = starts.filter((p) => p >= firstPeriod);
  if (rowsShown.length === 0) return noData();
  const coveredDays = (p: string) => ({ from: p < shown.start ? shown.start : p, to: addDays(nextPeriod(p, grain) < shown.end ? nextPeriod(p, grain) : shown.end, -1) });
  for (const p of rowsShown.filter((x) => partial.has(x))) {
    const { from, to } = coveredDays(p);
    caveats.push({ code: 'partial_period', data: { period: p, grain, coveredFrom: from, coveredTo: to, shown: 'row' } });
  }

  const valueAt = (metric: string, p: string): number | null => (known.has(p) && !uncovered.has(p) ? numberOrNull(whole.get(p)?.[metric]) : null);
  const rows: PeriodTableRow[] = rowsShown.map((period) => (partial.has(period) ? { period, partial: true, covered: coveredDays(period), cells: [] } : { period, partial: false, cells: [] }));
  const columns = sq.metrics.map((name): PeriodTableColumn => {
    const metric = metricByName(dataset, name);
    const read = readColumn(metric, metricKind(dataset, metric), grain, rows, (p) => numberOrNull(inside.get(p)?.[name]), (p) => valueAt(name, p));
    rows.forEach((row, i) => row.cells.push(read.cells[i]!));
    caveats.push(...read.caveats);
    const { total } = read.column;
    return { ...read.column, total: total.rule === 'mean' ? total : { ...total, value: numberOrNull(totals?.[name]) } };
  });

  const found: PeriodTableFinding = {
    type: 'period_table',
    grain,
    span: shown,
    yearEarlier: grain === 'week' ? 'iso_week' : grain === 'day' ? 'weeks_52' : 'calendar',
    columns,
    rows,
  };
  const findings: Finding[] = [found];
  const latest = latestChanges(found);
  if (latest) findings.push(latest);
  findings.push(...quotients(found));
  return { findings, caveats };
}

/**
 * One metric's column: its value in each row, the changes on the period before and a year earlier
 * against whole, fully covered periods, its marks over the complete rows, and its caveats. The
 * totals row's value is the mean of the complete rows for a level; other totals come from the query.
 */
function readColumn(
  metric: Metric,
  kind: MetricKind,
  grain: Grain,
  rows: readonly PeriodTableRow[],
  shownValue: (period: string) => number | null,
  baseValue: (period: string) => number | null,
): { column: PeriodTableColumn; cells: PeriodTableCell[]; caveats: Caveat[] } {
  const name = metric.name;
  const basis = columnBasis(metric, kind, rows.map((row) => shownValue(row.period)));
  const caveats: Caveat[] = [];
  let undefinedBase = 0;
  const complete: PeriodExtreme[] = [];
  const cells: PeriodTableCell[] = rows.map((row) => {
    const value = shownValue(row.period);
    const own = row.partial ? null : value;
    const prevBase = baseValue(previousPeriod(row.period, grain));
    const yearPeriod = yearEarlierPeriod(row.period, grain);
    const yearBase = yearPeriod === null ? null : baseValue(yearPeriod);
    if (basis === 'percent' && own !== null && [prevBase, yearBase].some((b) => b !== null && b <= 0)) undefinedBase++;
    if (own !== null) complete.push({ period: row.period, value: own });
    return { value, vsPrevious: changeIn(basis, prevBase, own), vsYearEarlier: changeIn(basis, yearBase, own), mark: null };
  });
  const gaps = rows.filter((r, i) => !r.partial && cells[i]!.value === null);
  if (gaps.length > 0 && gaps.length < rows.length) caveats.push({ code: 'series_gap', data: { metric: name, periods: gaps.length, firstGap: gaps[0]!.period, grain } });
  if (complete.length === 0) caveats.push({ code: cells.some((c) => c.value !== null) ? 'single_period' : 'all_null', data: { metric: name } });
  if (undefinedBase > 0) caveats.push({ code: 'base_zero', data: { metric: name, count: undefinedBase } });
  const { high, low } = extremes(complete);
  // With no good direction there is no best or worst period to mark (the caption names the highest and lowest).
  if (high && low && metricDirection(metric) !== null) {
    const [best, worst] = metricDirection(metric) === false ? [low, high] : [high, low];
    rows.forEach((row, i) => {
      if (row.partial) return;
      if (row.period === best.period) cells[i]!.mark = 'best';
      else if (row.period === worst.period) cells[i]!.mark = 'worst';
    });
  }
  const rule = totalRuleOf(metric, kind);
  const column: PeriodTableColumn = { metric: name, kind, basis, higherIsBetter: metricDirection(metric), total: { rule, value: rule === 'mean' ? meanOf(complete.map((c) => c.value)) : null }, high, low };
  return { column, cells, caveats };
}

function changeIn(basis: ChangeBasis, base: number | null, value: number | null): number | null {
  if (basis === 'percent') return relativeChange(base, value);
  if (base === null || value === null) return null;
  const d = value - base;
  return Number.isFinite(d) ? d : null;
}

/** Highest and lowest values, ties keeping the earliest period; null unless at least two values differ. */
function extremes(points: readonly PeriodExtreme[]): { high: PeriodExtreme | null; low: PeriodExtreme | null } {
  if (points.length < 2) return { high: null, low: null };
  let high = points[0]!;
  let low = points[0]!;
  for (const p of points) {
    if (p.value > high.value) high = p;
    if (p.value < low.value) low = p;
  }
  return high.value === low.value ? { high: null, low: null } : { high, low };
}

function meanOf(values: readonly number[]): number | null {
  return values.length === 0 ? null : values.reduce((a, b) => a + b, 0) / values.length;
}

/**
 * The latest complete row against a year earlier when any metric has that change there, else
 * against the period before; null when the latest complete row has neither.
 */
function latestChanges(t: PeriodTableFinding): TableLatestFinding | null {
  const row = [...t.rows].reverse().find((r) => !r.partial && r.cells.some((c) => c.value !== null));
  if (!row) return null;
  const pick = (against: 'year_earlier' | 'previous') =>
    t.columns.flatMap((col, i) => {
      const c = row.cells[i]!;
      const change = against === 'year_earlier' ? c.vsYearEarlier : c.vsPrevious;
      return change === null ? [] : [{ metric: col.metric, basis: col.basis, change }];
    });
  const yearly = pick('year_earlier');
  const base = yearEarlierPeriod(row.period, t.grain);
  if (yearly.length > 0 && base !== null) return { type: 'table_latest', period: row.period, against: 'year_earlier', base, changes: yearly };
  const previous = pick('previous');
  if (previous.length > 0) return { type: 'table_latest', period: row.period, against: 'previous', base: previousPeriod(row.period, t.grain), changes: previous };
  return null;
}

/**
 * Every ratio metric of the table that equals another metric divided by a third in each complete
 * period (at least two). One identity is stated once: revenue / bookings = average fare also reads
 * revenue / average fare = bookings, and only the ratio's side of it is kept.
 */
function quotients(t: PeriodTableFinding): TableQuotientFinding[] {
  const out: TableQuotientFinding[] = [];
  const used = new Set<string>();
  const n = t.columns.length;
  const complete = t.rows.filter((r) => !r.partial);
  for (let r = 0; r < n; r++) {
    if (t.columns[r]!.kind !== 'ratio') continue;
    search: for (let a = 0; a < n; a++) {
      for (let b = 0; b < n; b++) {
        if (a === r || b === r || a === b) continue;
        const key = [r, a, b].sort().join();
        if (used.has(key)) continue;
        let checked = 0;
        let holds = true;
        for (const row of complete) {
          const [rv, av, bv] = [row.cells[r]!.value, row.cells[a]!.value, row.cells[b]!.value];
          if (rv === null || av === null || bv === null || bv === 0) continue;
          checked++;
          if (Math.abs(av / bv - rv) > QUOTIENT_TOLERANCE * Math.max(Math.abs(rv), 1e-12)) {
            holds = false;
            break;
          }
        }
        if (holds && checked >= 2) {
          used.add(key);
          out.push({ type: 'table_quotient', ratio: t.columns[r]!.metric, numerator: t.columns[a]!.metric, denominator: t.columns[b]!.metric, periods: checked });
          break search;
        }
      }
    }
  }
  return out;
}
