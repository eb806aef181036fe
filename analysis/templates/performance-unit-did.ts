// The per-customer before/after of performance_before_after: "are pass holders travelling more
// since launch?" asks whether the same people travel more, so the units are customers (the group's
// unit_column), never bookings. Over equal windows of whole months either side of the launch:
// - a customer is a member when any of their rows after the launch carries the group's flag (a
//   pass is bought at or after the launch, so a row-level flag is false before it for everyone);
// - the customers compared are those with a row both before and after the launch: they were
//   customers throughout, so their months without a row count as 0. Customers seen on one side
//   only entered or left within the windows; a row-only dataset cannot tell whether they existed
//   on the other side, so they are left out and counted (said in the caption);
// - each customer's metric per month on each side, averaged per group; the difference in
//   differences is (members' change) − (others' change), stated also relative to the members'
//   counterfactual (their before plus the others' change), with percentile-bootstrap intervals
//   resampling customers within each group.
// SQL returns a tally (group, before, after, customers): the same numbers as one row per customer,
// without sending millions of rows.
import type { ComparisonGroup, DatasetConfig, Metric } from '../../config/schema.js';
import { isAdditive, namedUnitDimension } from '../catalog.js';
import { type CompileContext, localDateExpr, tableRef, whereClause } from '../compile-context.js';
import type { Coverage } from '../coverage.js';
import { dataEnd } from '../coverage.js';
import type { GroupRole, PerformancePeriodsFinding, PerformanceUnitDidFinding, UnitPanelGroup } from '../findings/performance.js';
import { periodsBetween } from '../periods.js';
import { metricAggregate } from '../sql/metric-sql.js';
import { QueryBuilder } from '../sql/query-builder.js';
import { mulberry32 } from '../stats/random.js';
import type { Caveat, DateWindow, Finding, NamedQuery, PeriodPoint, ResultTable, SubQuestion } from '../types.js';
import { CONFIDENCE, EMPTY_TABLE, groupKnown, memberFlag, roleOf } from './performance-common.js';
import { num } from './performance-measure.js';
import { minGroupSize } from './small-groups.js';

/** Bootstrap resamples and seed: the same data always gives the same interval. */
export const UNIT_DID_RESAMPLES = 1000;
export const UNIT_DID_SEED = 20230401;

/** The launch a before/after turns on: the request's date, else the group's. */
export function launchOf(sq: SubQuestion, group: ComparisonGroup): string | null {
  return sq.launchDate ?? group.launch_date ?? null;
}

/** The asked window clipped to the data (exclusive end). */
export function effectiveWindow(sq: SubQuestion, coverage: Coverage | undefined): DateWindow {
  const start = coverage?.firstDate && coverage.firstDate > sq.window.start ? coverage.firstDate : sq.window.start;
  const lastEnd = coverage?.lastDate ? dataEnd({ ...coverage, lastDate: coverage.lastDate }) : sq.window.end;
  const end = lastEnd < sq.window.end ? lastEnd : sq.window.end;
  return { start, end: end < start ? start : end };
}

/**
 * Whether a before/after is asked per customer: the group names its customers (a unit_column
 * that is no dimension: sites and shops are compared per unit-day instead), it has a launch, and
 * the metric adds up per customer (a sum or a count; an average per customer is another question).
 */
export function unitDidApplies(ds: DatasetConfig, sq: SubQuestion, group: ComparisonGroup, metric: Metric): boolean {
  return !!group.unit_column && !namedUnitDimension(ds, group) && !!launchOf(sq, group) && isAdditive(metric);
}

