// Template "kpi_mix" (kpi × distribution): how the latest complete period splits across the
// segments of a dimension, against the same period a year earlier (share change in points),
// with the count of segments making 80% and the HHI. A ratio or rate has no shares of its own,
// so its mix is the split of what it is measured per (fare per passenger: passengers).
import type { DatasetConfig, Metric } from '../../config/schema.js';
import { groupableDimension, metricByName, plainCountMetric } from '../catalog.js';
import { rowCountSql, tableRef } from '../compile-context.js';
import type { Coverage } from '../coverage.js';
import type { KpiMixFinding, KpiMixRow, SegmentKey } from '../findings/kpi.js';
import { nextPeriod } from '../periods.js';
import { QueryBuilder } from '../sql/query-builder.js';
import { concentration } from '../stats/index.js';
import type { Caveat, CellValue, CompiledQuery, Finding, ResultTable, SubQuestion } from '../types.js';
import { coveredInFull, type KpiCompileContext, latestCandidates, resolvedLatest, sameLastYear } from './kpi-periods.js';
import { EMPTY_TABLE, numberOrNull, periodExpr, periodsScope, periodsWhere } from './kpi-sql.js';
import { complementaryFoldCtes, minGroupSize, suppressedSegmentsCaveat } from './small-groups.js';
import type { Reading, Template } from './template.js';

export const MIX_THRESHOLD = 0.8;

/** The metric whose shares a KPI's mix shows; null means shares of rows (when the catalog has no plain row count). */
export function mixMeasure(ds: DatasetConfig, metric: Metric): Metric | null {
  const def = metric.definition;
  switch (def.type) {
    case 'sum':
    case 'count':
    case 'distinct_count':
      return metric;
    case 'ratio':
      return mixMeasure(ds, metricByName(ds, def.denominator));
    case 'rate':
      return def.of ? mixMeasure(ds, metricByName(ds, def.of)) : (plainCountMetric(ds) ?? null);
    case 'average':
      return plainCountMetric(ds) ?? null;
  }
}


// Aliases of the share base start with "_", which no catalog metric name can (they start with a letter).
const baseAlias = (metric: string) => `_base_${metric}`;

