// Template "performance_by_segment" (performance × breakdown): members vs others within each
// segment of a dimension (e.g. per route). The largest segments by rows are kept and the rest
// folded into one "All others" row in SQL; a difference pointing the same way in most segments is
// evidence the overall gap is not a mix effect. Small segments are flagged.
import { groupableDimension } from '../catalog.js';
import { type CompileContext, rowCountSql, tableRef, whereClause } from '../compile-context.js';
import type { Direction, GroupRole, PerformanceSegmentFinding } from '../findings/performance.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { Caveat, CellValue, Finding, NamedQuery, SubQuestion } from '../types.js';
import { compileGroups, primaryMetric, readGroupComparison } from './performance-compare.js';
import {
  ALPHA,
  CONFIDENCE,
  comparisonWindow,
  EMPTY_TABLE,
  groupCaveats,
  groupKnown,
  isSuppressed,
  memberFlag,
  resolveGroup,
  roleLabel,
  roleOf,
  SMALL_SAMPLE,
  windowFinding,
} from './performance-common.js';
import { cellFromRow, measureColumns, measureShape, num, planFor, type MeasurePlan } from './performance-measure.js';
import { cellEstimate, compareCells, directionOf } from './performance-stats.js';
import { complementaryFoldCtes, minGroupSize, suppressedGroupsCaveat, suppressedSegmentsCaveat, suppressSmallCells } from './small-groups.js';
import type { Template } from './template.js';

/** Segments shown by name; the rest are folded into one row. */
export const SEGMENT_TOP_N = 8;

