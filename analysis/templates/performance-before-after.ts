// Template "performance_before_after" (performance × time_pattern): the metric per period for
// members and others across the launch date, and a difference in differences over equal-length
// windows either side of the launch. When there were no members before the launch, DiD does not
// apply: others before vs after and members vs others after are compared instead.
import type { ComparisonGroup, Metric } from '../../config/schema.js';
import { type CompileContext, localDateExpr, tableRef, whereClause } from '../compile-context.js';
import type { Coverage } from '../coverage.js';
import { dataEnd } from '../coverage.js';
import type { GroupRole, PerformanceDidNotApplicableFinding, PerformancePeriodsFinding } from '../findings/performance.js';
import { addDays, addMonths, daysBetween, nextPeriod, periodsBetween, periodStart } from '../periods.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { Caveat, CellValue, DateWindow, Finding, Grain, NamedQuery, PeriodPoint, ResultTable, SubQuestion } from '../types.js';
import { differenceFinding, primaryMetric } from './performance-compare.js';
import { ALPHA, CONFIDENCE, compileUnitsLeftOut, EMPTY_TABLE, groupCaveats, groupKnown, isSuppressed, memberFlag, resolveGroup, roleLabel, roleOf, throughUnitsCondition, unitsLeftOutFinding } from './performance-common.js';
import { minGroupSize, suppressedGroupsCaveat, suppressSmallCells } from './small-groups.js';
import { cellFromRow, comparisonPlanFor, comparisonShape, goodDirection, measureColumns, perDayQuery, type MeasurePlan } from './performance-measure.js';
import { groupableDimension } from '../catalog.js';
import { type Cell, cellEstimate, compareCells, contrast, logRatioContrast, poolCells, verdictOf } from './performance-stats.js';
import type { Template } from './template.js';
import { compileUnitDid, effectiveWindow, launchOf, readUnitDid, unitDidApplies } from './performance-unit-did.js';

/** Per period × group summary pieces over the whole window, at `grain`. */
export function compileGroupPeriods(sq: SubQuestion, ctx: CompileContext, grain: Grain, name: string): NamedQuery {
  const ds = ctx.dataset;
  const metric = primaryMetric(ds, sq);
  const group = resolveGroup(ds, sq);
  const q = new QueryBuilder(ctx.dialect);
  const period = ctx.dialect.periodStart(grain, localDateExpr(q, ctx));
  // Per day of each group's total; a group of named units is put per unit from its unit count
  // (`compileGroupUnits`), the units being the same through the window (throughUnitsCondition).
  const plan = comparisonPlanFor(q, ctx, metric);
  const where = `${whereClause(q, ctx, sq.window, sq.filters)}\n  AND ${throughUnitsCondition(q, ctx, sq, group, sq.window)}`;
  let cols: string[];
  let body: string;
  const keys = [
    { sql: period, alias: 'period' },
    { sql: memberFlag(q, group), alias: 'tc_member' },
  ];
  if (plan.perDay) {
    ({ body, columns: cols } = perDayQuery(q, ctx, metric, keys, tableRef(q, ctx), `${where}\n    AND ${groupKnown(q, group)}`));
  } else {
    cols = measureColumns(q, ds, metric, plan, ctx);
    body = `SELECT ${period} AS period,
  ${memberFlag(q, group)} AS tc_member,
  ${cols.join(',\n  ')}
FROM ${tableRef(q, ctx)}
WHERE ${where}
  AND ${groupKnown(q, group)}
GROUP BY 1, 2`;
  }
  const min = minGroupSize(ds);
  if (min !== null) {
    // A group's period below the minimum group size keeps its row, every number withheld.
    return { name, ...q.finish(suppressSmallCells({ inner: body, keys: ['period', 'tc_member'], columns: cols, sizeColumn: 'tc_rows', minimum: q.bind(min), orderBy: 'period, tc_member' })) };
  }
  return { name, ...q.finish(`${body}\nORDER BY 1, 2`) };
}

