// The period table drawn straight onto the canvas under the house frame: a header row of metric
// names over their columns, one row per period, change cells filled on the diverging scale with
// an arrow (so they read in grey too), best and worst values outlined with a symbol, a partial
// period hatched, the totals row under a heavier rule, then the legend and the small print.
import type { Canvas, SKRSContext2D } from '@napi-rs/canvas';
import { luminance } from './colour.js';
import { prepareDirect } from './direct.js';
import { growthColour } from './draw-growth-grid.js';
import { emptyGeometry, scaleBox, type Box, type DrawResult, type PlacedMark } from './geometry.js';
import type { PeriodTableSpec, TableCell } from './spec.js';
import { ellipsize, fitFontSize, wrapText } from './text.js';
import { font, INK, SENTIMENT } from './theme.js';

/** The fill of a change cell: the growth grid's diverging scale, tone −1 (worse) to +1 (better). */
export function tableCellColour(tone: number): string {
  return growthColour(tone, 1, true);
}

export const MARK_COLOUR = { best: SENTIMENT.good, worst: SENTIMENT.bad } as const;
const ARROW: Record<NonNullable<TableCell['direction']>, string> = { up: '▲', down: '▼', flat: '=' };
const SYMBOL = { best: '★', worst: '✖' } as const;
const HATCH = '#E3E7EB';
const PARTIAL_FILL = '#F7F8FA';

