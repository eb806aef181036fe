// Template "segment_trend": a metric by one dimension at the grain over the window. Each of the
// top N segments (and one "All others" fold) gets its series, its Sen's slope, its growth from
// its first to its last full calendar year, and its peak; gaps and late starts become caveats.
import { changeBasisOf, metricByName, seasonalModel } from '../catalog.js';
import type { SegmentTrendFinding, SegmentTrendOverviewFinding, SegmentYearGrowth } from '../findings/segments.js';
import { addDays, daysBetween, nextPeriod } from '../periods.js';
import { yearsThroughout } from '../presence.js';
import { cagr, relativeChange, senSlope } from '../stats/index.js';
import type { Caveat, Finding, PeriodPoint, ResultTable, SubQuestion } from '../types.js';
import { compileFoldedSegments, foldedAs, namedSegmentCount, perDayAsked, segmentDimension } from './segments-fold-sql.js';
import { foldedCaveats, foldedRow, readSegmentTotals, segmentCoverageCaveats, type FoldedRow } from './segments-read.js';
import { minGroupSize } from './small-groups.js';
import type { ReadContext, Reading, Template } from './template.js';
import { completePoints, coveredWindow, EMPTY_TABLE, isoYear, mean, numberOrNull, periodsInYear, relativeYearlyRateApplies, seasonallyAdjusted, seasonUnresolvedOver, windowPeriods } from './trend-points.js';

export const segmentTrendTemplate: Template = {
  compile: (sq, ctx) => {
    segmentDimension(sq, ctx);
    const topN = namedSegmentCount(sq);
    return [
      { name: 'segment_totals', ...compileFoldedSegments(sq, ctx, { topN, grain: null, totals: true, perDay: perDayAsked(sq, ctx.dataset) }) },
      { name: 'segment_series', ...compileFoldedSegments(sq, ctx, { topN, grain: sq.grain }) },
      { name: 'segment_years', ...compileFoldedSegments(sq, ctx, { topN, grain: 'year', monthsWithRows: true }) },
    ];
  },
  read: (sq, tables, ctx) =>
    readSegmentTrend(sq, tables.segment_totals ?? EMPTY_TABLE, tables.segment_series ?? EMPTY_TABLE, tables.segment_years ?? EMPTY_TABLE, ctx),
};