/**
 * How many units (shops) each group has over the window, for a metric compared per unit: null
 * otherwise. Each period's per-day total divided by it is the mean unit's daily rate.
 */
export function compileGroupUnits(sq: SubQuestion, ctx: CompileContext): NamedQuery | null {
  const ds = ctx.dataset;
  const group = resolveGroup(ds, sq);
  const shape = comparisonShape(ds, primaryMetric(ds, sq), group);
  if (!shape.perUnit) return null;
  const unit = groupableDimension(ds, shape.perUnit);
  const q = new QueryBuilder(ctx.dialect);
  const where = `${whereClause(q, ctx, sq.window, sq.filters)}\n  AND ${throughUnitsCondition(q, ctx, sq, group, sq.window)}`;
  return {
    name: 'group_units',
    ...q.finish(`SELECT ${memberFlag(q, group)} AS tc_member, ${ctx.dialect.toDouble(`COUNT(DISTINCT ${q.ident(unit.column)})`)} AS tc_units
FROM ${tableRef(q, ctx)}
WHERE ${where}
  AND ${groupKnown(q, group)}
GROUP BY 1
ORDER BY 1`),
  };
}

/** The units per group read back, with the unit dimension; null when either group has none. */
function unitsPerGroup(sq: SubQuestion, ds: CompileContext['dataset'], table: ResultTable | undefined): UnitsPerGroup | null {
  const shape = comparisonShape(ds, primaryMetric(ds, sq), resolveGroup(ds, sq));
  if (!shape.perUnit || !table) return null;
  const count: Partial<Record<GroupRole, number>> = {};
  for (const r of table.rows) {
    const role = roleOf(r.tc_member);
    if (role && typeof r.tc_units === 'number' && r.tc_units > 0) count[role] = r.tc_units;
  }
  return count.members && count.others ? { unit: shape.perUnit, members: count.members, others: count.others } : null;
}

/**
 * The equal windows a per-customer before/after compares (performance-unit-did.ts), or null when
 * the question is not asked per customer or the data has no whole month on a side.
 */
function unitPeriods(sq: SubQuestion, ds: CompileContext['dataset'], coverage: Coverage | undefined): PerformancePeriodsFinding | null {
  const group = resolveGroup(ds, sq);
  const metric = primaryMetric(ds, sq);
  if (!unitDidApplies(ds, sq, group, metric)) return null;
  const w = effectiveWindow(sq, coverage);
  return equalWindows(launchOf(sq, group)!, w.start, w.end);
}

export const performanceBeforeAfterTemplate: Template = {
  compile: (sq, ctx) => {
    const group = resolveGroup(ctx.dataset, sq);
    // "Are pass holders travelling more?": the same customers before and after, per customer.
    const perUnit = unitPeriods(sq, ctx.dataset, ctx.coverage);
    if (perUnit) return compileUnitDid(sq, ctx, group, primaryMetric(ctx.dataset, sq), perUnit);
    const series = compileGroupPeriods(sq, ctx, sq.grain, 'series');
    const leftOut = compileUnitsLeftOut(sq, ctx, group, sq.window);
    const units = compileGroupUnits(sq, ctx);
    // DiD windows are whole months, so they need monthly pieces when the chart's grain is not a month.
    return [series, ...(group.launch_date && sq.grain !== 'month' ? [compileGroupPeriods(sq, ctx, 'month', 'months')] : []), ...(leftOut ? [leftOut] : []), ...(units ? [units] : [])];
  },
  read: (sq, tables, ctx) => {
    const ds = ctx.dataset;
    const metric = primaryMetric(ds, sq);
    const group = resolveGroup(ds, sq);
    const perUnit = tables.unit_tally ? unitPeriods(sq, ds, ctx.coverage) : null;
    if (perUnit) {
      // What is compared is the two equal windows, whatever the window asked.
      const read = readUnitDid(sq, ds, group, metric, perUnit, tables);
      return { ...read, findings: [{ type: 'performance_window', group: group.name, start: perUnit.before.start, end: perUnit.after.end, launchDate: perUnit.launchDate, clippedToLaunch: false }, ...read.findings] };
    }
    const shape = comparisonShape(ds, metric);
    const series = tables.series ?? EMPTY_TABLE;
    const months = sq.grain === 'month' ? series : (tables.months ?? EMPTY_TABLE);
    const read = readBeforeAfter(sq, metric, group, shape, series, months, ctx.coverage, minGroupSize(ds), unitsPerGroup(sq, ds, tables.group_units));
    const leftOut = unitsLeftOutFinding(ds, group, tables.units_left_out);
    return leftOut ? { ...read, findings: [...read.findings, leftOut] } : read;
  },
};

