// Template "performance_frequency" (performance × distribution): how often each unit (customer)
// books, members vs others. SQL aggregates per unit and then summarises per group (mean, spread,
// median, p90, frequency buckets); Welch's t-test compares the means per unit, with their ratio.
import type { Metric } from '../../config/schema.js';
import { isCountMetric, metricDirection } from '../catalog.js';
import { type CompileContext, tableRef, whereClause } from '../compile-context.js';
import type { GroupRole, PerformanceFrequencyGroupFinding } from '../findings/performance.js';
import { metricAggregate } from '../sql/metric-sql.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { CellValue, Finding, NamedQuery, SubQuestion } from '../types.js';
import { differenceFinding, primaryMetric } from './performance-compare.js';
import {
  ALPHA,
  CONFIDENCE,
  comparisonWindow,
  EMPTY_TABLE,
  groupCaveats,
  isSuppressed,
  resolveGroup,
  rowsByRole,
  suppressedComparison,
  windowFinding,
} from './performance-common.js';
import { num } from './performance-measure.js';
import { cellInterval, compareCells, type MeanCell, ratioOfMeansInterval, verdictOf } from './performance-stats.js';
import { minGroupSize, suppressSmallCells } from './small-groups.js';
import type { Template } from './template.js';

/** Frequency buckets of a count per unit: exactly 1, 2 to 5, 6 or more. */
export const FREQUENCY_BUCKETS: { min: number; max: number | null }[] = [
  { min: 1, max: 1 },
  { min: 2, max: 5 },
  { min: 6, max: null },
];

/** Per-unit value: the metric per unit (bookings per customer); a count metric also gets buckets. */
export function compileFrequency(sq: SubQuestion, ctx: CompileContext): NamedQuery {
  const ds = ctx.dataset;
  const metric = primaryMetric(ds, sq);
  const group = resolveGroup(ds, sq);
  if (!group.unit_column) throw new Error(`comparison group ${group.name} has no unit_column, so there is no unit to count per`);
  const q = new QueryBuilder(ctx.dialect);
  const unit = q.ident(group.unit_column);
  const where = whereClause(q, ctx, comparisonWindow(sq, group).window, sq.filters);
  // A unit is a member when any of its rows in the window carries the group flag.
  const units = `WITH tc_units AS (
  SELECT ${unit} AS tc_unit,
    MAX(CASE WHEN ${q.ident(group.column)} THEN 1 ELSE 0 END) AS tc_flag,
    ${metricAggregate(q, ds, metric)} AS tc_value
  FROM ${tableRef(q, ctx)}
  WHERE ${where}
    AND ${unit} IS NOT NULL
  GROUP BY ${unit}
)`;
  const { summary, body } = isCountMetric(metric) ? countSummary(q, units) : valueSummary(q, units);
  const min = minGroupSize(ds);
  if (min !== null) {
    // A group of fewer units (customers) than the minimum group size keeps its row, every number withheld.
    const wrapped = suppressSmallCells({ inner: body, keys: ['tc_member'], columns: summary, sizeColumn: 'tc_n', minimum: q.bind(min), orderBy: 'tc_member' });
    return { name: 'frequency', ...q.finish(wrapped) };
  }
  return { name: 'frequency', ...q.finish(`${body}\nORDER BY 1`) };
}

/** Any per-unit value: the summaries straight from the units (medians sort every unit's value). */
function valueSummary(q: QueryBuilder, units: string): { summary: string[]; body: string } {
  const d = q.dialect;
  const summary = [
    `${d.toDouble('COUNT(tc_value)')} AS tc_n`,
    `${d.toDouble('AVG(tc_value)')} AS tc_mean`,
    `${d.toDouble('var_samp(tc_value)')} AS tc_var`,
    `${d.toDouble('percentile_cont(0.5) WITHIN GROUP (ORDER BY tc_value)')} AS tc_median`,
    `${d.toDouble('percentile_cont(0.9) WITHIN GROUP (ORDER BY tc_value)')} AS tc_p90`,
    `${d.toDouble('SUM(tc_value)')} AS tc_total`,
  ];
  return {
    summary,
    body: `${units}
SELECT (tc_flag = 1) AS tc_member,
  ${summary.join(',\n  ')}
FROM tc_units
GROUP BY 1`,
  };
}

