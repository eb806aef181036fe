// The frame every chart shares: white page, accent rule, title, subtitle, optional legend
// row, and the small print at the bottom. The chart itself goes in `plot`.
import type { SKRSContext2D } from '@napi-rs/canvas';
import type { Box } from './geometry.js';
import type { ChartHeader } from './spec.js';
import { wrapText } from './text.js';
import { font, INK, layoutUnit, OKABE_ITO } from './theme.js';

export type SwatchShape = 'line' | 'dashed' | 'box' | 'hollow' | 'whisker' | 'line-dot';

export interface LegendItem {
  label: string;
  color: string;
  shape: SwatchShape;
}

export interface FrameLayout {
  width: number;
  height: number;
  /** Layout unit (1 at 1200×675). */
  u: number;
  margin: number;
  title: { lines: string[]; size: number; lineHeight: number; top: number };
  subtitle: { lines: string[]; size: number; lineHeight: number; top: number };
  legend: { items: LegendItem[]; size: number; top: number };
  footer: { lines: string[]; size: number; lineHeight: number; top: number };
  /** Space left for the chart, in layout pixels. */
  plot: Box;
}

const FOOTER_SEPARATOR = '  ·  ';

export function layoutFrame(ctx: SKRSContext2D, header: ChartHeader, legend: LegendItem[] = []): FrameLayout {
  const { width, height } = header;
  const u = layoutUnit(width, height);
  const margin = Math.round(32 * u);
  const textWidth = width - 2 * margin;

  const titleSize = 30 * u;
  ctx.font = font(titleSize, true);
  const titleLines = header.title.trim() === '' ? [] : wrapText(ctx, header.title, textWidth, 2);
  const titleTop = 46 * u;
  const titleLH = titleSize * 1.22;

  const subtitleSize = 18 * u;
  ctx.font = font(subtitleSize);
  const subtitleLines = header.subtitle.trim() === '' ? [] : wrapText(ctx, header.subtitle, textWidth, 2);
  const subtitleTop = titleTop + titleLines.length * titleLH + 6 * u;
  const subtitleLH = subtitleSize * 1.3;

  let cursor = subtitleTop + subtitleLines.length * subtitleLH;
  const legendSize = 14 * u;
  const legendTop = cursor + 12 * u;
  if (legend.length > 0) cursor = legendTop + legendSize * 1.4;

  const footerSize = 12.5 * u;
  const footerLH = footerSize * 1.4;
  ctx.font = font(footerSize);
  const footerText = header.footer.map((f) => f.trim()).filter((f) => f !== '').join(FOOTER_SEPARATOR);
  const footerLines = footerText === '' ? [] : wrapText(ctx, footerText, textWidth, 3);
  const bottomMargin = 16 * u;
  const footerTop = height - bottomMargin - footerLines.length * footerLH;
  const plotBottom = footerLines.length > 0 ? footerTop - 16 * u : height - bottomMargin;

  return {
    width,
    height,
    u,
    margin,
    title: { lines: titleLines, size: titleSize, lineHeight: titleLH, top: titleTop },
    subtitle: { lines: subtitleLines, size: subtitleSize, lineHeight: subtitleLH, top: subtitleTop },
    legend: { items: legend, size: legendSize, top: legendTop },
    footer: { lines: footerLines, size: footerSize, lineHeight: footerLH, top: footerTop },
    plot: { left: margin, top: cursor + 18 * u, right: width - margin, bottom: plotBottom },
  };
}

