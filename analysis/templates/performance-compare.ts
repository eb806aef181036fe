// Template "performance_compare" (performance × summary): members vs others on one metric over
// the window (from the launch date when there is one). Means get Welch's t-test from SQL moments,
// shares a two-proportion z-test, ratios of sums a delta-method z-test; money values add a seeded
// bootstrap interval for the difference in medians from a bounded deterministic sample per group.
import type { DatasetConfig, Metric } from '../../config/schema.js';
import { groupableDimension, metricByName } from '../catalog.js';
import { type CompileContext, tableRef, whereClause } from '../compile-context.js';
import type { GroupRole, PerformanceGroupFinding } from '../findings/performance.js';
import { bootstrapMedianDifference } from '../stats/index.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { Caveat, CellValue, Finding, NamedQuery, ResultTable, SubQuestion } from '../types.js';
import {
  ALPHA,
  CONFIDENCE,
  comparisonWindow,
  compileUnitsLeftOut,
  EMPTY_TABLE,
  groupCaveats,
  groupKnown,
  isSuppressed,
  memberFlag,
  resolveGroup,
  roleOf,
  rowsByRole,
  suppressedComparison,
  throughUnitsCondition,
  unitsLeftOutFinding,
  windowFinding,
} from './performance-common.js';
import { cellFromRow, comparisonPlanFor, comparisonShape, goodDirection, isMoney, measureColumns, medianColumn, num, perDayQuery, perUnitQuery, planMeasure, type MeasurePlan } from './performance-measure.js';
import { daysBetween } from '../periods.js';
import { type Cell, cellEstimate, cellInterval, compareCells, verdictOf, type TestedDifference, type UntestedDifference } from './performance-stats.js';
import { minGroupSize, suppressSmallCells } from './small-groups.js';
import type { Reading, Template } from './template.js';

/** Rows drawn per group for the median bootstrap: bounded, so the sample never grows with the data. */
export const SAMPLE_PER_GROUP = 4000;
/** Seed of the SQL sample order and of the bootstrap PRNG: the same data always gives the same interval. */
export const SAMPLE_SEED = 4021;
export const BOOTSTRAP_RESAMPLES = 2000;

export function primaryMetric(ds: DatasetConfig, sq: SubQuestion): Metric {
  const name = sq.metrics[0];
  if (!name) throw new Error(`sub-question ${sq.id} names no metric to compare`);
  return metricByName(ds, name);
}

/** One summary row per group over the window. */
export function compileGroups(sq: SubQuestion, ctx: CompileContext): NamedQuery {
  const ds = ctx.dataset;
  const metric = primaryMetric(ds, sq);
  const group = resolveGroup(ds, sq);
  const q = new QueryBuilder(ctx.dialect);
  const plan = comparisonPlanFor(q, ctx, metric, group);
  const window = comparisonWindow(sq, group).window;
  const where = `${whereClause(q, ctx, window, sq.filters)}\n  AND ${throughUnitsCondition(q, ctx, sq, group, window)}`;
  let cols: string[];
  let body: string;
  if (plan.perUnit) {
    const unit = groupableDimension(ds, plan.perUnit);
    ({ body, columns: cols } = perUnitQuery(q, ctx, metric, unit.column, [{ sql: memberFlag(q, group), alias: 'tc_member' }], tableRef(q, ctx), `${where}\n    AND ${groupKnown(q, group)}`));
  } else if (plan.perDay) {
    ({ body, columns: cols } = perDayQuery(q, ctx, metric, [{ sql: memberFlag(q, group), alias: 'tc_member' }], tableRef(q, ctx), `${where}\n    AND ${groupKnown(q, group)}`));
  } else {
    cols = measureColumns(q, ds, metric, plan, ctx);
    const median = isMoney(metric) ? medianColumn(q, plan) : null;
    if (median && ctx.rollup) throw new Error(`the median of ${metric.name} needs the rows, not a rollup`);
    if (median) cols.push(median);
    body = `SELECT ${memberFlag(q, group)} AS tc_member,
  ${cols.join(',\n  ')}
FROM ${tableRef(q, ctx)}
WHERE ${where}
  AND ${groupKnown(q, group)}
GROUP BY 1`;
  }
  const min = minGroupSize(ds);
  if (min !== null) {
    // A group below the minimum group size keeps its row, with every number withheld.
    return { name: 'groups', ...q.finish(suppressSmallCells({ inner: body, keys: ['tc_member'], columns: cols, sizeColumn: 'tc_rows', minimum: q.bind(min), orderBy: 'tc_member' })) };
  }
  return { name: 'groups', ...q.finish(`${body}\nORDER BY 1`) };
}