export function compileSegments(sq: SubQuestion, ctx: CompileContext): NamedQuery {
  const ds = ctx.dataset;
  if (!sq.dimension) throw new Error(`sub-question ${sq.id} needs a dimension to break the comparison down by`);
  const dim = groupableDimension(ds, sq.dimension);
  const metric = primaryMetric(ds, sq);
  const group = resolveGroup(ds, sq);
  const q = new QueryBuilder(ctx.dialect);
  const window = comparisonWindow(sq, group).window;
  const seg = q.ident(dim.column);
  const rankWhere = whereClause(q, ctx, window, sq.filters);
  const plan = planFor(q, ctx, metric);
  const cols = measureColumns(q, ds, metric, plan, ctx);
  const where = whereClause(q, ctx, window, sq.filters);
  const topN = q.bind(SEGMENT_TOP_N);
  const min = minGroupSize(ds);
  if (min !== null) {
    // With a minimum group size: a segment with fewer rows is folded whatever its rank, and a
    // group's side of a segment with fewer rows keeps its row with every number withheld.
    const minP = q.bind(min);
    // While the fold holds fewer rows than the minimum, the smallest named segment joins it too
    // (complementary suppression, see small-groups.ts), so no small segment is the fold's difference.
    const folded = `(tc_ranked.tc_rank > ${topN} OR tc_ranked.tc_seg_rows < ${minP} OR tc_ranked.tc_complement)`;
    const segCols = [
      `CASE WHEN NOT ${folded} THEN CAST(tc_ranked.tc_segment AS VARCHAR) END AS tc_segment`,
      `${folded} AS tc_folded`,
      `${memberFlag(q, group)} AS tc_member`,
      `${q.dialect.toDouble('COUNT(DISTINCT tc_ranked.tc_rank)')} AS tc_segments`,
      `${q.dialect.toDouble('MIN(tc_ranked.tc_rank)')} AS tc_first_rank`,
      `${q.dialect.toDouble(`COUNT(DISTINCT CASE WHEN tc_ranked.tc_seg_rows < ${minP} THEN tc_ranked.tc_rank END)`)} AS tc_small_segments`,
      `${q.dialect.toDouble('COUNT(DISTINCT CASE WHEN tc_ranked.tc_complement THEN tc_ranked.tc_rank END)')} AS tc_complement_segments`,
    ];
    const inner = `WITH tc_sizes AS (
  SELECT ${seg} AS tc_segment,
    ROW_NUMBER() OVER (ORDER BY ${rowCountSql(q, ctx)} DESC, ${seg}) AS tc_rank,
    ${rowCountSql(q, ctx)} AS tc_seg_rows
  FROM ${tableRef(q, ctx)}
  WHERE ${rankWhere}
    AND ${groupKnown(q, group)}
  GROUP BY ${seg}
), tc_first AS (
  SELECT tc_segment, 0 AS tc_period, tc_seg_rows, (tc_rank > ${topN} OR tc_seg_rows < ${minP}) AS tc_small_or_out
  FROM tc_sizes
), ${complementaryFoldCtes({ name: 'tc_extra', cells: 'tc_first', segments: 'tc_first', key: 'tc_segment', period: 'tc_period', rows: 'tc_seg_rows', folded: 'tc_small_or_out', minimum: minP })},
tc_ranked AS (
  SELECT tc_sizes.*, COALESCE(tc_extra.tc_sdc_fold, FALSE) AS tc_complement
  FROM tc_sizes
  LEFT JOIN tc_extra ON tc_sizes.tc_segment IS NOT DISTINCT FROM tc_extra.tc_sdc_key
)
SELECT ${[...segCols, ...cols].join(',\n  ')}
FROM ${tableRef(q, ctx)} AS tc_base
JOIN tc_ranked ON tc_ranked.tc_segment IS NOT DISTINCT FROM tc_base.${seg}
WHERE ${where}
  AND ${groupKnown(q, group)}
GROUP BY 1, 2, 3`;
    const keys = ['tc_segment', 'tc_folded', 'tc_member', 'tc_segments', 'tc_first_rank', 'tc_small_segments', 'tc_complement_segments'];
    return {
      name: 'segments',
      ...q.finish(
        suppressSmallCells({
          inner,
          keys,
          columns: cols,
          sizeColumn: 'tc_rows',
          minimum: minP,
          orderBy: 'tc_folded, tc_first_rank, tc_member',
          // The groups' overall figures are shown beside the segments (the "groups" query).
          complementWithin: 'tc_member',
          complementTieBreak: 'tc_first_rank',
        }),
      ),
    };
  }
  // Segments ranked by rows over both groups; ties broken by name so the fold is stable.
  return {
    name: 'segments',
    ...q.finish(`WITH tc_ranked AS (
  SELECT ${seg} AS tc_segment,
    ROW_NUMBER() OVER (ORDER BY ${rowCountSql(q, ctx)} DESC, ${seg}) AS tc_rank
  FROM ${tableRef(q, ctx)}
  WHERE ${rankWhere}
    AND ${groupKnown(q, group)}
  GROUP BY ${seg}
)
SELECT CASE WHEN tc_ranked.tc_rank <= ${topN} THEN CAST(tc_ranked.tc_segment AS VARCHAR) END AS tc_segment,
  (tc_ranked.tc_rank > ${topN}) AS tc_folded,
  ${memberFlag(q, group)} AS tc_member,
  ${q.dialect.toDouble('COUNT(DISTINCT tc_ranked.tc_rank)')} AS tc_segments,
  ${q.dialect.toDouble('MIN(tc_ranked.tc_rank)')} AS tc_first_rank,
  ${cols.join(',\n  ')}
FROM ${tableRef(q, ctx)} AS tc_base
JOIN tc_ranked ON tc_ranked.tc_segment IS NOT DISTINCT FROM tc_base.${seg}
WHERE ${where}
  AND ${groupKnown(q, group)}
GROUP BY 1, 2, 3
ORDER BY 2, 5, 3`),
  };
}

