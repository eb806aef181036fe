// Shared pieces of the performance templates: the comparison group, the window they compare
// over, the group flag in SQL, and the caveats every group comparison carries.
import type { ComparisonGroup, DatasetConfig, Dimension } from '../../config/schema.js';
import { CatalogError, comparisonGroupByName, namedUnitDimension } from '../catalog.js';
import { type CompileContext, dateRange, localDateExpr, tableRef, whereClause } from '../compile-context.js';
import type { Coverage } from '../coverage.js';
import { dataEnd } from '../coverage.js';
import type { GroupRole, PerformanceNoTestFinding, PerformanceUnitsLeftOutFinding, PerformanceWindowFinding } from '../findings/performance.js';
import { addDays } from '../periods.js';
import { lifeColumnsSql, presenceToleranceDays, silentBeyondChanceSql } from '../presence.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { Caveat, CellValue, DateWindow, NamedQuery, ResultTable, SubQuestion } from '../types.js';
import { suppressedGroupsCaveat } from './small-groups.js';

/**
 * The finding for a members-vs-others comparison not tested because a side is below the minimum
 * group size: which side, the minimum, the sizes, and the estimates when they may be shown.
 */
export function suppressedComparison(
  metric: string,
  n: Record<GroupRole, number>,
  hidden: Record<GroupRole, boolean>,
  minimum: number | null,
  estimates: { first: number | null; second: number | null } = { first: null, second: null },
): PerformanceNoTestFinding {
  return {
    type: 'performance_no_test',
    metric,
    comparison: 'members_vs_others',
    reason: 'suppressed',
    ...estimates,
    nFirst: n.members,
    nSecond: n.others,
    suppressedFirst: hidden.members,
    suppressedSecond: hidden.others,
    ...(minimum !== null ? { minimum } : {}),
  };
}

/** Two-sided level of every interval the family reports. */
export const CONFIDENCE = 0.95;
/** Significance level of the verdict. */
export const ALPHA = 0.05;
/** Below this many rows (or units) in a group, results carry a small-sample caveat (common practice: 30). */
export const SMALL_SAMPLE = 30;

export const EMPTY_TABLE: ResultTable = { columns: [], rows: [], truncated: false };

/** The sub-question's comparison group, or the dataset's only one when none is named. */
export function resolveGroup(ds: DatasetConfig, sq: SubQuestion): ComparisonGroup {
  if (sq.comparisonGroup) return comparisonGroupByName(ds, sq.comparisonGroup);
  if (ds.comparison_groups.length === 1) return ds.comparison_groups[0]!;
  throw new CatalogError('unknown_group', '', `a performance question needs a comparison group; dataset ${ds.name} has ${ds.comparison_groups.length}`);
}

/**
 * The window a group comparison runs over: from the launch date when the asked window starts
 * before it (before launch there are no members, and mixing eras would confound the comparison).
 */
export function comparisonWindow(sq: SubQuestion, group: ComparisonGroup): { window: DateWindow; clippedToLaunch: boolean } {
  const launch = group.launch_date;
  if (launch && launch > sq.window.start && launch < sq.window.end) return { window: { start: launch, end: sq.window.end }, clippedToLaunch: true };
  return { window: { ...sq.window }, clippedToLaunch: false };
}

/** The comparison window further clipped to the data's coverage, for stating what was compared. */
export function windowFinding(sq: SubQuestion, group: ComparisonGroup, coverage: Coverage): PerformanceWindowFinding {
  const { window, clippedToLaunch } = comparisonWindow(sq, group);
  let { start, end } = window;
  if (coverage.firstDate && coverage.firstDate > start) start = coverage.firstDate;
  if (coverage.lastDate && dataEnd({ ...coverage, lastDate: coverage.lastDate }) < end) end = dataEnd({ ...coverage, lastDate: coverage.lastDate });
  if (start > end) start = end;
  return { type: 'performance_window', group: group.name, start, end, launchDate: group.launch_date ?? null, clippedToLaunch };
}

/** TRUE for members, FALSE for others: the flag itself, since rows with a missing flag are left out by `groupKnown`. */
export function memberFlag(q: QueryBuilder, group: ComparisonGroup): string {
  return q.ident(group.column);
}

export function groupKnown(q: QueryBuilder, group: ComparisonGroup): string {
  return `${q.ident(group.column)} IS NOT NULL`;
}

export function roleOf(v: CellValue | undefined): GroupRole | null {
  return v === true ? 'members' : v === false ? 'others' : null;
}

/** Splits summary rows keyed by tc_member into the two groups. */
export function rowsByRole(table: ResultTable): Record<GroupRole, Record<string, CellValue> | undefined> {
  const out: Record<GroupRole, Record<string, CellValue> | undefined> = { members: undefined, others: undefined };
  for (const r of table.rows) {
    const role = roleOf(r.tc_member);
    if (role) out[role] = r;
  }
  return out;
}

/** A summary row whose numbers the database withheld: the cell is below the minimum group size. */
export function isSuppressed(row: Record<string, CellValue> | undefined): boolean {
  return row?.tc_suppressed === true;
}

/** The label of a group's side: "Pass holders", "Other customers". */
export function roleLabel(group: ComparisonGroup, role: GroupRole): string {
  return role === 'members' ? group.members_label : group.others_label;
}

/**
 * Caveats every group comparison carries: truncation, the observational caution, and small groups.
 * A group below the minimum group size (`suppressed`) gets the "too few to show" caveat instead.
 */