/**
 * A deterministic random sample of the per-row value, at most SAMPLE_PER_GROUP rows per group:
 * rows are ranked within their group by md5(key || seed), which DuckDB and PostgreSQL both have
 * (DuckDB's faster hash() is not portable). Null when the metric is not money or has no key column.
 */
export function compileSample(sq: SubQuestion, ctx: CompileContext): NamedQuery | null {
  const ds = ctx.dataset;
  const metric = primaryMetric(ds, sq);
  if (!isMoney(metric) || !ds.key_column) return null;
  const group = resolveGroup(ds, sq);
  const q = new QueryBuilder(ctx.dialect);
  const plan = planMeasure(q, ds, metric);
  // Compared per day (or per unit per day), the rows' median is not the figure compared.
  if (plan.kind !== 'mean' || !plan.x || comparisonShape(ds, metric, group).perDay) return null;
  const flag = memberFlag(q, group);
  const order = `md5(CAST(${q.ident(ds.key_column)} AS VARCHAR) || CAST(${q.bind(String(SAMPLE_SEED))} AS VARCHAR)), ${plan.x}`;
  const window = comparisonWindow(sq, group).window;
  const where = `${whereClause(q, ctx, window, sq.filters)}\n    AND ${throughUnitsCondition(q, ctx, sq, group, window)}`;
  const min = minGroupSize(ds);
  // Below the minimum group size a group's values are never sampled (the sample is of single rows).
  const groupRows = min === null ? '' : `,\n    COUNT(*) OVER (PARTITION BY ${flag}) AS tc_group_rows`;
  const big = min === null ? '' : `\n  AND tc_group_rows >= ${q.bind(min)}`;
  return {
    name: 'sample',
    ...q.finish(`SELECT tc_member, tc_x
FROM (
  SELECT ${flag} AS tc_member,
    ${q.dialect.toDouble(plan.x)} AS tc_x,
    ROW_NUMBER() OVER (PARTITION BY ${flag} ORDER BY ${order}) AS tc_draw${groupRows}
  FROM ${tableRef(q, ctx)}
  WHERE ${where}
    AND ${groupKnown(q, group)}
    AND (${plan.x}) IS NOT NULL
) tc_sample
WHERE tc_draw <= ${q.bind(SAMPLE_PER_GROUP)}${big}
ORDER BY tc_member, tc_draw`),
  };
}

export const performanceCompareTemplate: Template = {
  compile: (sq, ctx) => {
    const sample = compileSample(sq, ctx);
    const leftOut = compileUnitsLeftOut(sq, ctx, resolveGroup(ctx.dataset, sq), comparisonWindow(sq, resolveGroup(ctx.dataset, sq)).window);
    return [compileGroups(sq, ctx), ...(sample ? [sample] : []), ...(leftOut ? [leftOut] : [])];
  },
  read: (sq, tables, ctx) => {
    const ds = ctx.dataset;
    const metric = primaryMetric(ds, sq);
    const group = resolveGroup(ds, sq);
    const win = windowFinding(sq, group, ctx.coverage);
    const groups = tables.groups ?? EMPTY_TABLE;
    const minimum = minGroupSize(ds);
    const reading = readGroupComparison(metric, comparisonShape(ds, metric, group), groups, minimum, daysBetween(win.start, win.end));
    const leftOut = unitsLeftOutFinding(ds, group, tables.units_left_out);
    const findings: Finding[] = [win, ...reading.findings, ...(leftOut ? [leftOut] : [])];
    const sample = tables.sample;
    if (sample && !sample.truncated) {
      const median = readMedianBootstrap(metric, sample, groups);
      if (median) findings.push(median);
    }
    const caveats: Caveat[] = groupCaveats(
      [groups, ...(sample ? [sample] : [])],
      reading.sizes,
      group,
      win,
      minimum,
    );
    return { findings, caveats };
  },
};

