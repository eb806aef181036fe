// Template "performance_by_segment" (performance × breakdown): members vs others within each
// segment of a dimension (e.g. per route). The largest segments by rows are kept and the rest
// folded into one "All others" row in SQL; a difference pointing the same way in most segments is
// evidence the overall gap is not a mix effect. Small segments are flagged.
import { groupableDimension, isAdditive, rankDescending } from '../catalog.js';
import type { Metric } from '../../config/schema.js';
import { type CompileContext, localDateExpr, measureSql, rowCountSql, tableRef, whereClause } from '../compile-context.js';
import { daysBetween } from '../periods.js';
import type { Direction, GroupRole, PerformanceSegmentFinding, SegmentPick } from '../findings/performance.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { Caveat, CellValue, Finding, NamedQuery, SubQuestion } from '../types.js';
import { compileGroups, primaryMetric, readGroupComparison } from './performance-compare.js';
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
  roleLabel,
  roleOf,
  SMALL_SAMPLE,
  throughUnitsCondition,
  unitsLeftOutFinding,
  windowFinding,
} from './performance-common.js';
import { cellFromRow, comparisonPlanFor, comparisonShape, measureColumns, num } from './performance-measure.js';
import { cellEstimate, compareCells, directionOf } from './performance-stats.js';
import { complementaryFoldCtes, minGroupSize, suppressedGroupsCaveat, suppressedSegmentsCaveat, suppressSmallCells } from './small-groups.js';
import { MAX_NAMED_SEGMENTS, namedSegmentCount, rankFloorSql } from './segments-fold-sql.js';
import type { Template } from './template.js';

