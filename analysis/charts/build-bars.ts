import { formatValue, type ValueFormat } from '../format.js';
import { headerOf } from './header.js';
import type { Bar, BarsSpec, ChartHeader } from './spec.js';

export interface SegmentValue {
  label: string;
  value: number;
}

export interface BarsInput extends ChartHeader {
  items: SegmentValue[];
  format: ValueFormat;
  /** Bars shown before the tail is folded into one "All others" bar (default 8). */
  topN?: number;
  /** Label of the folded bar (default "All others"); the count of folded segments is appended. */
  othersLabel?: string;
  /**
   * The tail was folded upstream (in SQL): the remainder's bar, drawn last in the neutral
   * "other" colour whatever its value, or null when nothing was left over. Either way `items`
   * are the named segments as the caller chose them and are not folded again (`topN` is unused).
   */
  folded?: SegmentValue | null;
  /**
   * Colour bars by sign, as the KPI card does: the good direction blue, the bad vermillion.
   * Leave out for values that have no good direction (shares, plain totals).
   */
  higherIsBetter?: boolean;
  /** Write the value labels with a sign ("+€32.9K", "−€19.2K"), for changes. */
  signed?: boolean;
}

export const DEFAULT_TOP_N = 8;

export function buildBars(input: BarsInput): BarsSpec {
  const folded = foldTail(input.items, input.topN ?? DEFAULT_TOP_N, input.othersLabel ?? 'All others', input.folded);
  const bars: Bar[] = folded.map((s) => ({
    label: s.label,
    value: s.value,
    text: formatValue(s.value, input.format, { compact: true, ...(input.signed ? { signed: true } : {}) }),
    other: s.other,
  }));
  const spec: BarsSpec = { kind: 'bars', ...headerOf(input), format: { ...input.format }, bars };
  if (input.higherIsBetter !== undefined) spec.higherIsBetter = input.higherIsBetter;
  return spec;
}

/**
 * Sorts segments by value, descending (ties by label, so output is stable), and folds
 * everything past the first `topN` into one bar. Folding a single segment would hide its
 * name for no gain, so a tail of one is shown as itself. When the caller folded upstream
 * (`folded` given, even null), nothing is folded here and the remainder, if any, comes last.
 */
export function foldTail(
  items: SegmentValue[],
  topN: number,
  othersLabel: string,
  folded?: SegmentValue | null,
): (SegmentValue & { other: boolean; count: number })[] {
  const n = Math.max(1, Math.floor(topN));
  const sorted = items
    .filter((s) => Number.isFinite(s.value))
    .slice()
    .sort((a, b) => b.value - a.value || a.label.localeCompare(b.label));
  const head = sorted.map((s) => ({ label: s.label, value: s.value, other: false, count: 1 }));
  if (folded !== undefined) {
    // The upstream fold's segment count is in its label already; 0 here means "not known".
    return folded && Number.isFinite(folded.value) ? [...head, { label: folded.label, value: folded.value, other: true, count: 0 }] : head;
  }
  if (sorted.length <= n + 1) return head;
  const tail = sorted.slice(n);
  const value = tail.reduce((sum, s) => sum + s.value, 0);
  return [...head.slice(0, n), { label: `${othersLabel} (${tail.length})`, value, other: true, count: tail.length }];
}