type Shape = Pick<MeasurePlan, 'kind' | 'quantity' | 'additive' | 'perDay'>;
type Keyed = { period: string; role: GroupRole; cell: Cell; suppressed: boolean };
/** The units (shops) each group holds through the window, when the metric is compared per unit. */
export type UnitsPerGroup = { unit: string } & Record<GroupRole, number>;

/**
 * Cells keyed by period and group; a count compared per day spans its period's days within
 * [start, end). With `units`, each per-day cell is put per unit: its mean and spread divided by
 * the group's unit count (a ratio of two groups' changes is the same either way).
 */
function keyedCells(table: ResultTable, shape: Shape, grain: Grain, start: string, end: string, units: UnitsPerGroup | null = null): Keyed[] {
  const out: Keyed[] = [];
  for (const r of table.rows) {
    const role = roleOf(r.tc_member);
    if (!role || typeof r.period !== 'string') continue;
    const from = r.period > start ? r.period : start;
    const next = nextPeriod(r.period, grain);
    const days = daysBetween(from, next < end ? next : end);
    const cell = cellFromRow(r as Record<string, CellValue>, shape, days);
    const k = units?.[role];
    const scaled = k && cell.kind === 'mean' ? { ...cell, mean: cell.mean / k, m2: cell.m2 / (k * k) } : cell;
    out.push({ period: r.period, role, cell: scaled, suppressed: isSuppressed(r) });
  }
  return out;
}