export const performanceBySegmentTemplate: Template = {
  compile: (sq, ctx) => [compileSegments(sq, ctx), compileGroups(sq, ctx)],
  read: (sq, tables, ctx) => {
    const ds = ctx.dataset;
    const metric = primaryMetric(ds, sq);
    const group = resolveGroup(ds, sq);
    const dim = groupableDimension(ds, sq.dimension ?? '');
    const shape = measureShape(ds, metric);
    const win = windowFinding(sq, group, ctx.coverage);
    const groupsTable = tables.groups ?? EMPTY_TABLE;
    const segTable = tables.segments ?? EMPTY_TABLE;
    const minimum = minGroupSize(ds);
    const overall = readGroupComparison(metric, shape, groupsTable, minimum);
    const findings: Finding[] = [win, ...overall.findings];
    const caveats: Caveat[] = [];

    // Rows arrive ordered by rank; key them by (folded, segment) and keep first-seen order.
    const order: string[] = [];
    const bySegment = new Map<string, { segment: string | null; folded: boolean; count: number; small: number; complement: number; rows: Partial<Record<GroupRole, Record<string, CellValue>>> }>();
    for (const r of segTable.rows) {
      const role = roleOf(r.tc_member);
      if (!role) continue;
      const folded = r.tc_folded === true;
      const segment = folded || r.tc_segment === null ? null : String(r.tc_segment);
      const key = JSON.stringify([folded, segment]);
      let entry = bySegment.get(key);
      if (!entry) {
        entry = { segment, folded, count: 0, small: 0, complement: 0, rows: {} };
        bySegment.set(key, entry);
        order.push(key);
      }
      entry.rows[role] = r;
      entry.count = Math.max(entry.count, num(r.tc_segments) ?? 1);
      entry.small = Math.max(entry.small, num(r.tc_small_segments) ?? 0);
      entry.complement = Math.max(entry.complement, num(r.tc_complement_segments) ?? 0);
    }
    const hiddenCells: GroupRole[] = [];
    // Cells withheld only so a small one cannot be worked out from the groups' totals.
    let complementCells = 0;
    const overallDiff = diffOf(cellEstimate(overall.cells.members), cellEstimate(overall.cells.others));
    const overallDirection = directionOf(overallDiff);
    let compared = 0;
    let same = 0;
    let opposite = 0;
    let sigSame = 0;
    let sigOpposite = 0;
    for (const key of order) {
      const e = bySegment.get(key)!;
      const m = cellFromRow(e.rows.members, shape as MeasurePlan);
      const o = cellFromRow(e.rows.others, shape as MeasurePlan);
      // A side below the minimum group size is withheld: too few to show, so nothing is compared.
      const hidden = { members: isSuppressed(e.rows.members), others: isSuppressed(e.rows.others) };
      for (const role of ['members', 'others'] as const) {
        if (!hidden[role]) continue;
        if (e.rows[role]?.tc_complement === true) complementCells++;
        else hiddenCells.push(role);
      }
      const anyHidden = hidden.members || hidden.others;
      const result = anyHidden ? null : compareCells(m, o, CONFIDENCE);
      const members = cellEstimate(m);
      const others = cellEstimate(o);
      const difference = anyHidden ? null : diffOf(members, others);
      const small = !anyHidden && (m.n < SMALL_SAMPLE || o.n < SMALL_SAMPLE);
      const finding: PerformanceSegmentFinding = {
        type: 'performance_segment',
        metric: metric.name,
        dimension: dim.name,
        segment: e.segment,
        folded: e.folded,
        segmentCount: e.count,
        nMembers: m.n,
        nOthers: o.n,
        members: m.n > 0 ? members : null,
        others: o.n > 0 ? others : null,
        difference: m.n > 0 && o.n > 0 ? difference : null,
        relative: m.n > 0 && o.n > 0 && difference !== null && others !== null && others !== 0 ? difference / others : null,
        ci: result?.kind === 'test' ? result.ci : null,
        pValue: result?.kind === 'test' ? result.pValue : null,
        small,
        ...(anyHidden ? { suppressedMembers: hidden.members, suppressedOthers: hidden.others } : {}),
      };
      findings.push(finding);
      if (small) caveats.push({ code: 'small_sample', data: { n: Math.min(m.n, o.n), segment: e.segment ?? (e.folded ? 'All others' : 'missing'), threshold: SMALL_SAMPLE } });
      if (e.folded && e.count - e.small - e.complement > 0) caveats.push({ code: 'segments_folded', data: { count: e.count - e.small - e.complement } });
      if (e.folded && e.small > 0 && minimum !== null) caveats.push(suppressedSegmentsCaveat(e.small, minimum, { dimension: dim.name }, e.complement));
      if (finding.difference === null || overallDirection === 'equal') continue;
      compared++;
      const dir: Direction = directionOf(finding.difference);
      const significant = finding.pValue !== null && finding.pValue < ALPHA;
      if (dir === overallDirection) {
        same++;
        if (significant) sigSame++;
      } else if (dir !== 'equal') {
        opposite++;
        if (significant) sigOpposite++;
      }
    }
    findings.push({
      type: 'performance_consistency',
      metric: metric.name,
      dimension: dim.name,
      overallDirection,
      segments: compared,
      sameDirection: same,
      oppositeDirection: opposite,
      significantSame: sigSame,
      significantOpposite: sigOpposite,
    });
    if (hiddenCells.length > 0 && minimum !== null) {
      const labels = [...new Set(hiddenCells)].map((role) => roleLabel(group, role));
      caveats.push(suppressedGroupsCaveat(labels, minimum, { count: hiddenCells.length, cells: true, dimension: dim.name, ...(complementCells > 0 ? { complementary: complementCells } : {}) }));
    }
    caveats.unshift(...groupCaveats([groupsTable, segTable], overall.sizes, group, win, minimum));
    return { findings, caveats };
  },
};

function diffOf(a: number | null, b: number | null): number | null {
  return a === null || b === null ? null : a - b;
}