/** The tally of customers by group and side, and the panel's monthly totals per group. */
export function compileUnitDid(sq: SubQuestion, ctx: CompileContext, group: ComparisonGroup, metric: Metric, periods: PerformancePeriodsFinding): NamedQuery[] {
  const unitsCte = (q: QueryBuilder) => {
    const day = localDateExpr(q, ctx);
    const launch = q.bind(periods.launchDate);
    const after = `${day} >= CAST(${launch} AS DATE)`;
    const before = `${day} < CAST(${launch} AS DATE)`;
    const d = q.dialect;
    return `tc_units AS (
  SELECT ${q.ident(group.unit_column!)} AS tc_unit,
    COALESCE(BOOL_OR(${memberFlag(q, group)}) FILTER (WHERE ${after}), BOOL_OR(${memberFlag(q, group)})) AS tc_member,
    COUNT(*) FILTER (WHERE ${before}) AS tc_rows_before,
    COUNT(*) FILTER (WHERE ${after}) AS tc_rows_after,
    ${d.toDouble(`COALESCE(${metricAggregate(q, ctx.dataset, metric, before)}, 0)`)} AS tc_before_v,
    ${d.toDouble(`COALESCE(${metricAggregate(q, ctx.dataset, metric, after)}, 0)`)} AS tc_after_v
  FROM ${tableRef(q, ctx)}
  WHERE ${whereClause(q, ctx, { start: periods.before.start, end: periods.after.end }, sq.filters)}
    AND ${q.ident(group.unit_column!)} IS NOT NULL
    AND ${groupKnown(q, group)}
  GROUP BY 1
)`;
  };
  const min = minGroupSize(ctx.dataset);
  // The tally: compared customers by their two totals; the others by group and side only.
  const t = new QueryBuilder(ctx.dialect);
  const both = '(tc_rows_before > 0 AND tc_rows_after > 0)';
  const status = `CASE WHEN ${both} THEN 'both' WHEN tc_rows_after > 0 THEN 'after_only' ELSE 'before_only' END`;
  const tallyBody = `WITH ${unitsCte(t)},
tc_tally AS (
  SELECT tc_member, ${status} AS tc_status,
    CASE WHEN ${both} THEN tc_before_v END AS tc_before,
    CASE WHEN ${both} THEN tc_after_v END AS tc_after,
    ${t.dialect.toDouble('COUNT(*)')} AS tc_k
  FROM tc_units
  GROUP BY 1, 2, 3, 4
)
SELECT tc_member, tc_status, tc_before, tc_after, tc_k,
  ${t.dialect.toDouble("SUM(CASE WHEN tc_status = 'both' THEN tc_k ELSE 0 END) OVER (PARTITION BY tc_member)")} AS tc_panel
FROM tc_tally`;
  // A group whose compared customers are fewer than the minimum group size keeps only its counts.
  const tally =
    min === null
      ? `${tallyBody}\nORDER BY 1, 2, 3, 4`
      : `SELECT tc_member, tc_status,
  CASE WHEN tc_panel >= ${t.bind(min)} THEN tc_before END AS tc_before,
  CASE WHEN tc_panel >= ${t.bind(min)} THEN tc_after END AS tc_after,
  ${t.dialect.toDouble('SUM(tc_k)')} AS tc_k, MAX(tc_panel) AS tc_panel
FROM (${tallyBody}) tc_raw
GROUP BY 1, 2, 3, 4
ORDER BY 1, 2, 3, 4`;
  // The compared customers' total per month and group, for the chart (a month with none is 0).
  const s = new QueryBuilder(ctx.dialect);
  const month = ctx.dialect.periodStart('month', localDateExpr(s, ctx));
  const panelMin = min === null ? '' : `\n  AND tc_panel.tc_member IN (SELECT tc_member FROM tc_panel GROUP BY tc_member HAVING COUNT(*) >= ${s.bind(min)})`;
  const series = `WITH ${unitsCte(s)},
tc_panel AS (
  SELECT tc_unit, tc_member FROM tc_units WHERE ${both}
)
SELECT ${month} AS period, tc_panel.tc_member AS tc_member,
  ${s.dialect.toDouble(metricAggregate(s, ctx.dataset, metric))} AS tc_value
FROM ${tableRef(s, ctx)} AS tc_base
JOIN tc_panel ON tc_base.${s.ident(group.unit_column!)} = tc_panel.tc_unit
WHERE ${whereClause(s, ctx, { start: periods.before.start, end: periods.after.end }, sq.filters)}
  AND ${groupKnown(s, group)}${panelMin}
GROUP BY 1, 2
ORDER BY 1, 2`;
  return [
    { name: 'unit_tally', ...t.finish(tally) },
    { name: 'unit_series', ...s.finish(series) },
  ];
}

/** A group's compared customers as tally cells: their before and after totals and how many share them. */
type TallyCell = { before: number; after: number; k: number };