/** Paints the page and the frame texts; the context is in layout pixels. */
export function drawFrame(ctx: SKRSContext2D, layout: FrameLayout): void {
  const { u, margin } = layout;
  ctx.save();
  ctx.fillStyle = INK.background;
  ctx.fillRect(0, 0, layout.width, layout.height);

  // The house mark: a short two-tone rule above the title.
  ctx.fillStyle = OKABE_ITO.blue;
  ctx.fillRect(margin, 24 * u, 36 * u, 5 * u);
  ctx.fillStyle = OKABE_ITO.skyBlue;
  ctx.fillRect(margin + 36 * u, 24 * u, 14 * u, 5 * u);

  ctx.textBaseline = 'top';
  ctx.textAlign = 'left';
  ctx.fillStyle = INK.title;
  ctx.font = font(layout.title.size, true);
  layout.title.lines.forEach((line, i) => ctx.fillText(line, margin, layout.title.top + i * layout.title.lineHeight));

  ctx.fillStyle = INK.text;
  ctx.font = font(layout.subtitle.size);
  layout.subtitle.lines.forEach((line, i) =>
    ctx.fillText(line, margin, layout.subtitle.top + i * layout.subtitle.lineHeight),
  );

  drawLegend(ctx, layout);

  if (layout.footer.lines.length > 0) {
    ctx.strokeStyle = INK.grid;
    ctx.lineWidth = Math.max(1, u);
    ctx.beginPath();
    const y = layout.footer.top - 8 * u;
    ctx.moveTo(margin, y);
    ctx.lineTo(layout.width - margin, y);
    ctx.stroke();
    ctx.fillStyle = INK.muted;
    ctx.font = font(layout.footer.size);
    layout.footer.lines.forEach((line, i) =>
      ctx.fillText(line, margin, layout.footer.top + i * layout.footer.lineHeight),
    );
  }
  ctx.restore();
}

function drawLegend(ctx: SKRSContext2D, layout: FrameLayout): void {
  const { items, size, top } = layout.legend;
  if (items.length === 0) return;
  const u = layout.u;
  const swatchW = 26 * u;
  const midY = top + size * 0.6;
  let x = layout.margin;
  ctx.font = font(size);
  ctx.textBaseline = 'middle';
  for (const item of items) {
    drawSwatch(ctx, item, x, midY, swatchW, u);
    x += swatchW + 8 * u;
    ctx.fillStyle = INK.text;
    ctx.fillText(item.label, x, midY);
    x += ctx.measureText(item.label).width + 26 * u;
  }
  ctx.textBaseline = 'top';
}

function drawSwatch(ctx: SKRSContext2D, item: LegendItem, x: number, y: number, w: number, u: number): void {
  ctx.save();
  ctx.strokeStyle = item.color;
  ctx.fillStyle = item.color;
  ctx.lineWidth = 3 * u;
  switch (item.shape) {
    case 'box':
      ctx.fillRect(x + 4 * u, y - 7 * u, w - 8 * u, 14 * u);
      break;
    case 'line':
    case 'dashed':
    case 'line-dot':
      if (item.shape === 'dashed') ctx.setLineDash([6 * u, 4 * u]);
      ctx.beginPath();
      ctx.moveTo(x, y);
      ctx.lineTo(x + w, y);
      ctx.stroke();
      if (item.shape === 'line-dot') {
        ctx.beginPath();
        ctx.arc(x + w / 2, y, 4.5 * u, 0, Math.PI * 2);
        ctx.fill();
      }
      break;
    case 'hollow':
      ctx.setLineDash([5 * u, 4 * u]);
      ctx.lineWidth = 2.5 * u;
      ctx.beginPath();
      ctx.moveTo(x, y);
      ctx.lineTo(x + w - 8 * u, y);
      ctx.stroke();
      ctx.setLineDash([]);
      ctx.fillStyle = INK.background;
      ctx.beginPath();
      ctx.arc(x + w - 6 * u, y, 5 * u, 0, Math.PI * 2);
      ctx.fill();
      ctx.stroke();
      break;
    case 'whisker':
      ctx.lineWidth = 2 * u;
      ctx.beginPath();
      ctx.moveTo(x + 3 * u, y);
      ctx.lineTo(x + w - 3 * u, y);
      ctx.moveTo(x + 3 * u, y - 6 * u);
      ctx.lineTo(x + 3 * u, y + 6 * u);
      ctx.moveTo(x + w - 3 * u, y - 6 * u);
      ctx.lineTo(x + w - 3 * u, y + 6 * u);
      ctx.stroke();
      break;
  }
  ctx.restore();
}