export function readSegmentTrend(sq: SubQuestion, totals: ResultTable, seriesTable: ResultTable, years: ResultTable, ctx: ReadContext): Reading {
  const metric = sq.metrics[0]!;
  const dimension = sq.dimension ?? '';
  const caveats: Caveat[] = [];
  for (const t of [totals, seriesTable, years]) if (t.truncated) caveats.push({ code: 'truncated', data: { rows: t.rows.length } });
  const covered = coveredWindow(sq.window, ctx.coverage);
  const segments = readSegmentTotals(totals);
  if (!covered || segments.length === 0) {
    return { findings: [], caveats: [...caveats, { code: 'no_data', data: { start: sq.window.start, end: sq.window.end } }] };
  }
  if (segments.every((s) => s.value === null)) caveats.push({ code: 'all_null', data: { metric } });
  caveats.push(...foldedCaveats(segments, dimension, minGroupSize(ctx.dataset), foldedAs(metricByName(ctx.dataset, metric), sq.rankOrder)));

  const { starts, partial } = windowPeriods(covered, sq.grain);
  for (const p of partial) caveats.push({ code: 'partial_period', data: { period: p, grain: sq.grain, ...partialCover(p, covered, sq.grain) } });
  const cells = groupRows(seriesTable);
  const yearRows = groupRows(years);
  const perYear = periodsInYear(sq.grain);
  // Asked per day: each period's figure over its days (those the window and the data cover), as
  // the series shows it; the totals come per day from the query (each segment over its own days).
  const perDay = perDayAsked(sq, ctx.dataset);
  const daily = (period: string, grain: SubQuestion['grain'], v: number | null) => {
    if (!perDay || v === null) return v;
    const from = period > covered.start ? period : covered.start;
    const next = nextPeriod(period, grain);
    const days = daysBetween(from, next < covered.end ? next : covered.end);
    return days > 0 ? v / days : null;
  };
  // One rule for every segment (catalog.ts metricPercentScale): a temperature, or a metric whose
  // values reach or cross zero in any segment, gets no growth in percent at all, only in its units.
  const catalogMetric = metricByName(ctx.dataset, metric);
  const everyValue = [...cells.values(), ...yearRows.values()].flatMap((byPeriod) => [...byPeriod.values()].map((r) => r.value));
  // One rule (catalog changeBasisOf): a rate or share moves in points, a level or a signed metric in its units.
  const percents = changeBasisOf(catalogMetric, everyValue) === 'percent';
  const model = seasonalModel(catalogMetric, everyValue);

  const findings: Finding[] = [];
  const trends: SegmentTrendFinding[] = [];
  for (const seg of segments) {
    const mine = cells.get(seg.id) ?? new Map<string, FoldedRow>();
    const points: PeriodPoint[] = starts.map((p) => ({ period: p, value: daily(p, sq.grain, mine.get(p)?.value ?? null), partial: partial.has(p) }));
    const withRows = new Set([...mine.values()].filter((c) => c.rowCount > 0).map((c) => String(c.row.period)));
    caveats.push(...segmentCoverageCaveats(seg, dimension, sq.grain, starts, partial, withRows));
    const complete = completePoints(points);
    // Adjusted as in trend_test, so a segment that starts at the summer peak does not look like it fell.
    const adjusted = seasonallyAdjusted(sq.grain, points, complete, model);
    const values = adjusted ?? complete.map((c) => c.value);
    const sen = senSlope(values, complete.map((c) => c.index));
    const level = mean(values);
    const slopePerYear = sen ? sen.slope * perYear : null;
    let peak: { period: string; value: number } | null = null;
    for (const c of complete) if (peak === null || c.value > peak.value) peak = { period: c.period, value: c.value };
    const trend: SegmentTrendFinding = {
      type: 'segment_trend',
      metric,
      dimension,
      grain: sq.grain,
      segment: seg.segment,
      other: seg.other,
      members: seg.members,
      rank: seg.rank,
      total: seg.value,
      points,
      firstPeriod: starts.find((p) => withRows.has(p)) ?? null,
      seasonallyAdjusted: adjusted !== null,
      slopePerPeriod: sen ? sen.slope : null,
      slopePerYear,
      slopePerYearRelative: slopePerYear !== null && level !== null && level > 0 && percents && relativeYearlyRateApplies(catalogMetric, complete.map((c) => c.value), sq.grain) ? slopePerYear / level : null,
      growth: yearGrowth(yearRows.get(seg.id), covered, percents, perDay ? (period, v) => daily(period, 'year', v) : undefined),
      peak,
      ...(perDay ? { perDay: true as const } : {}),
    };
    trends.push(trend);
    findings.push(trend);
  }
  // One measure for all: when any named segment's values touch or cross zero, the metric has no
  // base for a percentage, so no segment gets one (else the ranking would silently skip that one).
  const named = trends.filter((t) => !t.other);
  if (named.some((t) => t.slopePerYear !== null && t.slopePerYearRelative === null)) for (const t of trends) t.slopePerYearRelative = null;

  findings.push({
    type: 'segment_trend_overview',
    metric,
    dimension,
    grain: sq.grain,
    segmentCount: numberOrNull(totals.rows[0]?.seg_count) ?? segments.length,
    folded: segments.find((s) => s.other)?.members ?? 0,
    ...fastestGrowing(trends),
  });
  // Without compound growth between full years, the slopes span under two years: the season, not a trend.
  const overview = findings[findings.length - 1] as SegmentTrendOverviewFinding;
  const spanned = Math.max(0, ...named.map((t) => completePoints(t.points)).filter((c) => c.length > 0).map((c) => c[c.length - 1]!.index - c[0]!.index + 1));
  if (overview.fastest && overview.fastest.measure !== 'cagr' && seasonUnresolvedOver(sq.grain, spanned)) overview.seasonUnresolved = true;
  return { findings, caveats };
}