/**
 * A count per unit (bookings per customer) is a whole number with few distinct values, so the
 * units are first tallied into a frequency table (value, how many units have it) and every
 * summary is read from that: the same numbers as from the units themselves (the median and p90
 * by percentile_cont's own rule, linear between the two nearest ranks), without sorting or
 * holding millions of per-unit values. All sums are of whole numbers below 2^53, so exact.
 */
function countSummary(q: QueryBuilder, units: string): { summary: string[]; body: string } {
  const d = q.dialect;
  /** The value at 0-based rank `h` of the group's sorted units, linear between the two nearest ranks. */
  const quantile = (h: string) => {
    const at = (rank: string) => `MIN(c.tc_value) FILTER (WHERE c.tc_cum > ${rank})`;
    return `${at(`FLOOR(${h})`)} + (${h} - FLOOR(${h})) * (${at(`CEIL(${h})`)} - ${at(`FLOOR(${h})`)})`;
  };
  const buckets = FREQUENCY_BUCKETS.map((b, i) => {
    const lo = `c.tc_value >= ${q.bind(b.min)}`;
    const cond = b.max === null ? lo : `${lo} AND c.tc_value <= ${q.bind(b.max)}`;
    return `${d.toDouble(`COALESCE(SUM(c.tc_k) FILTER (WHERE ${cond}), 0)`)} AS tc_bucket_${i}`;
  });
  const summary = [
    `${d.toDouble('g.tc_n')} AS tc_n`,
    `${d.toDouble('g.tc_mean')} AS tc_mean`,
    `${d.toDouble('CASE WHEN g.tc_n > 1 THEN SUM(c.tc_k * (c.tc_value - g.tc_mean) * (c.tc_value - g.tc_mean)) / (g.tc_n - 1) END')} AS tc_var`,
    `${d.toDouble(quantile('(g.tc_n - 1) * 0.5'))} AS tc_median`,
    `${d.toDouble(quantile('(g.tc_n - 1) * 0.9'))} AS tc_p90`,
    `${d.toDouble('SUM(c.tc_k * c.tc_value)')} AS tc_total`,
    ...buckets,
  ];
  return {
    summary,
    body: `${units},
tc_tally AS (
  SELECT tc_flag, tc_value, ${d.toDouble('COUNT(*)')} AS tc_k
  FROM tc_units
  WHERE tc_value IS NOT NULL
  GROUP BY 1, 2
),
tc_cumulative AS (
  SELECT tc_flag, tc_value, tc_k,
    SUM(tc_k) OVER (PARTITION BY tc_flag ORDER BY tc_value ROWS BETWEEN UNBOUNDED PRECEDING AND CURRENT ROW) AS tc_cum
  FROM tc_tally
),
tc_groups AS (
  SELECT tc_flag, SUM(tc_k) AS tc_n, SUM(tc_k * tc_value) / SUM(tc_k) AS tc_mean
  FROM tc_tally
  GROUP BY 1
)
SELECT (g.tc_flag = 1) AS tc_member,
  ${summary.join(',\n  ')}
FROM tc_cumulative c
JOIN tc_groups g ON g.tc_flag = c.tc_flag
GROUP BY g.tc_flag, g.tc_n, g.tc_mean`,
  };
}