export function drawPeriodTable(canvas: Canvas, spec: PeriodTableSpec): DrawResult {
  const { ctx, layout } = prepareDirect(canvas, spec);
  const { u, plot } = layout;
  const bodySize = 17 * u;
  const smallSize = 12.5 * u;

  // Small print and legend sit at the bottom of the plot area; the table fills what is left above.
  ctx.font = font(smallSize);
  const noteLines = spec.notes.flatMap((n) => wrapText(ctx, n, plot.right - plot.left, 2));
  const noteLH = smallSize * 1.35;
  const legendH = 30 * u;
  const bottomBlock = legendH + noteLines.length * noteLH + 8 * u;
  const tableBottom = plot.bottom - bottomBlock;

  const groupH = 26 * u;
  const headH = 38 * u;
  const rowCount = Math.max(1, spec.rows.length);
  const rowH = Math.max(14 * u, Math.min(38 * u, (tableBottom - plot.top - groupH - headH) / rowCount));

  // Columns: the period labels, then each metric's value and two changes (4 : 3 : 3).
  ctx.font = font(bodySize, true);
  const labelW = Math.max(ctx.measureText(spec.periodLabel).width, ...spec.rows.map((r) => ctx.measureText(r.label).width)) + 18 * u;
  // A partial period's note goes under its label, so it never widens the column.
  ctx.font = font(smallSize * 0.9);
  const noteW = Math.max(0, ...spec.rows.map((r) => (r.note ? ctx.measureText(r.note).width + 8 * u : 0)));
  const periodW = Math.min((plot.right - plot.left) * 0.3, Math.max(labelW, noteW));
  const groups = Math.max(1, spec.groups.length);
  const groupGap = 14 * u;
  // Two metrics or more share the whole width, so the figures are as large as the rows allow;
  // one metric alone never grows past what its numbers need.
  const spare = (plot.right - plot.left - periodW - groupGap * (groups - 1)) / groups;
  const groupW = groups > 1 ? spare : Math.min(560 * u, spare);
  const right = plot.left + periodW + groups * groupW + (groups - 1) * groupGap;
  const colX: { left: number; right: number }[] = [];
  spec.columns.forEach((c, j) => {
    const gLeft = plot.left + periodW + c.group * (groupW + groupGap);
    const within = spec.columns.slice(0, j).filter((x) => x.group === c.group);
    const widths = within.map((x) => (x.role === 'value' ? 0.4 : 0.3));
    const left = gLeft + widths.reduce((a, b) => a + b, 0) * groupW;
    colX.push({ left, right: left + (c.role === 'value' ? 0.4 : 0.3) * groupW });
  });

  // One font size for all body cells, the largest at which the longest text of every column fits.
  const pad = 8 * u;
  let size = Math.min(bodySize, rowH * 0.56);
  spec.columns.forEach((c, j) => {
    const longest = spec.rows.map((r) => cellText(r.cells[j]!)).reduce((a, b) => (b.length > a.length ? b : a), '');
    if (longest) size = Math.min(size, fitFontSize(ctx, longest, colX[j]!.right - colX[j]!.left - 2 * pad - (c.role === 'value' ? size : 0), size, 8, (s) => font(s, true)));
  });

  const top = plot.top;
  // Metric names over their columns, each with a rule spanning its group.
  ctx.textBaseline = 'middle';
  spec.groups.forEach((g, k) => {
    const left = plot.left + periodW + k * (groupW + groupGap);
    ctx.font = font(fitFontSize(ctx, g, groupW - 4 * u, 16.5 * u, 9, (s) => font(s, true)), true);
    ctx.fillStyle = INK.title;
    ctx.textAlign = 'center';
    ctx.fillText(ellipsize(ctx, g, groupW), left + groupW / 2, top + groupH * 0.42);
    ctx.fillStyle = INK.axis;
    ctx.fillRect(left, top + groupH - 3 * u, groupW, 2 * u);
  });
  // Column labels, up to two lines, muted.
  ctx.font = font(smallSize);
  ctx.fillStyle = INK.muted;
  spec.columns.forEach((c, j) => {
    const col = colX[j]!;
    const lines = wrapText(ctx, c.label, col.right - col.left - 6 * u, 2);
    const lh = smallSize * 1.15;
    const y0 = top + groupH + headH / 2 - ((lines.length - 1) * lh) / 2;
    ctx.textAlign = c.role === 'value' ? 'right' : 'center';
    lines.forEach((line, i) => ctx.fillText(line, c.role === 'value' ? col.right - pad : (col.left + col.right) / 2, y0 + i * lh));
  });
  ctx.textAlign = 'left';
  ctx.font = font(smallSize, true);
  ctx.fillText(spec.periodLabel, plot.left, top + groupH + headH / 2);

  const bodyTop = top + groupH + headH;
  ctx.fillStyle = INK.axis;
  ctx.fillRect(plot.left, bodyTop - 1.5 * u, right - plot.left, 1.5 * u);

  const cells: Box[] = [];
  const marks: PlacedMark[] = [];
  spec.rows.forEach((row, i) => {
    const y = bodyTop + i * rowH;
    const mid = y + rowH / 2;
    if (row.kind === 'partial') drawHatch(ctx, { left: plot.left, top: y, right, bottom: y + rowH }, u);
    if (row.kind === 'total') {
      ctx.fillStyle = INK.title;
      ctx.fillRect(plot.left, y, right - plot.left, 2 * u);
    } else if (i > 0) {
      ctx.fillStyle = INK.grid;
      ctx.fillRect(plot.left, y, right - plot.left, Math.max(1, u));
    }
    const muted = row.kind === 'partial';
    const noted = row.note !== '' && rowH >= 2.1 * smallSize;
    ctx.textAlign = 'left';
    ctx.font = font(Math.min(size, bodySize), row.kind !== 'partial');
    ctx.fillStyle = muted ? INK.muted : INK.title;
    ctx.fillText(row.label, plot.left, noted ? mid - rowH * 0.2 : mid);
    if (noted) {
      ctx.font = font(smallSize * 0.9);
      ctx.fillStyle = INK.muted;
      ctx.fillText(ellipsize(ctx, row.note, periodW - 4 * u), plot.left, mid + rowH * 0.24);
    }
    row.cells.forEach((cell, j) => {
      const col = colX[j]!;
      const box = { left: col.left + 1.5 * u, top: y + 2 * u, right: col.right - 1.5 * u, bottom: y + rowH - 2 * u };
      cells.push(box);
      const column = spec.columns[j]!;
      if (column.role === 'change') drawChange(ctx, cell, box, size, u, muted);
      else {
        const mark = drawValue(ctx, cell, box, size, u, { muted, bold: row.kind === 'total' });
        if (mark) marks.push(mark);
      }
    });
  });
  const tableEnd = bodyTop + spec.rows.length * rowH;

  drawLegend(ctx, spec, plot.left, tableEnd + 12 * u, plot.right, u, smallSize);
  ctx.textAlign = 'left';
  ctx.textBaseline = 'top';
  ctx.font = font(smallSize);
  ctx.fillStyle = INK.muted;
  noteLines.forEach((line, i) => ctx.fillText(line, plot.left, tableEnd + 12 * u + legendH + i * noteLH));

  const s = spec.scale;
  const tableBox = { left: plot.left, top, right, bottom: tableEnd };
  const geometry = emptyGeometry(canvas.width, canvas.height, scaleBox(tableBox, s));
  geometry.cells = cells.map((c) => scaleBox(c, s));
  geometry.marks = marks.map((m) => ({ role: m.role, x: m.x * s, y: m.y * s, ...(m.box ? { box: scaleBox(m.box, s) } : {}) }));
  return { geometry, release: () => {} };
}

function cellText(cell: TableCell): string {
  return cell.direction ? `${ARROW[cell.direction]} ${cell.text}` : cell.text;
}