/** Reads the tally and the monthly totals into the per-customer findings. */
export function readUnitDid(
  sq: SubQuestion,
  ds: DatasetConfig,
  group: ComparisonGroup,
  metric: Metric,
  periods: PerformancePeriodsFinding,
  tables: Record<string, ResultTable>,
): { findings: Finding[]; caveats: Caveat[] } {
  const tally = tables.unit_tally ?? EMPTY_TABLE;
  const seriesTable = tables.unit_series ?? EMPTY_TABLE;
  const months = periods.months;
  const cells: Record<GroupRole, TallyCell[]> = { members: [], others: [] };
  const counts: Record<GroupRole, { panel: number; entered: number; left: number; hidden: boolean }> = {
    members: { panel: 0, entered: 0, left: 0, hidden: false },
    others: { panel: 0, entered: 0, left: 0, hidden: false },
  };
  for (const r of tally.rows) {
    const role = roleOf(r.tc_member);
    if (!role) continue;
    const k = num(r.tc_k) ?? 0;
    if (r.tc_status === 'after_only') counts[role].entered += k;
    else if (r.tc_status === 'before_only') counts[role].left += k;
    else if (r.tc_status === 'both') {
      counts[role].panel += k;
      const before = num(r.tc_before);
      const after = num(r.tc_after);
      if (before === null || after === null) counts[role].hidden = true;
      else cells[role].push({ before: before / months, after: after / months, k });
    }
  }
  const minimum = minGroupSize(ds);
  const groups = {} as Record<GroupRole, UnitPanelGroup>;
  for (const role of ['members', 'others'] as const) {
    const c = counts[role];
    const m = c.hidden ? null : meansOf(cells[role]);
    groups[role] = {
      panel: c.panel,
      enteredAfter: c.entered,
      leftBefore: c.left,
      before: m?.before ?? null,
      after: m?.after ?? null,
      ...(c.hidden ? { suppressed: true } : {}),
    };
  }
  const est = didOf(cells.members, cells.others);
  const boot = est ? bootstrapDid(cells.members, cells.others, { resamples: UNIT_DID_RESAMPLES, seed: UNIT_DID_SEED, confidence: CONFIDENCE }) : null;
  // The unit column names the unit; captions call it by its distinct count's label ("customer").
  const noun = group.unit_column!;
  const did: PerformanceUnitDidFinding = {
    type: 'performance_unit_did',
    metric: metric.name,
    unit: noun,
    months,
    groups,
    estimate: est?.estimate ?? null,
    ci: boot?.ci ?? null,
    relative: est?.relative ?? null,
    relativeCi: boot?.relativeCi ?? null,
    confidence: CONFIDENCE,
    resamples: UNIT_DID_RESAMPLES,
    seed: UNIT_DID_SEED,
  };
  // Each group's compared customers' mean per month, month by month (a month without a row is 0).
  const monthStarts = periodsBetween(periods.before.start, periods.after.end, 'month');
  const totals = new Map<string, number>();
  for (const r of seriesTable.rows) {
    const role = roleOf(r.tc_member);
    if (role && typeof r.period === 'string') totals.set(`${role}|${r.period.slice(0, 10)}`, num(r.tc_value) ?? 0);
  }
  const findings: Finding[] = [periods, did];
  for (const role of ['members', 'others'] as const) {
    const g = groups[role];
    const points: PeriodPoint[] = monthStarts.map((p) => ({
      period: p,
      value: g.panel > 0 && !g.suppressed ? (totals.get(`${role}|${p}`) ?? 0) / g.panel : null,
      partial: false,
    }));
    findings.push({ type: 'performance_group_series', metric: metric.name, group: role, grain: 'month', quantity: 'per_unit_month', unit: noun, points });
  }
  const caveats: Caveat[] = [];
  if (tally.truncated) caveats.push({ code: 'truncated', data: { rows: tally.rows.length } });
  const hidden = (['members', 'others'] as const).filter((r) => groups[r].suppressed);
  if (hidden.length > 0 && minimum !== null) {
    caveats.push({ code: 'suppressed_small_groups', data: { groups: hidden.map((r) => (r === 'members' ? group.members_label : group.others_label)).join(' and '), minimum } });
  }
  caveats.push({ code: 'observational', data: { group: group.name } });
  for (const role of ['members', 'others'] as const) {
    const n = groups[role].panel;
    if (n > 0 && n < 30 && !groups[role].suppressed) caveats.push({ code: 'small_sample', data: { n, group: role, label: role === 'members' ? group.members_label : group.others_label, threshold: 30 } });
  }
  return { findings, caveats };
}