export const performanceFrequencyTemplate: Template = {
  compile: (sq, ctx) => [compileFrequency(sq, ctx)],
  read: (sq, tables, ctx) => {
    const ds = ctx.dataset;
    const metric = primaryMetric(ds, sq);
    const group = resolveGroup(ds, sq);
    const win = windowFinding(sq, group, ctx.coverage);
    const table = tables.frequency ?? EMPTY_TABLE;
    const rows = rowsByRole(table);
    const cells: Record<GroupRole, MeanCell> = { members: cellOf(rows.members), others: cellOf(rows.others) };
    const findings: Finding[] = [win];
    for (const role of ['members', 'others'] as const) {
      const g = groupFinding(metric, role, cells[role], rows[role]);
      if (g) findings.push(g);
    }
    const minimum = minGroupSize(ds);
    const hidden: Record<GroupRole, boolean> = { members: isSuppressed(rows.members), others: isSuppressed(rows.others) };
    const sizesOf = () => (['members', 'others'] as const).map((role) => ({ role, n: cells[role].n, suppressed: hidden[role] }));
    if (hidden.members || hidden.others) {
      // Too few units to show: no test, no verdict, no ratio.
      findings.push(suppressedComparison(metric.name, { members: cells.members.n, others: cells.others.n }, hidden, minimum));
      return { findings, caveats: groupCaveats([table], sizesOf(), group, win, minimum) };
    }
    const result = compareCells(cells.members, cells.others, CONFIDENCE);
    findings.push(differenceFinding(metric.name, 'members_vs_others', 'mean', result, cells.members.n, cells.others.n));
    const v = verdictOf(result, metricDirection(metric), ALPHA);
    const ratio = cells.others.n > 0 && cells.members.n > 0 && cells.others.mean !== 0 ? cells.members.mean / cells.others.mean : null;
    findings.push({
      type: 'performance_verdict',
      metric: metric.name,
      comparison: 'members_vs_others',
      ...v,
      alpha: ALPHA,
      higherIsBetter: metricDirection(metric),
      relative: ratio === null ? null : ratio - 1,
    });
    if (ratio !== null) {
      const se = (c: MeanCell) => (c.n >= 2 ? Math.sqrt(c.m2 / (c.n - 1) / c.n) : NaN);
      const ci = ratioOfMeansInterval(cells.members.mean, se(cells.members), cells.others.mean, se(cells.others), CONFIDENCE);
      findings.push({ type: 'performance_frequency_ratio', metric: metric.name, ratio, low: ci?.[0] ?? null, high: ci?.[1] ?? null, confidence: CONFIDENCE });
    }
    return { findings, caveats: groupCaveats([table], sizesOf(), group, win, minimum) };
  },
};

function cellOf(row: Record<string, CellValue> | undefined): MeanCell {
  const n = num(row?.tc_n) ?? 0;
  return { kind: 'mean', n, mean: num(row?.tc_mean) ?? 0, m2: (num(row?.tc_var) ?? 0) * Math.max(0, n - 1) };
}

function groupFinding(
  metric: Metric,
  role: GroupRole,
  cell: MeanCell,
  row: Record<string, CellValue> | undefined,
): PerformanceFrequencyGroupFinding | null {
  if (cell.n <= 0) return null;
  const ci = cellInterval(cell, CONFIDENCE);
  const buckets = isCountMetric(metric)
    ? FREQUENCY_BUCKETS.map((b, i) => {
        const units = num(row?.[`tc_bucket_${i}`]) ?? 0;
        return { min: b.min, max: b.max, units, share: units / cell.n };
      })
    : [];
  return {
    type: 'performance_frequency_group',
    metric: metric.name,
    group: role,
    units: cell.n,
    total: num(row?.tc_total) ?? 0,
    mean: cell.mean,
    sd: cell.n >= 2 ? Math.sqrt(cell.m2 / (cell.n - 1)) : null,
    low: ci?.[0] ?? null,
    high: ci?.[1] ?? null,
    confidence: CONFIDENCE,
    median: num(row?.tc_median),
    p90: num(row?.tc_p90),
    buckets,
  };
}