export function readBeforeAfter(
  sq: SubQuestion,
  metric: Metric,
  group: ComparisonGroup,
  shape: Shape,
  seriesTable: ResultTable,
  monthsTable: ResultTable,
  coverage: Coverage,
  minimum: number | null = null,
  units: UnitsPerGroup | null = null,
): { findings: Finding[]; caveats: Caveat[] } {
  const findings: Finding[] = [];
  // Put per unit, the figures are a mean unit's daily rate, and that is what the findings say.
  const quantity = units && shape.perDay ? 'per_unit_day' : shape.quantity;
  if (units && shape.perDay) shape = { ...shape, quantity };
  const caveats: Caveat[] = [];
  const effStart = coverage.firstDate && coverage.firstDate > sq.window.start ? coverage.firstDate : sq.window.start;
  const lastEnd = coverage.lastDate ? dataEnd({ ...coverage, lastDate: coverage.lastDate }) : sq.window.start;
  const effEnd = lastEnd < sq.window.end ? lastEnd : sq.window.end;

  findings.push({
    type: 'performance_window',
    group: group.name,
    start: effStart,
    end: effEnd < effStart ? effStart : effEnd,
    launchDate: group.launch_date ?? null,
    clippedToLaunch: false,
  });
  const seriesCells = keyedCells(seriesTable, shape, sq.grain, effStart, effEnd, units);
  const starts = effStart < effEnd ? periodsBetween(effStart, effEnd, sq.grain) : [];
  const partial = new Set<string>();
  const first = starts[0];
  const last = starts[starts.length - 1];
  if (first !== undefined && first < effStart) partial.add(first);
  if (last !== undefined && nextPeriod(last, sq.grain) > effEnd) partial.add(last);
  for (const p of partial) {
    const coveredFrom = p > effStart ? p : effStart;
    const end = nextPeriod(p, sq.grain) < effEnd ? nextPeriod(p, sq.grain) : effEnd;
    caveats.push({ code: 'partial_period', data: { period: p, grain: sq.grain, coveredFrom, coveredTo: addDays(end, -1) } });
  }
  for (const role of ['members', 'others'] as const) {
    const byPeriod = new Map(seriesCells.filter((c) => c.role === role).map((c) => [c.period, c.cell]));
    const points: PeriodPoint[] = starts.map((p) => {
      const cell = byPeriod.get(p);
      return { period: p, value: cell ? cellEstimate(cell) : null, partial: partial.has(p) };
    });
    findings.push({ type: 'performance_group_series', metric: metric.name, group: role, grain: sq.grain, quantity: shape.quantity, ...(units && shape.perDay ? { unit: units.unit } : {}), points });
  }

  const monthCells = keyedCells(monthsTable, shape, 'month', effStart, effEnd, units);
  const pool = (role: GroupRole, w: DateWindow) =>
    poolCells(
      monthCells.filter((c) => c.role === role && c.period >= w.start && c.period < w.end).map((c) => c.cell),
      shape.kind,
      shape.additive,
    );
  const notApplicable = (reason: PerformanceDidNotApplicableFinding['reason']) =>
    findings.push({ type: 'performance_did_not_applicable', metric: metric.name, reason });
  const comparePair = (a: Cell, b: Cell, comparison: 'members_vs_others' | 'others_after_vs_before' | 'members_after_vs_before') => {
    const result = compareCells(a, b, CONFIDENCE);
    findings.push(differenceFinding(metric.name, comparison, shape.kind, result, a.n, b.n));
    return result;
  };
  const verdict = (result: ReturnType<typeof compareCells>) => {
    if (shape.kind === 'total') return;
    findings.push({
      type: 'performance_verdict',
      metric: metric.name,
      comparison: 'members_vs_others',
      ...verdictOf(result, goodDirection(metric, shape.quantity), ALPHA),
      alpha: ALPHA,
      higherIsBetter: goodDirection(metric, shape.quantity),
      relative: result.kind === 'test' ? result.relative : null,
    });
  };

  let sizes: { role: GroupRole; n: number }[];
  const periods = group.launch_date ? equalWindows(group.launch_date, effStart, effEnd) : null;
  // Periods of a group below the minimum group size are withheld: their points are blank, and pools
  // that would need them are not formed (a pool without them would silently leave rows out).
  const hiddenSeries = seriesCells.filter((c) => c.suppressed);
  const hiddenMonths = monthCells.filter((c) => c.suppressed);
  const hiddenIn = (w: DateWindow) => hiddenMonths.some((c) => c.period >= w.start && c.period < w.end);
  if (hiddenSeries.length > 0 && minimum !== null) {
    const roles = [...new Set(hiddenSeries.map((c) => c.role))].map((r) => roleLabel(group, r));
    caveats.push(suppressedGroupsCaveat(roles, minimum, { count: hiddenSeries.length, periods: true, grain: sq.grain }));
  }
  if (periods ? hiddenIn(periods.before) || hiddenIn(periods.after) : hiddenSeries.length > 0) {
    if (periods) findings.push(periods);
    // No members at all before the launch is the first reason there is no before and after; a
    // small month withheld is the reason only when there were members to compare.
    const membersBefore = periods ? monthCells.some((c) => c.role === 'members' && c.period >= periods.before.start && c.period < periods.before.end) : true;
    notApplicable(membersBefore ? 'suppressed' : 'members_empty_before');
    const shown = (role: GroupRole) => poolCells(seriesCells.filter((c) => c.role === role).map((c) => c.cell), shape.kind, shape.additive).n;
    sizes = (['members', 'others'] as const).map((role) => ({ role, n: shown(role) }));
  } else if (!group.launch_date || !periods) {
    notApplicable(group.launch_date ? 'window_too_short' : 'no_launch_date');
    // Without a launch to split on, members vs others over the whole window (exact pooling of the periods).
    const whole = (role: GroupRole) => poolCells(seriesCells.filter((c) => c.role === role).map((c) => c.cell), shape.kind, shape.additive);
    const m = whole('members');
    const o = whole('others');
    verdict(comparePair(m, o, 'members_vs_others'));
    sizes = [
      { role: 'members', n: m.n },
      { role: 'others', n: o.n },
    ];
  } else {
    findings.push(periods);
    const mb = pool('members', periods.before);
    const ma = pool('members', periods.after);
    const ob = pool('others', periods.before);
    const oa = pool('others', periods.after);
    sizes = [
      { role: 'members', n: ma.n },
      { role: 'others', n: oa.n },
    ];
    const poolable = [mb, ma, ob, oa].every((c) => c.n === 0 || cellEstimate(c) !== null);
    if (!poolable) notApplicable('not_poolable');
    else if (mb.n === 0) notApplicable('members_empty_before');
    else if (ma.n === 0 || ob.n === 0 || oa.n === 0) notApplicable('group_empty');
    else {
      const terms = [
        { cell: ma, weight: 1 },
        { cell: mb, weight: -1 },
        { cell: oa, weight: -1 },
        { cell: ob, weight: 1 },
      ];
      const did = contrast(terms, CONFIDENCE);
      const ratio = logRatioContrast(terms, CONFIDENCE);
      if (did) {
        const [vMa, vMb, vOa, vOb] = [ma, mb, oa, ob].map((c) => cellEstimate(c)!) as [number, number, number, number];
        const counterfactual = vMa - did.estimate;
        findings.push({
          type: 'performance_did',
          metric: metric.name,
          measure: shape.kind,
          membersBefore: vMb,
          membersAfter: vMa,
          othersBefore: vOb,
          othersAfter: vOa,
          estimate: did.estimate,
          relative: counterfactual === 0 ? null : did.estimate / counterfactual,
          ci: did.ci,
          confidence: CONFIDENCE,
          test: did.test,
          statistic: did.statistic,
          df: did.df,
          pValue: did.pValue,
          ratio: ratio ? { estimate: ratio.estimate, ci: ratio.ci, pValue: ratio.pValue } : null,
        });
      }
      comparePair(ma, mb, 'members_after_vs_before');
    }
    if (poolable) {
      if (ob.n > 0 || oa.n > 0) comparePair(oa, ob, 'others_after_vs_before');
      verdict(comparePair(ma, oa, 'members_vs_others'));
    }
  }
  const win = { start: effStart, end: effEnd };
  caveats.push(...groupCaveats([seriesTable, ...(monthsTable === seriesTable ? [] : [monthsTable])], sizes, group, win));
  return { findings, caveats };
}

/**
 * Equal-length windows of whole months either side of the launch: as many months as both sides
 * have complete, cut to whole years when a year or more is available, so each side holds every
 * season equally. Null when not even one complete month is available on each side.
 */
export function equalWindows(launch: string, start: string, end: string): PerformancePeriodsFinding | null {
  const beforeEnd = periodStart(launch, 'month');
  const afterStart = beforeEnd === launch ? launch : nextPeriod(beforeEnd, 'month');
  const firstFull = periodStart(start, 'month') === start ? start : nextPeriod(periodStart(start, 'month'), 'month');
  let before = 0;
  while (addMonths(beforeEnd, -(before + 1)) >= firstFull) before++;
  let after = 0;
  while (addMonths(afterStart, after + 1) <= end) after++;
  let months = Math.min(before, after);
  if (months < 1) return null;
  if (months >= 12) months -= months % 12;
  return {
    type: 'performance_periods',
    launchDate: launch,
    before: { start: addMonths(beforeEnd, -months), end: beforeEnd },
    after: { start: afterStart, end: addMonths(afterStart, months) },
    months,
  };
}
