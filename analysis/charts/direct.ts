// Setup for the kinds drawn straight onto the canvas, without chart.js.
import type { Canvas, SKRSContext2D } from '@napi-rs/canvas';
import { drawFrame, layoutFrame, type FrameLayout, type LegendItem } from './frame.js';
import type { ChartHeader } from './spec.js';

export function prepareDirect(
  canvas: Canvas,
  header: ChartHeader,
  legend: LegendItem[] = [],
): { ctx: SKRSContext2D; layout: FrameLayout } {
  canvas.width = header.width * header.scale;
  canvas.height = header.height * header.scale;
  const ctx = canvas.getContext('2d');
  ctx.setTransform(header.scale, 0, 0, header.scale, 0, 0);
  const layout = layoutFrame(ctx, header, legend);
  drawFrame(ctx, layout);
  return { ctx, layout };
}
