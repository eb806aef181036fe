import type { Canvas } from '@napi-rs/canvas';
import { prepareDirect } from './direct.js';
import { emptyGeometry, scaleBox, type DrawResult, type Box, type PlacedMark } from './geometry.js';
import type { KpiCardSpec, KpiComparison } from './spec.js';
import { ellipsize, fitFontSize, wrapText } from './text.js';
import { font, INK, SENTIMENT } from './theme.js';

const ARROWS: Record<KpiComparison['direction'], string> = { up: '▲', down: '▼', flat: '→', none: '–' };

/** The headline number on the left; one tile per comparison on the right. */
export function drawKpiCard(canvas: Canvas, spec: KpiCardSpec): DrawResult {
  const { ctx, layout } = prepareDirect(canvas, spec);
  const { u, plot } = layout;
  const split = plot.left + (plot.right - plot.left) * 0.52;
  const mainW = split - plot.left - 32 * u;
  const midY = (plot.top + plot.bottom) / 2;

  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  ctx.fillStyle = INK.text;
  ctx.font = font(22 * u);
  const labelLines = wrapText(ctx, spec.metricLabel, mainW, 2);
  const valueSize = fitFontSize(ctx, spec.valueText, mainW, 124 * u, 28 * u, (s) => font(s, true));
  const labelLH = 28 * u;
  const blockH = labelLines.length * labelLH + 14 * u + valueSize * 0.95 + 18 * u + 24 * u;
  let y = midY - blockH / 2;
  ctx.font = font(22 * u);
  for (const line of labelLines) {
    y += labelLH;
    ctx.fillText(line, plot.left, y - 6 * u);
  }
  y += 14 * u + valueSize * 0.95;
  ctx.font = font(valueSize, true);
  ctx.fillStyle = INK.title;
  ctx.fillText(spec.valueText, plot.left, y);
  const valueBox: Box = { left: plot.left, top: y - valueSize * 0.75, right: plot.left + ctx.measureText(spec.valueText).width, bottom: y };
  y += 18 * u + 20 * u;
  ctx.font = font(22 * u, true);
  ctx.fillStyle = INK.muted;
  ctx.fillText(ellipsize(ctx, spec.periodText, mainW), plot.left, y);

  ctx.strokeStyle = INK.grid;
  ctx.lineWidth = 2 * u;
  ctx.beginPath();
  ctx.moveTo(split, plot.top + 10 * u);
  ctx.lineTo(split, plot.bottom - 10 * u);
  ctx.stroke();

  const tiles: Box[] = [];
  const marks: PlacedMark[] = [];
  const n = spec.comparisons.length;
  const tileLeft = split + 40 * u;
  const tileW = plot.right - tileLeft;
  const tileH = Math.min(150 * u, (plot.bottom - plot.top) / Math.max(1, n));
  const tilesTop = midY - (tileH * n) / 2;
  spec.comparisons.forEach((c, i) => {
    const top = tilesTop + i * tileH;
    const colour = SENTIMENT[c.sentiment];
    const baseline = top + tileH * 0.48;
    ctx.textAlign = 'left';
    ctx.fillStyle = colour;
    ctx.font = font(38 * u, true);
    const arrow = ARROWS[c.direction];
    ctx.fillText(arrow, tileLeft, baseline);
    const arrowW = ctx.measureText(arrow).width + 14 * u;
    const changeSize = fitFontSize(ctx, c.changeText, tileW - arrowW, 52 * u, 18 * u, (s) => font(s, true));
    ctx.fillText(c.changeText, tileLeft + arrowW, baseline);
    ctx.font = font(19 * u);
    ctx.fillStyle = INK.text;
    const detail = c.baseText === 'n/a' ? c.label : `${c.label} (${c.baseText})`;
    ctx.fillText(ellipsize(ctx, detail, tileW), tileLeft, baseline + 38 * u);
    tiles.push({ left: tileLeft, top, right: plot.right, bottom: top + tileH });
    marks.push({ role: c.direction, x: tileLeft + 12 * u, y: baseline - changeSize * 0.3 });
  });

  const s = spec.scale;
  const geometry = emptyGeometry(canvas.width, canvas.height, scaleBox(plot, s));
  geometry.cells = [valueBox, ...tiles].map((b) => scaleBox(b, s));
  geometry.marks = marks.map((m) => ({ role: m.role, x: m.x * s, y: m.y * s }));
  return { geometry, release: () => {} };
}
