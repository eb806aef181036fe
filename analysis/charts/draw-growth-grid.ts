import type { Canvas } from '@napi-rs/canvas';
import { prepareDirect } from './direct.js';
import { emptyGeometry, scaleBox, type DrawResult, type Box } from './geometry.js';
import type { GrowthCellState, GrowthGridRow, GrowthGridSpec } from './spec.js';
import { fitFontSize } from './text.js';
import { luminance, mix } from './colour.js';
import { font, INK, OKABE_ITO, SENTIMENT } from './theme.js';

const NEUTRAL = '#F3F4F6';
const PARTIAL_FILL = '#F7F8FA';
const PARTIAL_LINE = '#9AA3AD';

/** A row's cell states; specs written before states existed derive them from the values. */
function statesOf(row: GrowthGridRow): GrowthCellState[] {
  return row.cells.map((c, j) => row.states?.[j] ?? (c === null ? 'not_comparable' : 'value'));
}

/** Diagonal hatching inside `box`, with a dashed outline: "this month is not over yet". */
function drawPartialCell(ctx: ReturnType<Canvas['getContext']>, box: { left: number; top: number; right: number; bottom: number }, u: number): void {
  const w = box.right - box.left;
  const h = box.bottom - box.top;
  ctx.save();
  ctx.fillStyle = PARTIAL_FILL;
  ctx.fillRect(box.left, box.top, w, h);
  ctx.beginPath();
  ctx.rect(box.left, box.top, w, h);
  ctx.clip();
  ctx.strokeStyle = '#CDD3DA';
  ctx.lineWidth = 1.5 * u;
  const step = 9 * u;
  ctx.beginPath();
  for (let d = -h; d < w; d += step) {
    ctx.moveTo(box.left + d, box.bottom);
    ctx.lineTo(box.left + d + h, box.top);
  }
  ctx.stroke();
  ctx.restore();
  ctx.save();
  ctx.strokeStyle = PARTIAL_LINE;
  ctx.lineWidth = 1.5 * u;
  ctx.setLineDash([5 * u, 3 * u]);
  ctx.strokeRect(box.left + 0.75 * u, box.top + 0.75 * u, w - 1.5 * u, h - 1.5 * u);
  ctx.restore();
}

/** Diverging fill: neutral near zero, blue for good growth, vermillion for bad. */
export function growthColour(value: number, domain: number, higherIsBetter: boolean | null): string {
  const t = Math.max(-1, Math.min(1, value / (domain > 0 ? domain : 1)));
  // A slight ease-out so small but real changes are already visibly tinted.
  const strength = Math.pow(Math.abs(t), 0.8);
  // With no good direction, rises and falls take a pair of colours that judge neither.
  if (higherIsBetter === null) return mix(NEUTRAL, t > 0 ? OKABE_ITO.skyBlue : OKABE_ITO.orange, strength * 0.95);
  const good = t > 0 === higherIsBetter;
  return mix(NEUTRAL, good ? SENTIMENT.good : SENTIMENT.bad, strength * 0.95);
}

export function drawGrowthGrid(canvas: Canvas, spec: GrowthGridSpec): DrawResult {
  const { ctx, layout } = prepareDirect(canvas, spec);
  const { u, plot } = layout;
  const cols = Math.max(1, spec.columns.length);
  const rows = Math.max(1, spec.rows.length);

  const labelSize = 15 * u;
  ctx.font = font(labelSize, true);
  const rowLabelW = Math.max(0, ...spec.rows.map((r) => ctx.measureText(r.label).width)) + 18 * u;
  const headerH = 30 * u;
  const legendH = 62 * u;
  const gap = 3 * u;
  const cellW = (plot.right - plot.left - rowLabelW) / cols;
  const cellH = Math.min(92 * u, (plot.bottom - plot.top - headerH - legendH) / rows);
  const gridLeft = plot.left + rowLabelW;
  // Few rows leave spare height: centre the block rather than leave a gap above the footer.
  const spare = plot.bottom - plot.top - headerH - legendH - rows * cellH;
  const blockTop = plot.top + Math.max(0, spare / 2);
  const gridTop = blockTop + headerH;

  ctx.textBaseline = 'middle';
  ctx.textAlign = 'center';
  ctx.fillStyle = INK.text;
  ctx.font = font(labelSize);
  spec.columns.forEach((c, j) => ctx.fillText(c, gridLeft + (j + 0.5) * cellW, blockTop + headerH / 2));

  const longest = spec.rows.flatMap((r) => r.texts).reduce((a, b) => (b.length > a.length ? b : a), '+00.0%');
  const valueSize = fitFontSize(ctx, longest, cellW - 10 * u, Math.min(17 * u, cellH * 0.34), 8, (s) => font(s, true));

  const cells: Box[] = [];
  const centres: { x: number; y: number }[] = [];
  spec.rows.forEach((row, i) => {
    const top = gridTop + i * cellH;
    ctx.textAlign = 'right';
    ctx.fillStyle = INK.title;
    ctx.font = font(labelSize, true);
    ctx.fillText(row.label, gridLeft - 12 * u, top + cellH / 2);
    ctx.textAlign = 'center';
    const states = statesOf(row);
    row.cells.forEach((value, j) => {
      const box = { left: gridLeft + j * cellW + gap / 2, top: top + gap / 2, right: gridLeft + (j + 1) * cellW - gap / 2, bottom: top + cellH - gap / 2 };
      const state = states[j]!;
      const cx = (box.left + box.right) / 2;
      const cy = (box.top + box.bottom) / 2;
      cells.push(box);
      centres.push({ x: cx, y: cy });
      // After the data ends (or before it starts) there is nothing to say: the cell stays blank.
      if (state === 'no_data') return;
      if (state === 'partial') {
        drawPartialCell(ctx, box, u);
        ctx.font = font(valueSize * 0.85);
        ctx.fillStyle = INK.muted;
        ctx.fillText(row.texts[j] || 'partial', cx, cy);
        return;
      }
      const fill = value === null ? INK.na : growthColour(value, spec.domain, spec.higherIsBetter);
      ctx.fillStyle = fill;
      ctx.fillRect(box.left, box.top, box.right - box.left, box.bottom - box.top);
      ctx.font = value === null ? font(valueSize * 0.9) : font(valueSize, true);
      ctx.fillStyle = value === null ? INK.muted : luminance(fill) < 0.3 ? INK.background : INK.title;
      ctx.fillText(row.texts[j] || 'n/a', cx, cy);
    });
  });

  const legendTop = gridTop + rows * cellH + 22 * u;
  drawColourLegend(ctx, spec, layout.u, gridLeft, legendTop, Math.min(cellW * 6, 420 * u), plot.right);

  const s = spec.scale;
  const gridBox = { left: gridLeft, top: gridTop, right: gridLeft + cols * cellW, bottom: gridTop + rows * cellH };
  const geometry = emptyGeometry(canvas.width, canvas.height, scaleBox(gridBox, s));
  geometry.cells = cells.map((c) => scaleBox(c, s));
  geometry.points = centres.map((p) => ({ x: p.x * s, y: p.y * s }));
  return { geometry, release: () => {} };
}

