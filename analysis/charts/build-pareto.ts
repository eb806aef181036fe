import { formatValue, type ValueFormat } from '../format.js';
import { foldTail, type SegmentValue } from './build-bars.js';
import { headerOf } from './header.js';
import type { ChartHeader, ParetoBar, ParetoSpec } from './spec.js';

export interface ParetoInput extends ChartHeader {
  items: SegmentValue[];
  format: ValueFormat;
  /** Axis title of the bars, e.g. "Revenue". */
  valueLabel: string;
  /** Bars shown before the tail is folded (default 10). */
  topN?: number;
  othersLabel?: string;
  /**
   * The tail was folded upstream (in SQL): the remainder (its bar last, in the neutral colour,
   * where the running share reaches 100%), or null when nothing was left over. Either way
   * `items` are not folded again.
   */
  folded?: SegmentValue | null;
  /** Reference share (default 0.8: the "80/20" line). */
  threshold?: number;
  /**
   * How many segments reach the threshold, out of how many, and what they are ("origin airports"),
   * when known over every segment (the count may lie inside the fold): said on the reference line.
   */
  reach?: { count: number; of: number; noun: string } | null;
}

/** A fold this many times the largest named bar would flatten them all: it is drawn broken. */
export const FOLD_BREAK_RATIO = 1.5;

export function buildPareto(input: ParetoInput): ParetoSpec {
  const threshold = input.threshold ?? 0.8;
  const folded = foldTail(input.items, input.topN ?? 10, input.othersLabel ?? 'All others', input.folded);
  // Shares of a total only make sense for non-negative parts; negatives count as zero.
  const total = folded.reduce((sum, s) => sum + Math.max(0, s.value), 0);
  const shareFmt: ValueFormat = { unit: 'percent', decimals: 0, locale: input.format.locale };
  let running = 0;
  const bars: ParetoBar[] = folded.map((s) => {
    const share = total > 0 ? Math.max(0, s.value) / total : 0;
    running += share;
    const cumulative = Math.min(1, running);
    return {
      label: s.label,
      value: s.value,
      text: formatValue(s.value, input.format, { compact: true }),
      other: s.other,
      share,
      cumulative,
      cumulativeText: formatValue(cumulative, shareFmt),
    };
  });
  // A small tolerance so 0.8 accumulated in floating point still counts as reaching 80%.
  const thresholdIndex = total > 0 ? bars.findIndex((b) => b.cumulative >= threshold - 1e-9) : -1;
  const pct = formatValue(threshold, shareFmt);
  const count = (n: number) => formatValue(n, { unit: 'count', locale: input.format.locale });
  const reach = input.reach;
  const thresholdText = reach && reach.count > 0 ? `${pct} of total: ${count(reach.count)} of ${count(reach.of)} ${reach.noun}` : `${pct} of total`;
  const namedMax = Math.max(0, ...bars.filter((b) => !b.other).map((b) => b.value));
  const fold = bars.find((b) => b.other);
  const foldBroken = !!fold && namedMax > 0 && fold.value > FOLD_BREAK_RATIO * namedMax;
  return {
    kind: 'pareto',
    ...headerOf(input),
    format: { ...input.format },
    bars,
    threshold,
    thresholdIndex,
    thresholdText,
    foldBroken,
    valueLabel: input.valueLabel,
  };
}
