import type { Canvas } from '@napi-rs/canvas';
import { prepareDirect } from './direct.js';
import { emptyGeometry, scaleBox, type DrawResult, type Box } from './geometry.js';
import type { GrowthGridSpec } from './spec.js';
import { fitFontSize } from './text.js';
import { luminance, mix } from './colour.js';
import { font, INK, SENTIMENT } from './theme.js';

const NEUTRAL = '#F3F4F6';

/** Diverging fill: neutral near zero, blue for good growth, vermillion for bad. */
export function growthColour(value: number, domain: number, higherIsBetter: boolean): string {
  const t = Math.max(-1, Math.min(1, value / (domain > 0 ? domain : 1)));
  const good = t > 0 === higherIsBetter;
  // A slight ease-out so small but real changes are already visibly tinted.
  const strength = Math.pow(Math.abs(t), 0.8);
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
    row.cells.forEach((value, j) => {
      const box = { left: gridLeft + j * cellW + gap / 2, top: top + gap / 2, right: gridLeft + (j + 1) * cellW - gap / 2, bottom: top + cellH - gap / 2 };
      const fill = value === null ? INK.na : growthColour(value, spec.domain, spec.higherIsBetter);
      ctx.fillStyle = fill;
      ctx.fillRect(box.left, box.top, box.right - box.left, box.bottom - box.top);
      ctx.font = value === null ? font(valueSize * 0.9) : font(valueSize, true);
      ctx.fillStyle = value === null ? INK.muted : luminance(fill) < 0.3 ? INK.background : INK.title;
      const cx = (box.left + box.right) / 2;
      const cy = (box.top + box.bottom) / 2;
      ctx.fillText(row.texts[j] ?? 'n/a', cx, cy);
      cells.push(box);
      centres.push({ x: cx, y: cy });
    });
  });

  const legendTop = gridTop + rows * cellH + 22 * u;
  drawColourLegend(ctx, spec, layout.u, gridLeft, legendTop, Math.min(cellW * 6, 420 * u));

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
  const naX = left + width + 18 * u + ctx.measureText(spec.legendLabel).width + 28 * u;
  ctx.fillStyle = INK.na;
  ctx.fillRect(naX, top - 2 * u, 34 * u, barH + 4 * u);
  ctx.fillStyle = INK.muted;
  ctx.font = font(11 * u);
  ctx.textAlign = 'center';
  ctx.fillText('n/a', naX + 17 * u, top + barH / 2);
  ctx.textAlign = 'left';
  ctx.font = font(13 * u);
  ctx.fillStyle = INK.text;
  ctx.fillText('no comparable month', naX + 42 * u, top + barH / 2);
}
