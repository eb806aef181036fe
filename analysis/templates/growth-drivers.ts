// Template "growth_drivers": which segments drove the change (growth × breakdown). The metric by
// one dimension in the window asked for (SubQuestion.window) against the same dates a year earlier.
import type { DatasetConfig, Metric } from '../../config/schema.js';
import { addsAcrossSegments, metricByName, metricPercentScale } from '../catalog.js';
import type { GrowthDriverSegment, GrowthDriversFinding } from '../findings/growth.js';
import { percentChange } from '../stats/index.js';
import type { Caveat, Finding, ResultTable, SubQuestion } from '../types.js';
import type { Coverage } from '../coverage.js';
import {
  compileWindowComparison,
  foldedMembers,
  readWindowComparison,
  perDaySpanDays,
  segmentKeys,
  segmentPresenceCaveats,
  type WindowComparison,
  type WindowSide,
} from './growth-compare.js';
import { rankByGrowthRate } from './growth-rate-rank.js';
import { minGroupSize, suppressedSegmentsCaveat } from './small-groups.js';
import type { Reading, Template } from './template.js';

/** Segments named one by one before the rest are folded into "All others". */
export const DRIVERS_TOP_N = 8;

export const growthDriversTemplate: Template = {
  compile: (sq, ctx) => [{ name: 'drivers', ...compileWindowComparison(sq, ctx) }],
  read: (sq, tables, ctx) => readGrowthDrivers(sq, tables.drivers ?? { columns: [], rows: [], truncated: false }, ctx.coverage, ctx.dataset),
};

export function readGrowthDrivers(sq: SubQuestion, table: ResultTable, coverage: Coverage, dataset: DatasetConfig): Reading {
  const cmp = readWindowComparison(sq, table, coverage);
  const caveats: Caveat[] = [...cmp.caveats];
  if (cmp.empty) return { findings: [], caveats };
  caveats.push(...segmentPresenceCaveats(cmp));
  const findings: Finding[] = [];
  for (const metric of sq.metrics) {
    const finding = driversOf(sq, cmp, metric, addsAcrossSegments(metricByName(dataset, metric)), caveats, dataset);
    if (finding) findings.push(finding);
  }
  const small = foldedMembers(cmp);
  const minimum = minGroupSize(dataset);
  if (cmp.smallSegments > 0 && minimum !== null) caveats.push(suppressedSegmentsCaveat(cmp.smallSegments, minimum, { dimension: sq.dimension! }, cmp.complementSegments));
  return { findings, caveats };
}

