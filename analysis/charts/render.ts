// Spec in, PNG out. The renderer never queries anything: everything it draws is in the spec.
import { createCanvas, type Canvas } from '@napi-rs/canvas';
import { writeFile } from 'node:fs/promises';
import { drawBars } from './draw-bars.js';
import { drawGroupCompare } from './draw-group-compare.js';
import { drawGrowthGrid } from './draw-growth-grid.js';
import { drawKpiCard } from './draw-kpi-card.js';
import { drawLine } from './draw-line.js';
import { drawPareto } from './draw-pareto.js';
import { drawPeriodTable } from './draw-period-table.js';
import { drawSeasonalProfile } from './draw-seasonal-profile.js';
import { ensureFonts } from './fonts.js';
import type { ChartGeometry, DrawResult } from './geometry.js';
import { encodePng } from './png.js';
import type { ChartSpec } from './spec.js';

export interface RenderResult {
  png: Buffer;
  /** Where the plot area, data points and marks landed, in device pixels. */
  geometry: ChartGeometry;
}

export async function renderChart(spec: ChartSpec): Promise<Buffer> {
  return (await renderChartWithGeometry(spec)).png;
}

export async function renderChartToFile(spec: ChartSpec, path: string): Promise<void> {
  await writeFile(path, await renderChart(spec));
}

export async function renderChartWithGeometry(spec: ChartSpec): Promise<RenderResult> {
  const { canvas, geometry, release } = drawChart(spec);
  try {
    const png = encodePng(canvas.data(), canvas.width, canvas.height);
    return { png, geometry };
  } finally {
    release();
  }
}

/**
 * The chart drawn on a canvas of its own; the caller encodes it or draws it into another canvas
 * (the digest does, which spares a PNG encode and decode per thumbnail), then calls `release`.
 */
export function drawChart(spec: ChartSpec): DrawResult & { canvas: Canvas } {
  ensureFonts();
  const sized = {
    ...spec,
    width: clampSize(spec.width, 1200),
    height: clampSize(spec.height, 675),
    scale: spec.scale === 2 ? 2 : 1,
  } as ChartSpec;
  // chart.js enlarges its canvas by devicePixelRatio itself; the direct-drawn kinds scale here.
  const canvas = createCanvas(sized.width, sized.height);
  return { canvas, ...draw(canvas, sized) };
}

function draw(canvas: Canvas, spec: ChartSpec): DrawResult {
  switch (spec.kind) {
    case 'line':
      return drawLine(canvas, spec);
    case 'bars':
      return drawBars(canvas, spec);
    case 'pareto':
      return drawPareto(canvas, spec);
    case 'growth_grid':
      return drawGrowthGrid(canvas, spec);
    case 'kpi_card':
      return drawKpiCard(canvas, spec);
    case 'group_compare':
      return drawGroupCompare(canvas, spec);
    case 'seasonal_profile':
      return drawSeasonalProfile(canvas, spec);
    case 'period_table':
      return drawPeriodTable(canvas, spec);
  }
}

function clampSize(n: number, fallback: number): number {
  return Number.isFinite(n) ? Math.min(4000, Math.max(200, Math.round(n))) : fallback;
}
