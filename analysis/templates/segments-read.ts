// Reading the folded segment rows back: one key per segment (the fold last), and the
// per-segment gap and late-start checks shared by the segment templates.
import type { SegmentKey } from '../findings/segments.js';
import type { Caveat, CellValue, Grain, ResultTable } from '../types.js';
import type { FoldedAs } from './segments-fold-sql.js';
import { suppressedSegmentsCaveat } from './small-groups.js';
import { numberOrNull } from './trend-points.js';

export interface FoldedRow extends SegmentKey {
  /** Map key that tells the missing-value segment (null) from the fold. */
  id: string;
  value: number | null;
  rowCount: number;
  row: Record<string, CellValue>;
}

export function segmentId(segment: string | null, other: boolean): string {
  return other ? 'other' : segment === null ? 'missing' : `v:${segment}`;
}

export function foldedRow(r: Record<string, CellValue>): FoldedRow {
  const other = r.other === true;
  const segment = other || r.segment === null || r.segment === undefined ? null : String(r.segment);
  return {
    id: segmentId(segment, other),
    segment,
    other,
    members: numberOrNull(r.members) ?? 1,
    rank: numberOrNull(r.seg_rank) ?? Number.MAX_SAFE_INTEGER,
    value: numberOrNull(r.value),
    rowCount: numberOrNull(r.row_count) ?? 0,
    row: r,
  };
}

/** Segment totals in rank order, the fold last. */
export function readSegmentTotals(table: ResultTable): FoldedRow[] {
  return table.rows.map(foldedRow).sort((a, b) => Number(a.other) - Number(b.other) || a.rank - b.rank);
}

/**
 * What the "All others" row holds: segments past the top N (`segments_folded`), and segments below
 * the minimum group size with any folded beside them so they cannot be worked out from the total
 * (`suppressed_small_groups`, counted by the query's small_members and complement_members).
 */
export function foldedCaveats(rows: readonly FoldedRow[], dimension: string, minimum: number | null, folded: FoldedAs): Caveat[] {
  const fold = rows.find((r) => r.other);
  if (!fold) return [];
  const small = minimum === null ? 0 : (numberOrNull(fold.row.small_members) ?? 0);
  const complement = minimum === null ? 0 : (numberOrNull(fold.row.complement_members) ?? 0);
  // Segments too thin to rank by an average's value (see RANK_FLOOR); one also below the minimum group size is counted there.
  const thin = Math.max(0, (numberOrNull(fold.row.thin_members) ?? 0) - small);
  const minRows = numberOrNull(fold.row.rank_min_rows);
  const out: Caveat[] = [];
  const rankedOut = fold.members - small - complement - thin;
  // Ranked by value, the segments past those named are smaller only for a sum ranked largest first.
  if (rankedOut > 0) out.push({ code: 'segments_folded', data: { count: rankedOut, dimension, folded } });
  if (thin > 0 && minRows !== null) out.push({ code: 'segments_folded', data: { count: thin, dimension, minRows } });
  if (small > 0 && minimum !== null) out.push(suppressedSegmentsCaveat(small, minimum, { dimension }, complement));
  return out;
}

/**
 * Gaps and late starts of one named segment over the window's complete periods: a late start
 * when its first row comes after the window's first complete period, a gap for each complete period
 * after its first row with no row at all.
 */
export function segmentCoverageCaveats(
  key: SegmentKey,
  dimension: string,
  grain: Grain,
  starts: readonly string[],
  partial: ReadonlySet<string>,
  periodsWithRows: ReadonlySet<string>,
): Caveat[] {
  if (key.other) return [];
  const caveats: Caveat[] = [];
  const segment = key.segment ?? '(missing)';
  const firstIdx = starts.findIndex((p) => periodsWithRows.has(p));
  if (firstIdx < 0) return caveats;
  // Late only when it starts after the window's first complete period: a league that starts in
  // August of data that opens on 20 July (a partial month) is there from the start.
  const firstComplete = starts.findIndex((p) => !partial.has(p));
  if (firstIdx > Math.max(0, firstComplete)) caveats.push({ code: 'late_segment', data: { segment, dimension, firstPeriod: starts[firstIdx]!, grain } });
  const gaps = starts.slice(firstIdx).filter((p) => !partial.has(p) && !periodsWithRows.has(p));
  if (gaps.length > 0) {
    caveats.push({ code: 'segment_gap', data: { segment, dimension, periods: gaps.length, firstGap: gaps[0]!, lastGap: gaps[gaps.length - 1]!, grain } });
  }
  return caveats;
}
