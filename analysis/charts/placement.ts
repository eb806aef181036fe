// Label placement: try a few candidate boxes and keep the one that covers the least of what is
// already drawn (lines, bars, other labels), so annotations never sit on the data they explain.
import type { Box, Point } from './geometry.js';

export interface Segment {
  a: Point;
  b: Point;
}

/** Something a label should not cover, and how much covering it costs. */
export type Obstacle = { kind: 'box'; box: Box; weight: number } | { kind: 'segment'; segment: Segment; weight: number };

export interface Candidate {
  box: Box;
  /** Preference among candidates that cover nothing: lower wins. */
  penalty: number;
}

export function boxesOverlap(a: Box, b: Box): boolean {
  return a.left < b.right && b.left < a.right && a.top < b.bottom && b.top < a.bottom;
}

export function inflate(box: Box, by: number): Box {
  return { left: box.left - by, top: box.top - by, right: box.right + by, bottom: box.bottom + by };
}

export function boxInside(inner: Box, outer: Box): boolean {
  return inner.left >= outer.left - 0.5 && inner.right <= outer.right + 0.5 && inner.top >= outer.top - 0.5 && inner.bottom <= outer.bottom + 0.5;
}

/** Whether segment a–b crosses or lies in `box` (Liang–Barsky clipping). */
export function segmentHitsBox({ a, b }: Segment, box: Box): boolean {
  const dx = b.x - a.x;
  const dy = b.y - a.y;
  let t0 = 0;
  let t1 = 1;
  const edges: [number, number][] = [
    [-dx, a.x - box.left],
    [dx, box.right - a.x],
    [-dy, a.y - box.top],
    [dy, box.bottom - a.y],
  ];
  for (const [p, q] of edges) {
    if (p === 0) {
      if (q < 0) return false;
      continue;
    }
    const r = q / p;
    if (p < 0) {
      if (r > t1) return false;
      if (r > t0) t0 = r;
    } else {
      if (r < t0) return false;
      if (r < t1) t1 = r;
    }
  }
  return t0 <= t1;
}

/** Segments joining consecutive finite points; a gap (NaN or null) breaks the line, as drawn. */
export function polyline(points: readonly (Point | null)[]): Segment[] {
  const out: Segment[] = [];
  for (let i = 1; i < points.length; i++) {
    const a = points[i - 1];
    const b = points[i];
    if (a && b && Number.isFinite(a.y) && Number.isFinite(b.y) && Number.isFinite(a.x) && Number.isFinite(b.x)) out.push({ a, b });
  }
  return out;
}

export function coverCost(box: Box, obstacles: readonly Obstacle[]): number {
  let cost = 0;
  for (const o of obstacles) {
    const hit = o.kind === 'box' ? boxesOverlap(box, o.box) : segmentHitsBox(o.segment, box);
    if (hit) cost += o.weight;
  }
  return cost;
}

/**
 * The candidate with the lowest cost: what it covers, plus its own penalty; candidates that
 * leave `bounds` cost most of all. Ties keep the earlier candidate.
 */
export function pickPlacement<C extends Candidate>(candidates: readonly C[], obstacles: readonly Obstacle[], bounds: Box): C {
  let best = candidates[0]!;
  let bestCost = Number.POSITIVE_INFINITY;
  for (const c of candidates) {
    const cost = coverCost(c.box, obstacles) + c.penalty + (boxInside(c.box, bounds) ? 0 : 10_000);
    if (cost < bestCost) {
      best = c;
      bestCost = cost;
    }
  }
  return best;
}