function drawColourLegend(
  ctx: ReturnType<Canvas['getContext']>,
  spec: GrowthGridSpec,
  u: number,
  left: number,
  top: number,
  width: number,
  rightEdge: number,
): void {
  const barH = 12 * u;
  const steps = 48;
  for (let k = 0; k < steps; k++) {
    const v = -spec.domain + ((k + 0.5) / steps) * 2 * spec.domain;
    ctx.fillStyle = growthColour(v, spec.domain, spec.higherIsBetter);
    ctx.fillRect(left + (k * width) / steps, top, width / steps + 0.5, barH);
  }
  ctx.font = font(13 * u);
  ctx.fillStyle = INK.text;
  ctx.textBaseline = 'top';
  const [lo, mid, hi] = spec.legendTexts;
  ctx.textAlign = 'left';
  ctx.fillText(lo, left, top + barH + 5 * u);
  ctx.textAlign = 'center';
  ctx.fillText(mid, left + width / 2, top + barH + 5 * u);
  ctx.textAlign = 'right';
  ctx.fillText(hi, left + width, top + barH + 5 * u);
  ctx.textAlign = 'left';
  ctx.textBaseline = 'middle';
  ctx.fillStyle = INK.text;
  ctx.fillText(spec.legendLabel, left + width + 18 * u, top + barH / 2);
  // Swatches for the cells that are not a coloured change, only those the grid has; they
  // continue on a second line, right of the colour bar, when the first is full.
  const startX = left + width + 18 * u;
  let x = startX + ctx.measureText(spec.legendLabel).width + 28 * u;
  let rowMid = top + barH / 2;
  const states = new Set(spec.rows.flatMap(statesOf));
  const swatch = { w: 34 * u, h: barH + 8 * u };
  const items: { text: string; draw: (x: number, y: number) => void }[] = [];
  if (states.has('not_comparable')) {
    items.push({
      text: 'no comparable month',
      draw: (sx, sy) => {
        ctx.fillStyle = INK.na;
        ctx.fillRect(sx, sy, swatch.w, swatch.h);
        ctx.fillStyle = INK.muted;
        ctx.font = font(11 * u);
        ctx.textAlign = 'center';
        ctx.fillText('n/a', sx + swatch.w / 2, sy + swatch.h / 2);
      },
    });
  }
  if (states.has('partial')) {
    items.push({ text: 'partial month, not compared', draw: (sx, sy) => drawPartialCell(ctx, { left: sx, top: sy, right: sx + swatch.w, bottom: sy + swatch.h }, u) });
  }
  for (const item of items) {
    ctx.font = font(13 * u);
    const itemW = swatch.w + 8 * u + ctx.measureText(item.text).width;
    if (x + itemW > rightEdge) {
      x = startX;
      rowMid += swatch.h + 10 * u;
    }
    item.draw(x, rowMid - swatch.h / 2);
    ctx.textAlign = 'left';
    ctx.textBaseline = 'middle';
    ctx.font = font(13 * u);
    ctx.fillStyle = INK.text;
    ctx.fillText(item.text, x + swatch.w + 8 * u, rowMid);
    x += itemW + 28 * u;
  }
}