export function compileKpiMix(sq: SubQuestion, ctx: KpiCompileContext): CompiledQuery {
  if (!sq.dimension) throw new Error('kpi_mix needs a dimension');
  const ds = ctx.dataset;
  const dim = groupableDimension(ds, sq.dimension);
  const q = new QueryBuilder(ctx.dialect);
  const candidates = latestCandidates(sq.window, sq.grain, ctx.coverage);
  const periods = new Set<string>();
  for (const c of candidates) {
    periods.add(c);
    const ly = sameLastYear(c, sq.grain);
    if (ly) periods.add(ly);
  }
  // The periods' dates in WHERE and the filters inside each aggregate (periodScope, as
  // kpi_by_segment): a period with rows but none matching keeps its rows at 0, so it reads as an
  // empty period, not as a gap in the data; segments with no matching row are dropped on reading.
  const scope = periodsScope(q, ctx, [...periods], sq.grain, sq.filters);
  const measures: string[] = [];
  for (const name of sq.metrics) {
    const metric = metricByName(ds, name);
    const base = mixMeasure(ds, metric);
    measures.push(`  ${scope.measure(metric)} AS ${q.ident(name)}`);
    measures.push(`  ${base ? scope.measure(base) : ctx.dialect.toDouble(scope.rowCount())} AS ${q.ident(baseAlias(name))}`);
  }
  const period = periodExpr(q, ctx, sq.grain);
  const where = scope.where;
  const min = minGroupSize(ds);
  if (min !== null) {
    // A segment with fewer rows than the minimum in either period (where it has rows at all) joins
    // one "All others" row, combined here because a ratio of the fold cannot be added up later;
    // while that row is below the minimum in a period, the smallest named segments join it too
    // (complementary suppression, see small-groups.ts).
    const seg = q.ident(dim.column);
    const cellWhere = periodsWhere(q, ctx, [...periods], sq.grain, sq.filters);
    const cellPeriod = periodExpr(q, ctx, sq.grain);
    const minP = q.bind(min);
    return q.finish(`WITH tc_mix_cells AS (
  SELECT ${seg} AS tc_mix_key, ${cellPeriod} AS tc_mix_period, ${rowCountSql(q, ctx)} AS tc_mix_rows
  FROM ${tableRef(q, ctx)}
  WHERE ${cellWhere}
  GROUP BY 1, 2
), tc_mix_primary AS (
  SELECT tc_mix_key, (MIN(tc_mix_rows) < ${minP}) AS tc_mix_small
  FROM tc_mix_cells
  GROUP BY tc_mix_key
), ${complementaryFoldCtes({ name: 'tc_mix_extra', cells: 'tc_mix_cells', segments: 'tc_mix_primary', key: 'tc_mix_key', period: 'tc_mix_period', rows: 'tc_mix_rows', folded: 'tc_mix_small', minimum: minP })},
tc_mix_small AS (
  SELECT tc_mix_primary.tc_mix_key, TRUE AS tc_mix_small
  FROM tc_mix_primary
  LEFT JOIN tc_mix_extra ON tc_mix_primary.tc_mix_key IS NOT DISTINCT FROM tc_mix_extra.tc_sdc_key
  WHERE tc_mix_primary.tc_mix_small OR tc_mix_extra.tc_sdc_fold
), tc_mix_tagged AS (
  SELECT tc_mix_t.*, COALESCE(tc_mix_small.tc_mix_small, FALSE) AS tc_mix_folded,
    (SELECT COUNT(*) FROM tc_mix_primary WHERE tc_mix_primary.tc_mix_small) AS tc_mix_small_count,
    (SELECT COUNT(*) FROM tc_mix_extra) AS tc_mix_complement_count
  FROM ${tableRef(q, ctx)} AS tc_mix_t
  LEFT JOIN tc_mix_small ON tc_mix_t.${seg} IS NOT DISTINCT FROM tc_mix_small.tc_mix_key
)
SELECT ${period} AS period,
  CASE WHEN tc_mix_folded THEN NULL ELSE ${seg} END AS segment,
  tc_mix_folded AS other,
${measures.join(',\n')},
  ${ctx.dialect.toDouble(scope.rowCount())} AS row_count,
  ${ctx.dialect.toDouble(`COUNT(DISTINCT ${scope.onMatching(seg)})`)} AS segment_count,
  ${ctx.dialect.toDouble('MAX(tc_mix_small_count)')} AS small_segments,
  ${ctx.dialect.toDouble('MAX(tc_mix_complement_count)')} AS complement_segments
FROM tc_mix_tagged
WHERE ${where}
GROUP BY 1, 2, 3
ORDER BY 1, 3, 2`);
  }
  return q.finish(`SELECT ${period} AS period,
  ${q.ident(dim.column)} AS segment,
${measures.join(',\n')},
  ${ctx.dialect.toDouble(scope.rowCount())} AS row_count
FROM ${tableRef(q, ctx)}
WHERE ${where}
GROUP BY 1, 2
ORDER BY 1, 2`);
}

export const kpiMixTemplate: Template = {
  compile: (sq, ctx) => [{ name: 'mix', ...compileKpiMix(sq, ctx) }],
  read: (sq, tables, ctx) => readKpiMix(sq, tables.mix ?? EMPTY_TABLE, ctx.dataset, ctx.coverage),
};

type Row = Record<string, CellValue>;