function meansOf(cells: readonly TallyCell[]): { before: number; after: number; n: number } | null {
  let n = 0;
  let b = 0;
  let a = 0;
  for (const c of cells) {
    n += c.k;
    b += c.k * c.before;
    a += c.k * c.after;
  }
  return n > 0 ? { before: b / n, after: a / n, n } : null;
}

/**
 * The difference in differences of two groups of units: (members' mean after − before) − (others'
 * mean after − before), and that relative to the members' counterfactual after (their before plus
 * the others' change); null when a group has no unit, relative null when the counterfactual is not
 * above 0.
 */
export function didOf(members: readonly TallyCell[], others: readonly TallyCell[]): { estimate: number; relative: number | null } | null {
  const m = meansOf(members);
  const o = meansOf(others);
  if (!m || !o) return null;
  const estimate = m.after - m.before - (o.after - o.before);
  const counterfactual = m.before + (o.after - o.before);
  return { estimate, relative: counterfactual > 0 ? estimate / counterfactual : null };
}

/**
 * Percentile-bootstrap intervals of didOf: each resample draws as many units as each group has,
 * with replacement, within the group (a unit's before and after stay together). Draws come from a
 * seeded generator through an alias table over the tally's cells, so a resample costs one draw per
 * unit whatever the number of distinct cells.
 */
export function bootstrapDid(
  members: readonly TallyCell[],
  others: readonly TallyCell[],
  opts: { resamples: number; seed: number; confidence: number },
): { ci: [number, number]; relativeCi: [number, number] | null } | null {
  const next = mulberry32(opts.seed);
  const am = aliasTable(members);
  const ao = aliasTable(others);
  if (!am || !ao) return null;
  const est = new Float64Array(opts.resamples);
  const rel: number[] = [];
  for (let r = 0; r < opts.resamples; r++) {
    const m = resampleMeans(members, am, next);
    const o = resampleMeans(others, ao, next);
    est[r] = m.after - m.before - (o.after - o.before);
    const cf = m.before + (o.after - o.before);
    rel.push(cf > 0 ? est[r]! / cf : NaN);
  }
  const tail = (1 - opts.confidence) / 2;
  est.sort();
  const relFinite = Float64Array.from(rel.filter(Number.isFinite)).sort();
  return {
    ci: [quantile(est, tail), quantile(est, 1 - tail)],
    // Relative only when every resample had a counterfactual above 0.
    relativeCi: relFinite.length === opts.resamples ? [quantile(relFinite, tail), quantile(relFinite, 1 - tail)] : null,
  };
}

/** Linear interpolation between order statistics (the "type 7" rule). */
function quantile(sorted: Float64Array, p: number): number {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.ceil(h);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}

type Alias = { n: number; prob: Float64Array; alias: Int32Array };

/** Walker's alias table over the cells weighted by their unit counts; null without units. */
function aliasTable(cells: readonly TallyCell[]): Alias | null {
  const total = cells.reduce((s, c) => s + c.k, 0);
  const m = cells.length;
  if (total <= 0 || m === 0) return null;
  const prob = new Float64Array(m);
  const alias = new Int32Array(m);
  const scaled = cells.map((c) => (c.k * m) / total);
  const small: number[] = [];
  const large: number[] = [];
  scaled.forEach((p, i) => (p < 1 ? small : large).push(i));
  while (small.length > 0 && large.length > 0) {
    const s = small.pop()!;
    const l = large.pop()!;
    prob[s] = scaled[s]!;
    alias[s] = l;
    scaled[l] = scaled[l]! + scaled[s]! - 1;
    (scaled[l]! < 1 ? small : large).push(l);
  }
  for (const i of [...small, ...large]) {
    prob[i] = 1;
    alias[i] = i;
  }
  return { n: Math.round(total), prob, alias };
}

function resampleMeans(cells: readonly TallyCell[], a: Alias, next: () => number): { before: number; after: number } {
  const m = cells.length;
  let b = 0;
  let af = 0;
  for (let i = 0; i < a.n; i++) {
    const u = next() * m;
    const j = Math.floor(u);
    const pick = u - j < a.prob[j]! ? j : a.alias[j]!;
    b += cells[pick]!.before;
    af += cells[pick]!.after;
  }
  return { before: b / a.n, after: af / a.n };
}