/** Group estimates, the tested difference (or why there is none) and the verdict, from the per-group rows. */
export function readGroupComparison(
  metric: Metric,
  shape: Pick<MeasurePlan, 'kind' | 'quantity' | 'additive' | 'perDay' | 'perUnit'>,
  table: ResultTable,
  minimum: number | null = null,
  /** The calendar days compared, for a count compared per day. */
  days?: number,
): Reading & { sizes: { role: GroupRole; n: number; suppressed: boolean }[]; cells: Record<GroupRole, Cell> } {
  const rows = rowsByRole(table);
  const cells: Record<GroupRole, Cell> = { members: cellFromRow(rows.members, shape, days), others: cellFromRow(rows.others, shape, days) };
  // A group below the minimum group size arrives with its numbers withheld: too few to show, and nothing to compare.
  const hidden: Record<GroupRole, boolean> = { members: isSuppressed(rows.members), others: isSuppressed(rows.others) };
  const findings: Finding[] = (['members', 'others'] as const).map((role) => {
    const f = groupFinding(metric, shape, role, cells[role], rows[role]);
    return hidden[role] ? { ...f, suppressed: true } : f;
  });
  const sizes = (['members', 'others'] as const).map((role) => ({ role, n: cells[role].n, suppressed: hidden[role] }));
  if (hidden.members || hidden.others) {
    findings.push(
      suppressedComparison(metric.name, { members: cells.members.n, others: cells.others.n }, hidden, minimum, {
        first: cellEstimate(cells.members),
        second: cellEstimate(cells.others),
      }),
    );
    return { findings, caveats: [], sizes, cells };
  }
  const result = compareCells(cells.members, cells.others, CONFIDENCE);
  findings.push(differenceFinding(metric.name, 'members_vs_others', shape.kind, result, cells.members.n, cells.others.n));
  if (shape.kind !== 'total') {
    const good = goodDirection(metric, shape.quantity);
    const v = verdictOf(result, good, ALPHA);
    findings.push({
      type: 'performance_verdict',
      metric: metric.name,
      comparison: 'members_vs_others',
      ...v,
      alpha: ALPHA,
      higherIsBetter: good,
      relative: result.kind === 'test' ? result.relative : relativeOf(result.first, result.second),
    });
  }
  return { findings, caveats: [], sizes, cells };
}

export function groupFinding(
  metric: Metric,
  shape: Pick<MeasurePlan, 'kind' | 'quantity' | 'perUnit'>,
  role: GroupRole,
  cell: Cell,
  row: Record<string, CellValue> | undefined,
): PerformanceGroupFinding {
  const ci = cellInterval(cell, CONFIDENCE);
  return {
    type: 'performance_group',
    metric: metric.name,
    group: role,
    measure: shape.kind,
    quantity: shape.quantity,
    n: cell.n,
    estimate: cellEstimate(cell),
    low: ci ? ci[0] : null,
    high: ci ? ci[1] : null,
    confidence: CONFIDENCE,
    sd: cell.kind === 'mean' && cell.n >= 2 ? Math.sqrt(cell.m2 / (cell.n - 1)) : null,
    median: num(row?.tc_median),
    metricValue: num(row?.tc_value),
    ...(shape.perUnit ? { unit: shape.perUnit } : {}),
  };
}

export function differenceFinding(
  metric: string,
  comparison: 'members_vs_others' | 'others_after_vs_before' | 'members_after_vs_before',
  measure: Cell['kind'],
  result: TestedDifference | UntestedDifference,
  nFirst: number,
  nSecond: number,
): Finding {
  if (result.kind === 'none') {
    return { type: 'performance_no_test', metric, comparison, reason: result.reason, first: result.first, second: result.second, nFirst, nSecond };
  }
  return {
    type: 'performance_difference',
    metric,
    comparison,
    measure,
    test: result.test,
    first: result.first,
    second: result.second,
    difference: result.difference,
    relative: result.relative,
    ci: result.ci,
    confidence: result.confidence,
    statistic: result.statistic,
    df: result.df,
    pValue: result.pValue,
    effectSize: result.effectSize,
    nFirst,
    nSecond,
  };
}

function relativeOf(first: number | null, second: number | null): number | null {
  return first === null || second === null || second === 0 ? null : (first - second) / second;
}

function readMedianBootstrap(metric: Metric, sample: ResultTable, groups: ResultTable): Finding | null {
  const values: Record<GroupRole, number[]> = { members: [], others: [] };
  for (const r of sample.rows) {
    const role = roleOf(r.tc_member);
    const x = num(r.tc_x);
    if (role && x !== null) values[role].push(x);
  }
  const boot = bootstrapMedianDifference(values.members, values.others, {
    seed: SAMPLE_SEED,
    resamples: BOOTSTRAP_RESAMPLES,
    confidence: CONFIDENCE,
    maxSampleSize: SAMPLE_PER_GROUP,
  });
  if (!boot) return null;
  const rows = rowsByRole(groups);
  const medianMembers = num(rows.members?.tc_median);
  const medianOthers = num(rows.others?.tc_median);
  if (medianMembers === null || medianOthers === null) return null;
  // Medians over all rows come from SQL; the bounded sample only supplies the interval.
  return {
    type: 'performance_median_difference',
    metric: metric.name,
    medianMembers,
    medianOthers,
    difference: medianMembers - medianOthers,
    ci: boot.ci,
    confidence: boot.confidence,
    resamples: boot.resamples,
    seed: boot.seed,
    sampleMembers: boot.nA,
    sampleOthers: boot.nB,
  };
}