export function compileSegments(sq: SubQuestion, ctx: CompileContext): NamedQuery {
  const ds = ctx.dataset;
  if (!sq.dimension) throw new Error(`sub-question ${sq.id} needs a dimension to break the comparison down by`);
  const dim = groupableDimension(ds, sq.dimension);
  const metric = primaryMetric(ds, sq);
  const group = resolveGroup(ds, sq);
  const q = new QueryBuilder(ctx.dialect);
  const window = comparisonWindow(sq, group).window;
  const seg = q.ident(dim.column);
  const rankWhere = `${whereClause(q, ctx, window, sq.filters)}\n    AND ${throughUnitsCondition(q, ctx, sq, group, window)}`;
  const plan = comparisonPlanFor(q, ctx, metric, group);
  const where = `${whereClause(q, ctx, window, sq.filters)}\n  AND ${throughUnitsCondition(q, ctx, sq, group, window)}`;
  // Segments shown by name, as many as the request asked for (or named); the rest are folded into one row.
  const topN = q.bind(segmentsShown(sq));
  // Each segment's rank by the metric asked, over both groups (see segmentRankRule).
  const rankedSegments = rankedSegmentsSql(q, ctx, metric, sq, seg, `${rankWhere}\n    AND ${groupKnown(q, group)}`);
  // The final SELECT: its segment keys, its aggregates over the ranked segments, then the measure.
  const finalSelect = (keys: { sql: string; alias: string }[], rankAggregates: { sql: string; alias: string }[], carried: string[], ctes: string): { body: string; columns: string[] } => {
    if (plan.perDay) {
      // Per unit (a group of sites): each site's count in the segment is one observation, as in
      // the groups' own comparison; otherwise the segment's count per calendar day.
      const by = plan.perUnit ? q.ident(groupableDimension(ds, plan.perUnit).column) : null;
      return perDaySegments(q, ctx, metric, { seg, keys, rankAggregates, carried, ctes, where: `${where}\n    AND ${groupKnown(q, group)}`, by });
    }
    const columns = measureColumns(q, ds, metric, plan, ctx);
    const body = `${ctes}
SELECT ${[...keys, ...rankAggregates].map((k) => `${k.sql} AS ${k.alias}`).join(',\n  ')},
  ${columns.join(',\n  ')}
FROM ${tableRef(q, ctx)} AS tc_base
JOIN tc_ranked ON tc_ranked.tc_segment IS NOT DISTINCT FROM tc_base.${seg}
WHERE ${where}
  AND ${groupKnown(q, group)}
GROUP BY 1, 2, 3`;
    return { body, columns };
  };
  const min = minGroupSize(ds);
  if (min !== null) {
    // With a minimum group size: a segment with fewer rows is folded whatever its rank, and a
    // group's side of a segment with fewer rows keeps its row with every number withheld.
    const minP = q.bind(min);
    // While the fold holds fewer rows than the minimum, the smallest named segment joins it too
    // (complementary suppression, see small-groups.ts), so no small segment is the fold's difference.
    const folded = `(tc_ranked.tc_rank > ${topN} OR tc_ranked.tc_seg_rows < ${minP} OR tc_ranked.tc_complement)`;
    const keyCols = [
      { sql: `CASE WHEN NOT ${folded} THEN CAST(tc_ranked.tc_segment AS VARCHAR) END`, alias: 'tc_segment' },
      { sql: folded, alias: 'tc_folded' },
      { sql: memberFlag(q, group), alias: 'tc_member' },
    ];
    const rankCols = [
      { sql: q.dialect.toDouble('COUNT(DISTINCT tc_ranked.tc_rank)'), alias: 'tc_segments' },
      { sql: q.dialect.toDouble('MIN(tc_ranked.tc_rank)'), alias: 'tc_first_rank' },
      { sql: q.dialect.toDouble(`COUNT(DISTINCT CASE WHEN tc_ranked.tc_seg_rows < ${minP} THEN tc_ranked.tc_rank END)`), alias: 'tc_small_segments' },
      { sql: q.dialect.toDouble('COUNT(DISTINCT CASE WHEN tc_ranked.tc_complement THEN tc_ranked.tc_rank END)'), alias: 'tc_complement_segments' },
      { sql: q.dialect.toDouble('MAX(tc_ranked.tc_rank_floor)'), alias: 'tc_rank_floor' },
    ];
    const ctes = `WITH tc_sizes AS (
  ${rankedSegments}
), tc_first AS (
  SELECT tc_segment, 0 AS tc_period, tc_seg_rows, (tc_rank > ${topN} OR tc_seg_rows < ${minP}) AS tc_small_or_out
  FROM tc_sizes
), ${complementaryFoldCtes({ name: 'tc_extra', cells: 'tc_first', segments: 'tc_first', key: 'tc_segment', period: 'tc_period', rows: 'tc_seg_rows', folded: 'tc_small_or_out', minimum: minP })},
tc_ranked AS (
  SELECT tc_sizes.*, COALESCE(tc_extra.tc_sdc_fold, FALSE) AS tc_complement
  FROM tc_sizes
  LEFT JOIN tc_extra ON tc_sizes.tc_segment IS NOT DISTINCT FROM tc_extra.tc_sdc_key
)`;
    const { body: inner, columns: cols } = finalSelect(keyCols, rankCols, ['tc_rank', 'tc_seg_rows', 'tc_complement', 'tc_rank_floor'], ctes);
    const keys = ['tc_segment', 'tc_folded', 'tc_member', 'tc_segments', 'tc_first_rank', 'tc_small_segments', 'tc_complement_segments', 'tc_rank_floor'];
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
  const ctes = `WITH tc_ranked AS (
  ${rankedSegments}
)`;
  const { body } = finalSelect(
    [
      { sql: `CASE WHEN tc_ranked.tc_rank <= ${topN} THEN CAST(tc_ranked.tc_segment AS VARCHAR) END`, alias: 'tc_segment' },
      { sql: `(tc_ranked.tc_rank > ${topN})`, alias: 'tc_folded' },
      { sql: memberFlag(q, group), alias: 'tc_member' },
    ],
    [
      { sql: q.dialect.toDouble('COUNT(DISTINCT tc_ranked.tc_rank)'), alias: 'tc_segments' },
      { sql: q.dialect.toDouble('MIN(tc_ranked.tc_rank)'), alias: 'tc_first_rank' },
      { sql: q.dialect.toDouble('MAX(tc_ranked.tc_rank_floor)'), alias: 'tc_rank_floor' },
    ],
    ['tc_rank', 'tc_rank_floor'],
    ctes,
  );
  return { name: 'segments', ...q.finish(`${body}\nORDER BY 2, 5, 3`) };
}

/**
 * How many segments are shown by name: those the request names when it filters the breakdown's
 * own dimension to a list ("on the Tern Holm and Saltreach routes": all of them, none folded),
 * else as many as it asked for ("top 3 routes"), else SEGMENT_TOP_N.
 */
export function segmentsShown(sq: SubQuestion): number {
  const named = namedSegments(sq);
  return named ? Math.min(Math.max(named.length, 1), MAX_NAMED_SEGMENTS) : namedSegmentCount(sq);
}

/** The breakdown's values the request names (a filter on the breakdown's own dimension), or null. */
export function namedSegments(sq: SubQuestion): (string | number | boolean)[] | null {
  const f = sq.filters.find((x) => x.dimension === sq.dimension && !x.exclude && x.values.length > 0);
  return f ? f.values : null;
}

/**
 * One rule picks the segments shown: their value of the metric asked over both groups, largest
 * first (or in the direction asked, "worst 3"). A sum or a count ranks by its total; an average or
 * a rate by its value among segments with enough rows (RANK_FLOOR, as every ranking by value: a
 * segment under it ranks after the rest and is folded), the floor returned as tc_rank_floor.
 * Ties rank by rows, then by the segment's text, so the fold is stable. Never by rows alone: the
 * largest routes by bookings need not be the largest by revenue.
 */
function rankedSegmentsSql(q: QueryBuilder, ctx: CompileContext, metric: Metric, sq: SubQuestion, seg: string, where: string): string {
  const descending = !sq.rankOrder || rankDescending(metric, sq.rankOrder);
  const dir = descending ? 'DESC' : 'ASC';
  const floored = !isAdditive(metric);
  const floor = floored ? rankFloorSql(q, 'tc_seg_rows') : q.dialect.toDouble('NULL');
  return `SELECT tc_segment, tc_seg_rows, tc_rank_floor,
    ROW_NUMBER() OVER (ORDER BY ${floored ? 'CASE WHEN tc_seg_rows >= tc_rank_floor THEN 0 ELSE 1 END, ' : ''}CASE WHEN tc_seg_value IS NULL THEN 1 ELSE 0 END, tc_seg_value ${dir}, tc_seg_rows DESC, tc_segment) AS tc_rank
  FROM (
    SELECT tc_segment, tc_seg_rows, tc_seg_value, ${floor} AS tc_rank_floor
    FROM (
      SELECT ${seg} AS tc_segment, ${rowCountSql(q, ctx)} AS tc_seg_rows, ${q.dialect.toDouble(measureSql(q, ctx, metric))} AS tc_seg_value
      FROM ${tableRef(q, ctx)}
      WHERE ${where}
      GROUP BY ${seg}
    ) tc_values
  ) tc_floored`;
}

/**
 * The final SELECT for a count compared per day: the catalog count per segment key, group and day
 * over the ranked segments (a folded row adds up its segments' days first), then per key the days
 * with a row, Σ and Σ² of the daily counts; the rank aggregates come from the same rows. With `by`
 * (a unit column), per unit instead of per day: the units with a row, Σ and Σ² of their counts
 * (the columns `perUnitQuery` returns).
 */
function perDaySegments(
  q: QueryBuilder,
  ctx: CompileContext,
  metric: Metric,
  o: { seg: string; keys: { sql: string; alias: string }[]; rankAggregates: { sql: string; alias: string }[]; carried: string[]; ctes: string; where: string; by: string | null },
): { body: string; columns: string[] } {
  const d = q.dialect;
  const aliases = o.keys.map((k) => k.alias);
  const partCols = [...o.keys.map((k) => `${k.sql} AS ${k.alias}`), ...o.carried.map((c) => `tc_ranked.${c} AS ${c}`)];
  const onKeys = aliases.map((a) => `tc_keys.${a} IS NOT DISTINCT FROM tc_days.${a}`).join(' AND ');
  const [n, sx, sxx] = o.by ? ['tc_units', 'tc_ux', 'tc_uxx'] : ['tc_days', 'tc_sx', 'tc_sxx'];
  const columns = [
    `${d.toDouble('COUNT(*)')} AS ${n}`,
    `${d.toDouble('SUM(tc_days.tc_day_value)')} AS ${sx}`,
    `${d.toDouble('SUM(tc_days.tc_day_value * tc_days.tc_day_value)')} AS ${sxx}`,
    `${d.toDouble('SUM(tc_days.tc_day_value)')} AS tc_value`,
    `${d.toDouble('SUM(tc_days.tc_day_rows)')} AS tc_rows`,
  ];
  const body = `${o.ctes},
tc_parts AS (
  SELECT ${partCols.join(', ')},
    ${o.by ?? localDateExpr(q, ctx)} AS tc_by,
    ${d.toDouble(measureSql(q, ctx, metric))} AS tc_part_value,
    ${rowCountSql(q, ctx)} AS tc_part_rows
  FROM ${tableRef(q, ctx)} AS tc_base
  JOIN tc_ranked ON tc_ranked.tc_segment IS NOT DISTINCT FROM tc_base.${o.seg}
  WHERE ${o.where}
  GROUP BY ${partCols.map((_, i) => String(i + 1)).join(', ')}, ${partCols.length + 1}
), tc_days AS (
  SELECT ${aliases.join(', ')}, tc_by, SUM(tc_part_value) AS tc_day_value, SUM(tc_part_rows) AS tc_day_rows
  FROM tc_parts
  GROUP BY ${aliases.join(', ')}, tc_by
), tc_keys AS (
  SELECT ${aliases.join(', ')}, ${o.rankAggregates.map((r) => `${r.sql.replaceAll('tc_ranked.', 'tc_parts.')} AS ${r.alias}`).join(', ')}
  FROM tc_parts
  GROUP BY ${aliases.join(', ')}
)
SELECT ${[...aliases, ...o.rankAggregates.map((r) => r.alias)].map((a) => `tc_keys.${a}`).join(', ')},
  ${columns.join(',\n  ')}
FROM tc_keys
JOIN tc_days ON ${onKeys}
GROUP BY ${[...aliases, ...o.rankAggregates.map((r) => r.alias)].map((a) => `tc_keys.${a}`).join(', ')}`;
  return { body, columns };
}

export const performanceBySegmentTemplate: Template = {
  compile: (sq, ctx) => {
    const group = resolveGroup(ctx.dataset, sq);
    const leftOut = compileUnitsLeftOut(sq, ctx, group, comparisonWindow(sq, group).window);
    return [compileSegments(sq, ctx), compileGroups(sq, ctx), ...(leftOut ? [leftOut] : [])];
  },
  read: (sq, tables, ctx) => {
    const ds = ctx.dataset;
    const metric = primaryMetric(ds, sq);
    const group = resolveGroup(ds, sq);
    const dim = groupableDimension(ds, sq.dimension ?? '');
    const shape = comparisonShape(ds, metric, group);
    const win = windowFinding(sq, group, ctx.coverage);
    const days = daysBetween(win.start, win.end);
    const groupsTable = tables.groups ?? EMPTY_TABLE;
    const segTable = tables.segments ?? EMPTY_TABLE;
    const minimum = minGroupSize(ds);
    const overall = readGroupComparison(metric, shape, groupsTable, minimum, days);
    const leftOut = unitsLeftOutFinding(ds, group, tables.units_left_out);
    const findings: Finding[] = [win, ...overall.findings, ...(leftOut ? [leftOut] : [])];
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
      const m = cellFromRow(e.rows.members, shape, days);
      const o = cellFromRow(e.rows.others, shape, days);
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
      // A side with nothing is an absent group (said in a note), not a small sample.
      const small = !anyHidden && m.n > 0 && o.n > 0 && (m.n < SMALL_SAMPLE || o.n < SMALL_SAMPLE);
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
      // Segments folded by rank are said in the caption with the rule that picked those shown (pick).
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
    // The rule that picked the segments shown, said in the caption when the rest are folded.
    const foldRow = order.map((k) => bySegment.get(k)!).find((e) => e.folded);
    const anyRow = segTable.rows[0];
    const floorRows = anyRow ? num(anyRow.tc_rank_floor) : null;
    const named = namedSegments(sq);
    const descending = !sq.rankOrder || rankDescending(metric, sq.rankOrder);
    const pick: SegmentPick = {
      rule: named ? 'named' : 'ranked',
      shown: order.length - (foldRow ? 1 : 0),
      folded: foldRow ? foldRow.count : 0,
      order: isAdditive(metric) && descending ? 'largest' : descending ? 'highest' : 'lowest',
      floorRows: isAdditive(metric) ? null : floorRows,
    };
    findings.push({
      type: 'performance_consistency',
      pick,
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
