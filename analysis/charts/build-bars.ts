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
}

export const DEFAULT_TOP_N = 8;

export function buildBars(input: BarsInput): BarsSpec {
  const folded = foldTail(input.items, input.topN ?? DEFAULT_TOP_N, input.othersLabel ?? 'All others');
  const bars: Bar[] = folded.map((s) => ({
    label: s.label,
    value: s.value,
    text: formatValue(s.value, input.format, { compact: true }),
    other: s.other,
  }));
  return { kind: 'bars', ...headerOf(input), format: { ...input.format }, bars };
}

/**
 * Sorts segments by value, descending (ties by label, so output is stable), and folds
 * everything past the first `topN` into one bar. Folding a single segment would hide its
 * name for no gain, so a tail of one is shown as itself.
 */
export function foldTail(
  items: SegmentValue[],
  topN: number,
  othersLabel: string,
): (SegmentValue & { other: boolean; count: number })[] {
  const n = Math.max(1, Math.floor(topN));
  const sorted = items
    .filter((s) => Number.isFinite(s.value))
    .slice()
    .sort((a, b) => b.value - a.value || a.label.localeCompare(b.label));
  const head = sorted.map((s) => ({ label: s.label, value: s.value, other: false, count: 1 }));
  if (sorted.length <= n + 1) return head;
  const tail = sorted.slice(n);
  const value = tail.reduce((sum, s) => sum + s.value, 0);
  return [...head.slice(0, n), { label: `${othersLabel} (${tail.length})`, value, other: true, count: tail.length }];
}