function driversOf(
  sq: SubQuestion,
  cmp: WindowComparison,
  metric: string,
  additive: boolean,
  caveats: Caveat[],
  dataset: DatasetConfig,
): GrowthDriversFinding | null {
  // Asked per day: every figure of a span is divided by its days (the sums still add up, per day).
  const days = perDaySpanDays(sq, dataset, metric, cmp);
  const perDayOf = (v: number | null | undefined, d: number | undefined) => (v === null || v === undefined || d === undefined ? v : v / d);
  const rawBefore = cmp.prior.total?.values[metric] ?? null;
  const rawAfter = cmp.current.total?.values[metric] ?? null;
  const totalBefore = perDayOf(rawBefore, days?.before) ?? null;
  const totalAfter = perDayOf(rawAfter, days?.after) ?? null;
  if (totalBefore === null && totalAfter === null) {
    caveats.push({ code: 'all_null', data: { metric } });
    return null;
  }
  // A sum over no rows is zero, not unknown, once the side has data at all; for other metrics it stays unknown.
  const priorHasRows = (cmp.prior.total?.rows ?? 0) > 0;
  const currentHasRows = (cmp.current.total?.rows ?? 0) > 0;
  const sideValue = (present: number | null | undefined, hasRows: boolean, d?: number) =>
    present !== undefined ? perDayOf(present, d) ?? null : additive && hasRows ? 0 : null;
  const totalChange = totalBefore !== null && totalAfter !== null ? totalAfter - totalBefore : null;
  const pairs = segmentKeys(cmp).map((segment) => ({
    segment,
    before: sideValue(cmp.prior.segments.get(segment)?.values[metric], priorHasRows, days?.before),
    after: sideValue(cmp.current.segments.get(segment)?.values[metric], currentHasRows, days?.after),
  }));
  const compared = [totalBefore, totalAfter, ...pairs.flatMap((p) => [p.before, p.after])];
  const relative = relativeRule(metricByName(dataset, metric), additive, compared);
  // No percentage of the metric applies at all (an interval scale, or values at or below zero):
  // no rate is missing for want of a base, so no caveat says one is.
  const scale = metricPercentScale(metricByName(dataset, metric), compared, additive);
  const noPercents = scale.interval || (!additive && scale.signed);
  const all: GrowthDriverSegment[] = pairs.map((p) => withShares(p, additive, totalBefore, totalChange, relative));
  // A ratio's change in a tiny segment is mostly noise, so segments of a metric that does not add up
  // are ranked by their change weighted by their share of the current rows.
  const rows = cmp.current.total?.rows ?? 0;
  const weight = (s: GrowthDriverSegment) => (additive || rows === 0 ? 1 : (cmp.current.segments.get(s.segment)?.rows ?? 0) / rows);
  all.sort((a, b) => byWeightedChange(a, b, weight));
  const priorRows = cmp.prior.total?.rows ?? 0;
  for (const s of all) s.baseShare = baseShareOf(s, additive, totalBefore, priorRows > 0 ? (cmp.prior.segments.get(s.segment)?.rows ?? 0) / priorRows : null);
  // "Which channel is growing fastest": ranked by rate, so a small fast segment is named, not folded.
  // Segments not there through both spans have no like-for-like rate and are not ranked.
  const notThroughout = new Set(cmp.changed.map((c) => c.segment));
  const byRate = sq.growthRank ? rankByGrowthRate(all.filter((s) => !notThroughout.has(s.segment)), sq.growthRank, additive && !days && metricByName(dataset, metric).unit === 'count', metricByName(dataset, metric).unit === 'percent') : undefined;
  if (byRate) {
    const place = new Map(byRate.segments.map((seg, i) => [seg, i]));
    all.sort((a, b) => (place.get(a.segment) ?? Infinity) - (place.get(b.segment) ?? Infinity));
  }
  const segments = all.slice(0, DRIVERS_TOP_N);
  const tail = all.slice(DRIVERS_TOP_N);
  // Segments below the minimum group size arrive already combined (one row per side).
  const small = foldedMembers(cmp);
  const smallRow = small > 0
    ? { before: sideValue(cmp.prior.folded?.values[metric], priorHasRows, days?.before), after: sideValue(cmp.current.folded?.values[metric], currentHasRows, days?.after) }
    : null;
  let others: GrowthDriversFinding['others'] = null;
  if (tail.length > 0 || smallRow) {
    const parts = [...tail.map((s) => ({ before: s.before, after: s.after })), ...(smallRow ? [smallRow] : [])];
    // The database's fold alone is its own value (a ratio combined in SQL is still a ratio); parts add up only for sums and counts.
    const sum = (pick: (s: { before: number | null; after: number | null }) => number | null) =>
      tail.length === 0 && smallRow ? pick(smallRow) : additive && parts.every((s) => pick(s) !== null) ? parts.reduce((acc, s) => acc + pick(s)!, 0) : null;
    const folded = withShares({ segment: null, before: sum((s) => s.before), after: sum((s) => s.after) }, additive, totalBefore, totalChange, relative);
    others = {
      before: folded.before,
      after: folded.after,
      change: folded.change,
      relative: folded.relative,
      shareOfChange: folded.shareOfChange,
      contribution: folded.contribution,
      count: tail.length + small,
    };
    // Ranked by their change, the folded ones moved less; they need not be smaller.
    if (tail.length > 0) caveats.push({ code: 'segments_folded', data: { count: tail.length, metric, folded: 'change' } });
  }
  const undefinedRates = all.filter((s) => s.after !== null && s.before !== null && s.relative === null).length;
  const totalRelative = relative(totalBefore, totalAfter);
  if (!noPercents && (undefinedRates > 0 || (totalRelative === null && totalBefore !== null && totalAfter !== null))) {
    caveats.push({ code: 'base_zero', data: { metric, count: undefinedRates + (totalRelative === null ? 1 : 0) } });
  }
  return {
    type: 'growth_drivers',
    metric,
    dimension: sq.dimension!,
    current: cmp.currentSpan,
    prior: cmp.priorSpan,
    additive,
    total: { before: totalBefore, after: totalAfter, change: totalChange, relative: totalRelative },
    segments,
    others,
    likeForLike: likeForLikeOf(cmp, metric, additive, relative, days),
    ...(byRate ? { byRate } : {}),
    ...offsetOf(all, additive, small),
    ...(days ? { perDay: { days, totals: { before: rawBefore, after: rawAfter, change: rawBefore !== null && rawAfter !== null ? rawAfter - rawBefore : null, relative: relative(rawBefore, rawAfter) } } } : {}),
  };
}