export function readKpiMix(sq: SubQuestion, table: ResultTable, dataset: DatasetConfig, coverage: Coverage): Reading {
  const caveats: Caveat[] = [];
  if (table.truncated) caveats.push({ code: 'truncated', data: { rows: table.rows.length } });
  const { latest, partial } = resolvedLatest(sq.window, sq.grain, coverage);
  if (partial) caveats.push({ code: 'partial_period_excluded', data: { ...partial, grain: sq.grain } });
  // A segment with rows in a period but none that pass the brief's filters is not in that period's mix.
  const matching = (r: Row) => (numberOrNull(r.row_count) ?? 0) > 0;
  const now = latest === null ? [] : table.rows.filter((r) => String(r.period) === latest && matching(r));
  if (latest === null || now.length === 0) {
    caveats.push({ code: 'no_data', data: { start: latest ?? sq.window.start, end: latest ? nextPeriod(latest, sq.grain) : sq.window.end } });
    return { findings: [], caveats };
  }
  const lyPeriod = sameLastYear(latest, sq.grain);
  // Without full data a year earlier there are no shares to compare; with it, a segment absent then had a share of zero.
  const lyUsable = lyPeriod !== null && coveredInFull(lyPeriod, sq.grain, coverage);
  const then = lyUsable ? table.rows.filter((r) => String(r.period) === lyPeriod && matching(r)) : [];
  const findings: Finding[] = [];
  for (const name of sq.metrics) {
    const metric = metricByName(dataset, name);
    const base = mixMeasure(dataset, metric);
    const col = baseAlias(name);
    const keys = new Map<string, SegmentKey>();
    // The fold of small segments (other = TRUE) has its own id, apart from the missing value's.
    const idOf = (k: SegmentKey) => `${typeof k}:${String(k)}`;
    const rowId = (r: Row) => (r.other === true ? OTHER_ID : idOf((r.segment ?? null) as SegmentKey));
    for (const r of [...now, ...then]) keys.set(rowId(r), (r.other === true ? null : (r.segment ?? null)) as SegmentKey);
    const nowBy = byKey(now, rowId);
    const thenBy = byKey(then, rowId);
    const ids = [...keys.keys()];
    const current = ids.map((id) => numberOrNull(nowBy.get(id)?.[col]) ?? 0);
    const previous = ids.map((id) => numberOrNull(thenBy.get(id)?.[col]) ?? 0);
    const c = concentration(ids.map((id, i) => ({ key: id, value: current[i]! })), { threshold: MIX_THRESHOLD });
    const p = lyUsable && then.length > 0 ? concentration(ids.map((id, i) => ({ key: id, value: previous[i]! })), { threshold: MIX_THRESHOLD }) : null;
    const shareNow = new Map(c.kind === 'ok' ? c.pareto.map((r) => [r.key, r.share]) : []);
    const shareThen = new Map(p?.kind === 'ok' ? p.pareto.map((r) => [r.key, r.share]) : []);
    const segments: KpiMixRow[] = ids.map((id, i) => {
      const share = shareNow.get(id) ?? null;
      const lastYearShare = shareThen.get(id) ?? null;
      return {
        key: keys.get(id)!,
        ...(id === OTHER_ID ? { other: true } : {}),
        value: current[i]!,
        share,
        lastYearValue: p ? previous[i]! : null,
        lastYearShare,
        shareChange: share !== null && lastYearShare !== null ? share - lastYearShare : null,
        metricValue: numberOrNull(nowBy.get(id)?.[name]),
      };
    });
    // Largest first, "All others" last; ties by key so the order never depends on the engine's row order.
    segments.sort((a, b) => Number(a.other ?? false) - Number(b.other ?? false) || b.value - a.value || idOf(a.key).localeCompare(idOf(b.key)));
    const finding: KpiMixFinding = {
      type: 'kpi_mix',
      metric: name,
      shareOf: base?.name ?? null,
      grain: sq.grain,
      dimension: sq.dimension!,
      period: latest,
      lastYearPeriod: p ? lyPeriod : null,
      segments,
      total: current.reduce((a, v) => a + v, 0),
      lastYearTotal: p ? previous.reduce((a, v) => a + v, 0) : null,
      countToThreshold: c.kind === 'ok' ? c.countToThreshold : null,
      shareToThreshold: c.kind === 'ok' ? segments.slice(0, c.countToThreshold).reduce((a, r) => a + (r.share ?? 0), 0) : null,
      threshold: MIX_THRESHOLD,
      hhi: c.kind === 'ok' ? c.hhi : null,
      lastYearHhi: p?.kind === 'ok' ? p.hhi : null,
    };
    findings.push(finding);
  }
  const minimum = minGroupSize(dataset);
  const fold = [...now, ...then].find((r) => r.other === true);
  const small = Number(fold?.small_segments ?? 0);
  if (minimum !== null && small > 0) {
    caveats.push(suppressedSegmentsCaveat(small, minimum, { dimension: sq.dimension! }, Number(fold?.complement_segments ?? 0)));
  }
  return { findings, caveats };
}

const OTHER_ID = 'other';

function byKey(rows: Row[], idOf: (r: Row) => string): Map<string, Row> {
  return new Map(rows.map((r) => [idOf(r), r]));
}
