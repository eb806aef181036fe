// The frame every chart shares: white page, the header (a bold title; under it a chip naming the
// metric with the subtitle beside it; a full-width hairline closing the header), an optional
// legend row, and the small print at the bottom above a lighter hairline. The chart goes in `plot`.
import type { SKRSContext2D } from '@napi-rs/canvas';
import type { Box } from './geometry.js';
import type { ChartHeader } from './spec.js';
import { ellipsize, wrapText } from './text.js';
import { CHIP, font, INK, layoutUnit } from './theme.js';

export type SwatchShape = 'line' | 'dashed' | 'box' | 'hollow' | 'whisker' | 'line-dot' | 'ring';

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
  /** The metric's chip, left of the subtitle; null without one. */
  chip: { text: string; size: number; box: Box } | null;
  /** Subtitle lines start at `left` (right of the chip), each line as wide as the rest of the row. */
  subtitle: { lines: string[]; size: number; lineHeight: number; top: number; left: number };
  /** The hairline under the header, full width between the margins. */
  rule: { y: number; width: number };
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
  const titleTop = 26 * u;
  const titleLH = titleSize * 1.22;

  const subtitleSize = 18 * u;
  const subtitleLH = subtitleSize * 1.3;
  const subtitleTop = titleTop + titleLines.length * titleLH + 8 * u;
  const chip = layoutChip(ctx, header.chip, margin, subtitleTop, subtitleLH, u, textWidth / 3);
  const subtitleLeft = chip ? chip.box.right + 10 * u : margin;
  ctx.font = font(subtitleSize);
  const subtitleLines = header.subtitle.trim() === '' ? [] : wrapText(ctx, header.subtitle, width - margin - subtitleLeft, 2);

  const headerBottom = Math.max(subtitleTop + subtitleLines.length * subtitleLH, chip ? chip.box.bottom : 0);
  const ruleY = Math.round(headerBottom + 12 * u) + 0.5;
  let cursor = ruleY;
  const legendSize = 14 * u;
  const legendTop = cursor + 14 * u;
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
    chip,
    subtitle: { lines: subtitleLines, size: subtitleSize, lineHeight: subtitleLH, top: subtitleTop, left: subtitleLeft },
    rule: { y: ruleY, width: Math.max(1, u) },
    legend: { items: legend, size: legendSize, top: legendTop },
    footer: { lines: footerLines, size: footerSize, lineHeight: footerLH, top: footerTop },
    plot: { left: margin, top: cursor + 18 * u, right: width - margin, bottom: plotBottom },
  };
}

/** A rounded chip holding the metric's name, centred on the subtitle's first line; never wider than `maxWidth`. */
function layoutChip(ctx: SKRSContext2D, text: string | undefined, left: number, lineTop: number, lineHeight: number, u: number, maxWidth: number): FrameLayout['chip'] {
  const label = text?.trim() ?? '';
  if (label === '') return null;
  const size = 14 * u;
  const padX = 9 * u;
  ctx.font = font(size, true);
  const fitted = ellipsize(ctx, label, maxWidth - 2 * padX);
  const w = ctx.measureText(fitted).width + 2 * padX;
  const h = size * 1.75;
  const top = lineTop + (lineHeight - h) / 2;
  return { text: fitted, size, box: { left, top, right: left + w, bottom: top + h } };
}

/** Paints the page and the frame texts; the context is in layout pixels. */
export function drawFrame(ctx: SKRSContext2D, layout: FrameLayout): void {
  const { u, margin } = layout;
  ctx.save();
  ctx.fillStyle = INK.background;
  ctx.fillRect(0, 0, layout.width, layout.height);

  ctx.textBaseline = 'top';
  ctx.textAlign = 'left';
  ctx.fillStyle = INK.title;
  ctx.font = font(layout.title.size, true);
  layout.title.lines.forEach((line, i) => ctx.fillText(line, margin, layout.title.top + i * layout.title.lineHeight));

  if (layout.chip) drawChip(ctx, layout.chip, u);
  ctx.fillStyle = INK.text;
  ctx.font = font(layout.subtitle.size);
  layout.subtitle.lines.forEach((line, i) =>
    ctx.fillText(line, layout.subtitle.left, layout.subtitle.top + i * layout.subtitle.lineHeight),
  );

  // The hairline closing the header, margin to margin.
  ctx.strokeStyle = CHIP.rule;
  ctx.lineWidth = layout.rule.width;
  ctx.beginPath();
  ctx.moveTo(margin, layout.rule.y);
  ctx.lineTo(layout.width - margin, layout.rule.y);
  ctx.stroke();

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

export function drawChip(ctx: SKRSContext2D, chip: NonNullable<FrameLayout['chip']>, u: number): void {
  const { box } = chip;
  const h = box.bottom - box.top;
  ctx.save();
  ctx.fillStyle = CHIP.fill;
  ctx.strokeStyle = CHIP.edge;
  ctx.lineWidth = Math.max(1, u);
  ctx.beginPath();
  ctx.roundRect(box.left, box.top, box.right - box.left, h, h / 2);
  ctx.fill();
  ctx.stroke();
  ctx.fillStyle = CHIP.text;
  ctx.font = font(chip.size, true);
  ctx.textBaseline = 'middle';
  ctx.textAlign = 'center';
  ctx.fillText(chip.text, (box.left + box.right) / 2, box.top + h / 2 + 0.5 * u);
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
    case 'ring':
      ctx.lineWidth = 2.5 * u;
      ctx.beginPath();
      ctx.arc(x + w / 2, y, 7 * u, 0, Math.PI * 2);
      ctx.stroke();
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