function drawChange(ctx: SKRSContext2D, cell: TableCell, box: Box, size: number, u: number, muted: boolean): void {
  const cy = (box.top + box.bottom) / 2;
  let ink: string = muted ? INK.muted : INK.text;
  if (cell.tone !== null) {
    const fill = tableCellColour(cell.tone);
    ctx.fillStyle = fill;
    ctx.fillRect(box.left, box.top, box.right - box.left, box.bottom - box.top);
    ink = luminance(fill) < 0.3 ? INK.background : INK.title;
  }
  if (!cell.text) return;
  ctx.textAlign = 'right';
  ctx.fillStyle = cell.direction === null ? INK.muted : ink;
  ctx.font = font(size, cell.tone !== null);
  // Numbers right-aligned so their decimals line up down the column; the arrow sits at the left.
  ctx.fillText(cell.text, box.right - 6 * u, cy);
  if (cell.direction) {
    ctx.textAlign = 'left';
    ctx.font = font(size * 0.8, true);
    ctx.fillText(ARROW[cell.direction], box.left + 5 * u, cy);
  }
}

function drawValue(ctx: SKRSContext2D, cell: TableCell, box: Box, size: number, u: number, o: { muted: boolean; bold: boolean }): PlacedMark | null {
  const cy = (box.top + box.bottom) / 2;
  if (cell.mark) {
    const colour = MARK_COLOUR[cell.mark];
    ctx.save();
    ctx.fillStyle = cell.mark === 'best' ? '#E6F0F8' : '#FBEDE4';
    ctx.fillRect(box.left, box.top, box.right - box.left, box.bottom - box.top);
    ctx.strokeStyle = colour;
    ctx.lineWidth = 2 * u;
    ctx.strokeRect(box.left + u, box.top + u, box.right - box.left - 2 * u, box.bottom - box.top - 2 * u);
    ctx.restore();
    ctx.textAlign = 'left';
    ctx.fillStyle = colour;
    ctx.font = font(size * 1.05, true);
    ctx.fillText(SYMBOL[cell.mark], box.left + 6 * u, cy);
  }
  ctx.textAlign = 'right';
  ctx.fillStyle = o.muted ? INK.muted : INK.title;
  ctx.font = font(size, o.bold || cell.mark !== null);
  ctx.fillText(cell.text, box.right - 6 * u, cy);
  if (!cell.mark) return null;
  return { role: cell.mark, x: (box.left + box.right) / 2, y: cy, box };
}

function drawHatch(ctx: SKRSContext2D, box: Box, u: number): void {
  const w = box.right - box.left;
  const h = box.bottom - box.top;
  ctx.save();
  ctx.fillStyle = PARTIAL_FILL;
  ctx.fillRect(box.left, box.top, w, h);
  ctx.beginPath();
  ctx.rect(box.left, box.top, w, h);
  ctx.clip();
  ctx.strokeStyle = HATCH;
  ctx.lineWidth = 1.2 * u;
  ctx.beginPath();
  for (let d = -h; d < w; d += 10 * u) {
    ctx.moveTo(box.left + d, box.bottom);
    ctx.lineTo(box.left + d + h, box.top);
  }
  ctx.stroke();
  ctx.restore();
}

/** The colour ramp from worse to better with its words, the two mark symbols, and the partial swatch. */
function drawLegend(ctx: SKRSContext2D, spec: PeriodTableSpec, left: number, top: number, right: number, u: number, size: number): void {
  const h = 14 * u;
  const mid = top + h / 2;
  ctx.textBaseline = 'middle';
  ctx.font = font(size);
  ctx.fillStyle = INK.text;
  ctx.textAlign = 'left';
  let x = left;
  ctx.fillText(spec.legend.worse, x, mid);
  x += ctx.measureText(spec.legend.worse).width + 8 * u;
  const rampW = 150 * u;
  const steps = 30;
  for (let k = 0; k < steps; k++) {
    ctx.fillStyle = tableCellColour(-1 + ((k + 0.5) / steps) * 2);
    ctx.fillRect(x + (k * rampW) / steps, top, rampW / steps + 0.5, h);
  }
  x += rampW + 8 * u;
  ctx.fillStyle = INK.text;
  ctx.fillText(spec.legend.better, x, mid);
  x += ctx.measureText(spec.legend.better).width + 28 * u;
  for (const mark of ['best', 'worst'] as const) {
    ctx.font = font(size * 1.1, true);
    ctx.fillStyle = MARK_COLOUR[mark];
    ctx.fillText(SYMBOL[mark], x, mid);
    x += ctx.measureText(SYMBOL[mark]).width + 6 * u;
    ctx.font = font(size);
    ctx.fillStyle = INK.text;
    ctx.fillText(spec.legend[mark], x, mid);
    x += ctx.measureText(spec.legend[mark]).width + 24 * u;
  }
  if (spec.legend.partial && x + 40 * u < right) {
    drawHatch(ctx, { left: x, top, right: x + 30 * u, bottom: top + h }, u);
    x += 36 * u;
    ctx.fillStyle = INK.text;
    ctx.font = font(size);
    ctx.fillText(ellipsize(ctx, spec.legend.partial, right - x), x, mid);
  }
}