export function groupCaveats(
  tables: ResultTable[],
  sizes: { role: GroupRole; n: number; suppressed?: boolean }[],
  group: ComparisonGroup,
  window: DateWindow,
  minimum: number | null = null,
): Caveat[] {
  const caveats: Caveat[] = [];
  for (const t of tables) if (t.truncated) caveats.push({ code: 'truncated', data: { rows: t.rows.length } });
  if (sizes.every((s) => s.n === 0 && !s.suppressed)) caveats.push({ code: 'no_data', data: { start: window.start, end: window.end } });
  const hidden = sizes.filter((s) => s.suppressed);
  if (hidden.length > 0 && minimum !== null) caveats.push(suppressedGroupsCaveat(hidden.map((s) => roleLabel(group, s.role)), minimum));
  caveats.push({ code: 'observational', data: { group: group.name } });
  for (const s of sizes) {
    // An empty group is stated by its own finding (performance_no_test, empty_group), not as a small sample.
    if (s.n > 0 && s.n < SMALL_SAMPLE) {
      caveats.push({ code: 'small_sample', data: { n: s.n, group: s.role, label: s.role === 'members' ? group.members_label : group.others_label, threshold: SMALL_SAMPLE } });
    }
  }
  return caveats;
}

// ---- units that enter or leave during the window ------------------------------------------------
// A group of named units (sites, stores) changes its make-up when one opens or closes inside the
// window: a site that opens late adds its visits to one side of the comparison only, which reads as
// an effect. Such units are left out of both groups and named. A unit key that is no dimension
// (a customer id) comes and goes as a matter of course and is not treated so.

/**
 * Each unit's first and last day in the window, against the window's own first and last day with
 * data; it is there throughout unless silent at an edge beyond chance for its own rhythm (the rule
 * of growth's like-for-like, analysis/presence.ts).
 */
function unitLives(q: QueryBuilder, ctx: CompileContext, sq: SubQuestion, group: ComparisonGroup, unit: Dimension, window: DateWindow): string {
  const day = localDateExpr(q, ctx);
  const col = q.ident(unit.column);
  const tolerance = `CAST(${q.bind(presenceToleranceDays(window))} AS INTEGER)`;
  const life = { first: 'tc_first', last: 'tc_last', activeMonths: 'tc_active_months' };
  const lived = { first: `tc_life.${life.first}`, last: `tc_life.${life.last}`, activeMonths: `tc_life.${life.activeMonths}` };
  return `SELECT tc_life.tc_unit, tc_life.tc_member, tc_life.tc_first, tc_life.tc_last,
    NOT (COALESCE(${silentBeyondChanceSql(lived, 'tc_edges.tc_lo', 'start', tolerance)}, FALSE)
      OR COALESCE(${silentBeyondChanceSql(lived, 'tc_edges.tc_hi', 'end', tolerance)}, FALSE)) AS tc_through
  FROM (
    SELECT ${col} AS tc_unit, ${memberFlag(q, group)} AS tc_member, ${lifeColumnsSql(day, life)}
    FROM ${tableRef(q, ctx)}
    WHERE ${whereClause(q, ctx, window, sq.filters)}
      AND ${groupKnown(q, group)}
    GROUP BY 1, 2
  ) tc_life
  CROSS JOIN (
    SELECT MIN(${day}) AS tc_lo, MAX(${day}) AS tc_hi
    FROM ${tableRef(q, ctx)}
    WHERE ${dateRange(q, ctx, window)}
  ) tc_edges`;
}

/**
 * The condition keeping only units there throughout the window (TRUE when the group has no named
 * units), for the WHERE of a comparison's queries.
 */
export function throughUnitsCondition(q: QueryBuilder, ctx: CompileContext, sq: SubQuestion, group: ComparisonGroup, window: DateWindow): string {
  const unit = namedUnitDimension(ctx.dataset, group);
  if (!unit) return 'TRUE';
  return `${q.ident(unit.column)} IN (
    SELECT tc_unit FROM (${unitLives(q, ctx, sq, group, unit, window)}) tc_lives WHERE tc_through
  )`;
}

/** The units left out (first and last day, group), as the query "units_left_out"; null without named units. */
export function compileUnitsLeftOut(sq: SubQuestion, ctx: CompileContext, group: ComparisonGroup, window: DateWindow): NamedQuery | null {
  const q = new QueryBuilder(ctx.dialect);
  const unit = namedUnitDimension(ctx.dataset, group);
  if (!unit) return null;
  return {
    name: 'units_left_out',
    ...q.finish(`SELECT CAST(tc_unit AS VARCHAR) AS tc_unit, tc_member, tc_first, tc_last
FROM (${unitLives(q, ctx, sq, group, unit, window)}) tc_lives
WHERE NOT tc_through
ORDER BY tc_first, tc_unit`),
  };
}

/** The finding naming the units left out of both groups, or null when none was. */
export function unitsLeftOutFinding(ds: DatasetConfig, group: ComparisonGroup, table: ResultTable | undefined): PerformanceUnitsLeftOutFinding | null {
  const unit = namedUnitDimension(ds, group);
  if (!unit || !table || table.rows.length === 0) return null;
  const units = table.rows.map((r) => ({
    unit: String(r.tc_unit),
    group: roleOf(r.tc_member) ?? 'others',
    first: String(r.tc_first).slice(0, 10),
    last: String(r.tc_last).slice(0, 10),
  }));
  return { type: 'performance_units_left_out', dimension: unit.name, units };
}
