// Template "growth_share_shift": how each segment's share of the total moved against the same
// dates a year earlier (growth × distribution), with concentration before and after.
import type { DatasetConfig } from '../../config/schema.js';
import { addsAcrossSegments, metricByName } from '../catalog.js';
import type { Coverage } from '../coverage.js';
import type { GrowthConcentration, GrowthShareSegment, GrowthShareShiftFinding } from '../findings/growth.js';
import { concentration } from '../stats/index.js';
import type { Caveat, Finding, ResultTable, SubQuestion } from '../types.js';
import { compileWindowComparison, foldedMembers, readWindowComparison, segmentKeys, segmentPresenceCaveats } from './growth-compare.js';
import { minGroupSize, suppressedSegmentsCaveat } from './small-groups.js';
import type { Reading, Template } from './template.js';

export const SHARE_TOP_N = 10;
/** The "80%" of the 80/20 rule of thumb (common practice). */
export const SHARE_THRESHOLD = 0.8;

export const growthShareShiftTemplate: Template = {
  compile: (sq, ctx) => [{ name: 'shares', ...compileWindowComparison(sq, ctx) }],
  read: (sq, tables, ctx) => readGrowthShareShift(sq, tables.shares ?? { columns: [], rows: [], truncated: false }, ctx.coverage, ctx.dataset),
};

export function readGrowthShareShift(sq: SubQuestion, table: ResultTable, coverage: Coverage, dataset: DatasetConfig): Reading {
  const cmp = readWindowComparison(sq, table, coverage);
  const caveats: Caveat[] = [...cmp.caveats];
  if (cmp.empty) return { findings: [], caveats };
  caveats.push(...segmentPresenceCaveats(cmp));
  const findings: Finding[] = [];
  const keys = segmentKeys(cmp);
  // Segments below the minimum group size arrive combined; they count in the totals as one part.
  const small = foldedMembers(cmp);
  const ids = [...keys.map((k) => (k === null ? 'missing' : `v:${k}`)), ...(small > 0 ? ['other'] : [])];
  for (const metric of sq.metrics) {
    // Shares of a total need parts that add up to it; a ratio or an average has no such parts.
    if (!addsAcrossSegments(metricByName(dataset, metric))) continue;
    const foldBefore = small > 0 ? (cmp.prior.folded?.values[metric] ?? 0) : null;
    const foldAfter = small > 0 ? (cmp.current.folded?.values[metric] ?? 0) : null;
    const before = [...keys.map((k) => cmp.prior.segments.get(k)?.values[metric] ?? 0), ...(foldBefore === null ? [] : [foldBefore])];
    const after = [...keys.map((k) => cmp.current.segments.get(k)?.values[metric] ?? 0), ...(foldAfter === null ? [] : [foldAfter])];
    if (
      keys.every((k) => cmp.prior.segments.get(k)?.values[metric] == null && cmp.current.segments.get(k)?.values[metric] == null) &&
      cmp.prior.folded?.values[metric] == null &&
      cmp.current.folded?.values[metric] == null
    ) {
      caveats.push({ code: 'all_null', data: { metric } });
      continue;
    }
    const conBefore = concentrationOf(ids, before, caveats, metric);
    const conAfter = concentrationOf(ids, after, caveats, metric);
    const share = (values: number[], c: ReturnType<typeof concentrationOf>, i: number) =>
      c.total !== null && c.total > 0 && c.valid ? values[i]! / c.total : null;
    const rows: GrowthShareSegment[] = keys.map((segment, i) => {
      const shareBefore = share(before, conBefore, i);
      const shareAfter = share(after, conAfter, i);
      return {
        segment,
        before: before[i]!,
        after: after[i]!,
        shareBefore,
        shareAfter,
        shareChange: shareBefore !== null && shareAfter !== null ? shareAfter - shareBefore : null,
      };
    });
    rows.sort((a, b) => (b.shareAfter ?? b.after ?? 0) - (a.shareAfter ?? a.after ?? 0) || compareKeys(a.segment, b.segment));
    const head = rows.slice(0, SHARE_TOP_N);
    const tail = rows.slice(SHARE_TOP_N);
    if (small > 0) {
      const i = keys.length;
      const shareBefore = share(before, conBefore, i);
      const shareAfter = share(after, conAfter, i);
      tail.push({ segment: null, before: before[i]!, after: after[i]!, shareBefore, shareAfter, shareChange: shareBefore !== null && shareAfter !== null ? shareAfter - shareBefore : null });
    }
    let others: GrowthShareShiftFinding['others'] = null;
    if (tail.length > 0) {
      const sum = (pick: (s: GrowthShareSegment) => number | null) =>
        tail.every((s) => pick(s) !== null) ? tail.reduce((acc, s) => acc + pick(s)!, 0) : null;
      const shareBefore = sum((s) => s.shareBefore);
      const shareAfter = sum((s) => s.shareAfter);
      others = {
        count: tail.length - (small > 0 ? 1 : 0) + small,
        before: sum((s) => s.before),
        after: sum((s) => s.after),
        shareBefore,
        shareAfter,
        shareChange: shareBefore !== null && shareAfter !== null ? shareAfter - shareBefore : null,
      };
      if (tail.length > (small > 0 ? 1 : 0)) // Ranked by their share in the later span: the folded ones may have been larger before.
      if (tail.length > (small > 0 ? 1 : 0)) caveats.push({ code: 'segments_folded', data: { count: tail.length - (small > 0 ? 1 : 0), metric, folded: 'later_share' } });
    }
    const finding: GrowthShareShiftFinding = {
      type: 'growth_share_shift',
      metric,
      dimension: sq.dimension!,
      current: cmp.currentSpan,
      prior: cmp.priorSpan,
      threshold: SHARE_THRESHOLD,
      segments: head,
      others,
      before: conBefore.summary,
      after: conAfter.summary,
    };
    findings.push(finding);
  }
  const minimum = minGroupSize(dataset);
  if (cmp.smallSegments > 0 && minimum !== null) caveats.push(suppressedSegmentsCaveat(cmp.smallSegments, minimum, { dimension: sq.dimension! }, cmp.complementSegments));
  return { findings, caveats };
}

function concentrationOf(keys: string[], values: number[], caveats: Caveat[], metric: string) {
  const total = values.reduce((a, v) => a + v, 0);
  const present = values.filter((v) => v !== 0).length;
  const summary: GrowthConcentration = { total: values.length ? total : null, segments: present, hhi: null, countToThreshold: null };
  if (values.length === 0) return { total: null, valid: false, summary };
  const c = concentration(
    keys.map((k, i) => ({ key: k, value: values[i]! })),
    { threshold: SHARE_THRESHOLD },
  );
  if (c.kind === 'negative_values') {
    caveats.push({ code: 'negative_amounts', data: { count: c.negativeKeys.length, column: metric } });
    return { total, valid: false, summary };
  }
  if (c.kind === 'non_positive_total') {
    caveats.push({ code: 'base_zero', data: { metric, count: 1 } });
    return { total, valid: false, summary };
  }
  return { total: c.total, valid: true, summary: { ...summary, total: c.total, hhi: c.hhi, countToThreshold: c.countToThreshold } };
}

function compareKeys(a: string | null, b: string | null): number {
  return a === null ? 1 : b === null ? -1 : a < b ? -1 : a > b ? 1 : 0;
}
