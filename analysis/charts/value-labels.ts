// Value labels laid out so that none overlaps another or leaves the plot: each label tries its
// spots in order of preference at the largest font that lets every label fit; when even the
// smallest font cannot, the labels that matter least (not a marked high or low) are left out
// rather than drawn over one another or cut short.
import type { SKRSContext2D } from '@napi-rs/canvas';
import type { Box } from './geometry.js';
import { boxesOverlap, boxInside, coverCost, inflate, type Obstacle } from './placement.js';

export interface ValueLabel {
  text: string;
  /** Placed first and left out last: the marked highs and lows come before the rest. */
  keep: boolean;
  /** Where the label's box may go, best first, for a label `w` × `h` (in layout pixels). */
  spots: (w: number, h: number) => Box[];
}

export interface PlacedLabel {
  /** Index into the labels given. */
  index: number;
  box: Box;
}

export interface LabelLayout {
  /** Font size chosen, in layout pixels. */
  size: number;
  placed: PlacedLabel[];
  /** Indices of the labels left out: no spot was free of the others at the smallest size. */
  dropped: number[];
}

export interface LabelLayoutOptions {
  /** Font sizes to try, largest first. */
  sizes: number[];
  font: (size: number) => string;
  /** Space kept between two labels' boxes. */
  gap: number;
  /** Drawn marks a label should rather not cover (bars, whiskers, lines), with their weights. */
  obstacles: readonly Obstacle[];
  bounds: Box;
}

/** Lays out `labels`; the caller draws each placed box's text (its box is the text's extent). */
export function layOutLabels(ctx: SKRSContext2D, labels: readonly ValueLabel[], opts: LabelLayoutOptions): LabelLayout {
  let last: LabelLayout | null = null;
  for (const size of opts.sizes) {
    ctx.font = opts.font(size);
    const layout = placeAll(ctx, labels, size, opts);
    if (layout.dropped.length === 0) return layout;
    last = layout;
  }
  return last ?? { size: opts.sizes[0] ?? 0, placed: [], dropped: labels.map((_, i) => i) };
}

function placeAll(ctx: SKRSContext2D, labels: readonly ValueLabel[], size: number, opts: LabelLayoutOptions): LabelLayout {
  const order = labels.map((_, i) => i).sort((a, b) => Number(labels[b]!.keep) - Number(labels[a]!.keep) || a - b);
  const placed: PlacedLabel[] = [];
  const dropped: number[] = [];
  for (const i of order) {
    const label = labels[i]!;
    const m = ctx.measureText(label.text);
    const h = m.actualBoundingBoxAscent + m.actualBoundingBoxDescent;
    let best: Box | null = null;
    let bestCost = Number.POSITIVE_INFINITY;
    label.spots(m.width, h).forEach((box, rank) => {
      if (!boxInside(box, opts.bounds)) return;
      if (placed.some((p) => boxesOverlap(inflate(box, opts.gap / 2), inflate(p.box, opts.gap / 2)))) return;
      // Covering a drawn mark costs its weight; among equals the earlier spot wins.
      const cost = coverCost(box, opts.obstacles) + rank * 0.01;
      if (cost < bestCost) {
        best = box;
        bestCost = cost;
      }
    });
    if (best) placed.push({ index: i, box: best });
    else dropped.push(i);
  }
  placed.sort((a, b) => a.index - b.index);
  return { size, placed, dropped: dropped.sort((a, b) => a - b) };
}
