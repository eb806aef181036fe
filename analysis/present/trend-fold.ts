// The segment templates fold the tail in SQL, so the "All others" row arrives as one item. The
// bar and Pareto builders sort every item by value; these put the fold back last, flagged as the
// fold, and (for a Pareto) recompute the running shares in that order.
import { formatValue } from '../format.js';
import type { BarsSpec, ParetoSpec } from '../charts/spec.js';

export function barsWithFoldLast(spec: BarsSpec, foldLabel: string | null): BarsSpec {
  if (foldLabel === null) return spec;
  const fold = spec.bars.filter((b) => b.label === foldLabel).map((b) => ({ ...b, other: true }));
  return { ...spec, bars: [...spec.bars.filter((b) => b.label !== foldLabel), ...fold] };
}

export function paretoWithFoldLast(spec: ParetoSpec, foldLabel: string | null): ParetoSpec {
  if (foldLabel === null) return spec;
  const ordered = [...spec.bars.filter((b) => b.label !== foldLabel), ...spec.bars.filter((b) => b.label === foldLabel).map((b) => ({ ...b, other: true }))];
  const shareFmt = { unit: 'percent' as const, decimals: 0, locale: spec.format.locale };
  let running = 0;
  const bars = ordered.map((b) => {
    running += b.share;
    const cumulative = Math.min(1, running);
    return { ...b, cumulative, cumulativeText: formatValue(cumulative, shareFmt) };
  });
  const total = bars.reduce((a, b) => a + b.share, 0);
  return { ...spec, bars, thresholdIndex: total > 0 ? bars.findIndex((b) => b.cumulative >= spec.threshold - 1e-9) : -1 };
}