function partialCover(p: string, covered: { start: string; end: string }, grain: SubQuestion['grain']) {
  const next = nextPeriod(p, grain);
  return { coveredFrom: p > covered.start ? p : covered.start, coveredTo: addDays(next < covered.end ? next : covered.end, -1) };
}

/** Rows of a folded per-period table, by segment id and then by period. */
function groupRows(table: ResultTable): Map<string, Map<string, FoldedRow>> {
  const out = new Map<string, Map<string, FoldedRow>>();
  for (const r of table.rows) {
    const row = foldedRow(r);
    const byPeriod = out.get(row.id) ?? new Map<string, FoldedRow>();
    byPeriod.set(String(r.period), row);
    out.set(row.id, byPeriod);
  }
  return out;
}

/**
 * Growth from the first to the last calendar year that lies inside the window and that the segment
 * was there throughout (analysis/presence.ts: every month with a row, or between two of its years
 * with rows, so a sparse segment is not dropped for a quiet month).
 */
function yearGrowth(rows: Map<string, FoldedRow> | undefined, covered: { start: string; end: string }, percents: boolean, perDay?: (period: string, v: number | null) => number | null): SegmentYearGrowth | null {
  if (!rows) return null;
  const inWindow = [...rows.entries()].filter(([period]) => period >= covered.start && `${isoYear(period) + 1}-01-01` <= covered.end);
  const throughout = yearsThroughout(inWindow.map(([period, r]) => ({ year: isoYear(period), monthsWithRows: numberOrNull(r.row.months_with_rows) ?? 0 })));
  const full = inWindow
    .filter(([period, r]) => throughout.has(isoYear(period)) && r.value !== null)
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  if (full.length < 2) return null;
  const [firstPeriod, firstRow] = full[0]!;
  const [lastPeriod, lastRow] = full[full.length - 1]!;
  const fromYear = isoYear(firstPeriod);
  const toYear = isoYear(lastPeriod);
  // Per day, a leap year's extra day does not count as growth.
  const first = perDay ? perDay(firstPeriod, firstRow.value) : firstRow.value;
  const last = perDay ? perDay(lastPeriod, lastRow.value) : lastRow.value;
  if (first === null || last === null) return null;
  return {
    fromYear,
    toYear,
    from: first,
    to: last,
    relative: percents ? relativeChange(first, last) : null,
    cagr: percents ? cagr(first, last, toYear - fromYear) : null,
  };
}

function fastestGrowing(trends: readonly SegmentTrendFinding[]): Pick<SegmentTrendOverviewFinding, 'fastest' | 'runnerUp'> {
  const named = trends.filter((t) => !t.other);
  // Compound yearly growth where any segment has it, else the relative Sen's slope a year; one measure for all.
  // Else the Sen's slope in the metric's units per period, where a percentage has no base or the span is under a year.
  for (const measure of ['cagr', 'slope', 'units'] as const) {
    const rated = named
      .map((t) => ({ segment: t.segment, value: measure === 'cagr' ? t.growth?.cagr ?? null : measure === 'slope' ? t.slopePerYearRelative : t.slopePerPeriod }))
      .filter((r): r is { segment: string | null; value: number } => r.value !== null)
      .sort((a, b) => b.value - a.value);
    if (rated.length === 0) continue;
    const [first, second] = rated;
    return { fastest: { segment: first!.segment, measure, value: first!.value }, runnerUp: second ? { segment: second.segment, value: second.value } : null };
  }
  return { fastest: null, runnerUp: null };
}
