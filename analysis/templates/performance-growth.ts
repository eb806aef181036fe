// Template "performance_growth" (performance × summary): "did the members grow faster?". Each
// group's own growth over the window asked against the same dates a year earlier, in total and
// like for like. The spans, the per-unit totals and which units were there through both come
// from growth's window comparison (growth-compare.ts) run by the groups' unit dimension (a shop);
// the units are then added up by group. A level compared between the groups answers another
// question, and a unit new in one group (a shop opened last June) moves that group's total growth
// without anyone doing better.
import { groupableDimension, isAdditive, metricByName, namedUnitDimension } from '../catalog.js';
import type { CompileContext } from '../compile-context.js';
import { tableRef } from '../compile-context.js';
import type { GroupGrowth, GroupRole, PerformanceGroupGrowthFinding } from '../findings/performance.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { Caveat, ResultTable, SubQuestion } from '../types.js';
import { compileWindowComparison, readWindowComparison, type WindowComparison } from './growth-compare.js';
import { EMPTY_TABLE, groupKnown, memberFlag, resolveGroup, roleOf } from './performance-common.js';
import { primaryMetric } from './performance-compare.js';
import type { Reading, Template } from './template.js';

/** The dimension a group without named units is compared by: its own true/false column, so each group is one unit. */
const GROUP_AS_UNIT = '__tc_group';

/**
 * The sub-question run by the groups' unit dimension, as growth's window comparison reads it, and
 * the dataset it reads it from. Without named units (pass holders), the group's own column serves
 * as the dimension: each group is then one unit, and its growth has no like-for-like part of its own.
 */
function byUnit(sq: SubQuestion, ds: CompileContext['dataset']): { sq: SubQuestion; dataset: CompileContext['dataset']; named: boolean } {
  const group = resolveGroup(ds, sq);
  // Units' totals add up to a group's only for a metric that adds up (a sum or a count).
  const unit = isAdditive(metricByName(ds, sq.metrics[0]!)) ? namedUnitDimension(ds, group) : null;
  if (unit) return { sq: { ...sq, dimension: unit.name }, dataset: ds, named: true };
  const dataset = { ...ds, dimensions: [...ds.dimensions, { name: GROUP_AS_UNIT, column: group.column, label: group.label, synonyms: [], personal_data: false }] };
  return { sq: { ...sq, dimension: GROUP_AS_UNIT }, dataset, named: false };
}

/** Which group each unit is in (a unit flagged a member on any row is one). */
function compileMembership(sq: SubQuestion, ctx: CompileContext): { sql: string; params: (string | number | boolean)[] } {
  const ds = ctx.dataset;
  const group = resolveGroup(ds, sq);
  const by = byUnit(sq, ds);
  const unit = groupableDimension(by.dataset, by.sq.dimension!);
  const q = new QueryBuilder(ctx.dialect);
  return q.finish(`SELECT CAST(${q.ident(unit.column)} AS VARCHAR) AS tc_unit, BOOL_OR(${memberFlag(q, group)}) AS tc_member
FROM ${tableRef(q, ctx)}
WHERE ${groupKnown(q, group)}
GROUP BY 1
ORDER BY 1`);
}

export const performanceGrowthTemplate: Template = {
  compile: (sq, ctx) => {
    const by = byUnit(sq, ctx.dataset);
    return [
      { name: 'units', ...compileWindowComparison(by.sq, { ...ctx, dataset: by.dataset }) },
      { name: 'membership', ...compileMembership(sq, ctx) },
    ];
  },
  read: (sq, tables, ctx) => {
    const by = byUnit(sq, ctx.dataset);
    const cmp = readWindowComparison(by.sq, tables.units ?? EMPTY_TABLE, ctx.coverage);
    const caveats: Caveat[] = [...cmp.caveats, { code: 'observational', data: { group: resolveGroup(ctx.dataset, sq).name } }];
    if (cmp.empty) return { findings: [], caveats };
    const metric = primaryMetric(ctx.dataset, sq).name;
    const f = groupGrowthFinding(metric, by.named ? by.sq.dimension! : '', cmp, membershipOf(tables.membership ?? EMPTY_TABLE));
    return { findings: [f], caveats } satisfies Reading;
  },
};

function membershipOf(table: ResultTable): Map<string, GroupRole> {
  const out = new Map<string, GroupRole>();
  for (const r of table.rows) {
    const role = roleOf(r.tc_member);
    if (role && r.tc_unit !== null && r.tc_unit !== undefined) out.set(String(r.tc_unit), role);
  }
  return out;
}

function relative(after: number, before: number): number | null {
  return before === 0 ? null : after / before - 1;
}

/**
 * Adds the units' totals up by group, in total and over the units there through both spans (a
 * unit the comparison marks new or gone is left out of like-for-like, as growth does). Units
 * folded for the minimum group size have no name to place in a group and are left out of both.
 */
export function groupGrowthFinding(metric: string, unit: string, cmp: WindowComparison, members: Map<string, GroupRole>): PerformanceGroupGrowthFinding {
  const changed = new Map(cmp.changed.map((c) => [c.segment, c]));
  const groups: GroupGrowth[] = (['members', 'others'] as const).map((role) => {
    const keys = new Set<string>();
    for (const side of [cmp.current, cmp.prior]) for (const k of side.segments.keys()) if (k !== null && members.get(k) === role) keys.add(k);
    const sum = (side: WindowComparison['current'], keep: (k: string) => boolean) => [...keys].filter(keep).reduce((s, k) => s + (side.segments.get(k)?.values[metric] ?? 0), 0);
    const all = () => true;
    const through = (k: string) => !changed.has(k);
    const total = { before: sum(cmp.prior, all), after: sum(cmp.current, all) };
    const lflUnits = [...keys].filter(through).length;
    const lfl = { before: sum(cmp.prior, through), after: sum(cmp.current, through) };
    const gone = [...keys].filter((k) => changed.has(k)).sort().map((k) => changed.get(k)!);
    return {
      group: role,
      units: keys.size,
      total: { ...total, relative: relative(total.after, total.before) },
      likeForLike: lflUnits > 0 ? { ...lfl, relative: relative(lfl.after, lfl.before), units: lflUnits } : null,
      changed: gone,
    };
  });
  return { type: 'performance_group_growth', metric, unit, current: cmp.currentSpan, prior: cmp.priorSpan, groups };
}