/**
 * The rises and the falls of every segment added up, for a sum or count whose segments moved both
 * ways; absent when some segments arrive combined by the database (their own moves are unknown).
 */
function offsetOf(all: readonly GrowthDriverSegment[], additive: boolean, combined: number): Pick<GrowthDriversFinding, 'offset'> {
  if (!additive || combined > 0) return {};
  const changes = all.map((s) => s.change).filter((c): c is number => c !== null);
  const rises = changes.filter((c) => c > 0).reduce((a, b) => a + b, 0);
  const falls = changes.filter((c) => c < 0).reduce((a, b) => a + b, 0);
  return rises > 0 && falls < 0 ? { offset: { rises, falls } } : {};
}

/** The segment's share of the earlier span's base: its value for a sum or count, its rows otherwise. */
function baseShareOf(s: GrowthDriverSegment, additive: boolean, totalBefore: number | null, rowShare: number | null): number | null {
  if (!additive) return rowShare;
  return s.before !== null && totalBefore !== null && totalBefore > 0 ? finite(s.before / totalBefore) : null;
}

/** The like-for-like total, when some segment was not there through both spans and both spans have data. */
function likeForLikeOf(cmp: WindowComparison, metric: string, additive: boolean, relativeOf: RelativeRule, days: { before: number; after: number } | null): GrowthDriversFinding['likeForLike'] {
  if (cmp.changed.length === 0 || !cmp.prior.total?.rows || !cmp.current.total?.rows) return null;
  // No segment through both spans: a sum over none is zero, a ratio over none unknown.
  const side = (s: WindowSide) => (s.likeForLike ? (s.likeForLike.values[metric] ?? null) : additive ? 0 : null) ?? null;
  const before = days ? divide(side(cmp.prior), days.before) : side(cmp.prior);
  const after = days ? divide(side(cmp.current), days.after) : side(cmp.current);
  return {
    before,
    after,
    change: before !== null && after !== null ? after - before : null,
    relative: relativeOf(before, after),
    excluded: cmp.changed,
  };
}

function withShares(
  s: { segment: string | null; before: number | null; after: number | null },
  additive: boolean,
  totalBefore: number | null,
  totalChange: number | null,
  relativeOf: RelativeRule,
): GrowthDriverSegment {
  const change = s.before !== null && s.after !== null ? s.after - s.before : null;
  return {
    ...s,
    change,
    relative: relativeOf(s.before, s.after),
    shareOfChange: additive && change !== null && totalChange !== null && totalChange !== 0 ? finite(change / totalChange) : null,
    contribution: additive && change !== null && totalBefore !== null && totalBefore > 0 ? finite(change / totalBefore) : null,
  };
}

type RelativeRule = (before: number | null, after: number | null) => number | null;

/**
 * Where a percentage change is given (stats/growth percentScale). A sum or count: each segment
 * against its own two values, since segments of very different sizes are all real bases. An
 * average or ratio: one scale over every value compared, so a segment averaging near zero against
 * a typical level of minutes gets no percentage, and none is given at all once any value is at or
 * below zero (an average delay from 10.4 to −0.07 min is "−10.5 min", not "−100.7%"). A metric on
 * an interval scale (°C) gets none either (catalog.ts metricPercentScale, the one rule).
 */
function relativeRule(metric: Metric, additive: boolean, values: readonly (number | null)[]): RelativeRule {
  if (additive) return (before, after) => percentChange(before, after, metricPercentScale(metric, [before, after], true));
  const scale = metricPercentScale(metric, values, false);
  return (before, after) => percentChange(before, after, scale);
}

/** Largest (weighted) absolute change first; unknown changes last; ties by segment so the order never depends on row order. */
function byWeightedChange(a: GrowthDriverSegment, b: GrowthDriverSegment, weight: (s: GrowthDriverSegment) => number): number {
  const x = a.change === null ? -1 : Math.abs(a.change) * weight(a);
  const y = b.change === null ? -1 : Math.abs(b.change) * weight(b);
  if (x !== y) return y - x;
  const ka = a.segment ?? '\uffff';
  const kb = b.segment ?? '\uffff';
  return ka < kb ? -1 : ka > kb ? 1 : 0;
}

function divide(v: number | null, d: number): number | null {
  return v === null ? null : v / d;
}

function finite(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}
