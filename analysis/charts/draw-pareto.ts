import type { Canvas } from '@napi-rs/canvas';
import type { ChartConfiguration } from 'chart.js';
import { formatValue } from '../format.js';
import { axisTitle, baseOptions, categoryAxis, chartArea, drawBackedText, drawChartJs, tickFont, valueAxis } from './chartjs.js';
import { layoutFrame, type LegendItem } from './frame.js';
import { emptyGeometry, scaleBox, type Box, type DrawResult, type PlacedLine, type PlacedMark } from './geometry.js';
import { inflate, pickPlacement, polyline, type Candidate, type Obstacle } from './placement.js';
import type { ParetoSpec } from './spec.js';
import { wrapText } from './text.js';
import { font, INK, OKABE_ITO } from './theme.js';

const HEAD = OKABE_ITO.blue;
const TAIL = OKABE_ITO.skyBlue;
const LINE = OKABE_ITO.orange;
const LINE_TEXT = '#9A5F00'; // the orange, darkened so small numbers stay legible on white

export function drawPareto(canvas: Canvas, spec: ParetoSpec): DrawResult {
  const ctx = canvas.getContext('2d');
  const hasTail = spec.thresholdIndex >= 0 && spec.bars.some((b, i) => !b.other && i > spec.thresholdIndex);
  const pct = formatValue(spec.threshold, { unit: 'percent', decimals: 0, locale: spec.format.locale });
  const legend: LegendItem[] = [
    { label: hasTail ? `${spec.valueLabel}, up to ${pct} of total` : spec.valueLabel, color: HEAD, shape: 'box' },
    ...(hasTail ? [{ label: `Beyond ${pct}`, color: TAIL, shape: 'box' as const }] : []),
    { label: 'Cumulative share of total', color: LINE, shape: 'line-dot' },
  ];
  const layout = layoutFrame(ctx, spec, legend);
  const { u } = layout;
  const n = Math.max(1, spec.bars.length);
  const slot = (layout.plot.right - layout.plot.left - 160 * u) / n;
  ctx.font = font(tickFont(layout).size);
  const labels = spec.bars.map((b) => wrapText(ctx, b.label, slot - 8 * u, 3));
  const pctFmt = { unit: 'percent' as const, decimals: 0, locale: spec.format.locale };
  // A fold that dwarfs the named bars is broken at the top: the axis is scaled to the named ones.
  const aligned = alignedScale(spec.bars.filter((b) => !(spec.foldBroken && b.other)).map((b) => b.value));

  const config = {
    type: 'bar',
    data: {
      labels,
      datasets: [
        {
          type: 'line',
          data: spec.bars.map((b) => b.cumulative),
          yAxisID: 'share',
          borderColor: LINE,
          borderWidth: 3 * u,
          pointRadius: 4.5 * u,
          pointBackgroundColor: LINE,
          pointBorderColor: INK.background,
          pointBorderWidth: 1.5 * u,
          tension: 0,
          order: 0,
        },
        {
          type: 'bar',
          data: spec.bars.map((b) => b.value),
          yAxisID: 'y',
          backgroundColor: spec.bars.map((b, i) =>
            b.other ? INK.other : spec.thresholdIndex < 0 || i <= spec.thresholdIndex ? HEAD : TAIL,
          ),
          categoryPercentage: 0.8,
          barPercentage: 0.9,
          maxBarThickness: 90 * u,
          borderRadius: 2 * u,
          // The broken fold runs past the top of the axis and is cut at the plot's edge.
          clip: 0,
          order: 1,
        },
      ],
    },
    options: {
      // Room above the 100% line for the running-share labels.
      ...baseOptions(layout, spec.scale, { top: 26 * u }),
      scales: {
        x: { ...categoryAxis(layout), ticks: { ...categoryAxis(layout).ticks, autoSkip: false } },
        y: {
          ...valueAxis(layout, spec.format),
          beginAtZero: true,
          position: 'left',
          title: axisTitle(layout, spec.valueLabel),
          // The same number of steps as the share axis, so both read off the same gridlines.
          ...(aligned ? { min: 0, max: aligned.max } : {}),
          ticks: { ...valueAxis(layout, spec.format).ticks, ...(aligned ? { stepSize: aligned.step } : {}) },
        },
        share: {
          type: 'linear',
          position: 'right',
          min: 0,
          max: 1,
          grid: { display: false },
          border: { display: false },
          ticks: {
            font: tickFont(layout),
            color: INK.muted,
            padding: 8 * u,
            stepSize: aligned ? 1 / aligned.intervals : 0.2,
            callback: (v: number | string) => formatValue(Number(v), pctFmt),
          },
          title: axisTitle(layout, 'Cumulative share'),
        },
      },
    },
  } as unknown as ChartConfiguration<'bar'>;

  const marks: PlacedMark[] = [];
  const lines: PlacedLine[] = [];
  const barBoxes: Box[] = [];
  const chart = drawChartJs(canvas, layout, config, {
    afterDatasets: (c, cx) => {
      const area = chartArea(c);
      // Where each axis put its gridline values, for checking that the two axes share them.
      for (const [id, role] of [['y', 'value-tick'], ['share', 'share-tick']] as const) {
        const sc = c.scales[id]!;
        for (const t of sc.ticks) {
          const ty = sc.getPixelForValue(t.value);
          lines.push({ role, x1: area.left, y1: ty, x2: area.right, y2: ty });
        }
      }
      const y = c.scales['share']!.getPixelForValue(spec.threshold);
      cx.save();
      cx.strokeStyle = INK.title;
      cx.lineWidth = 1.5 * u;
      cx.setLineDash([8 * u, 5 * u]);
      cx.beginPath();
      cx.moveTo(area.left, y);
      cx.lineTo(area.right, y);
      cx.stroke();
      cx.restore();
      lines.push({ role: 'threshold', x1: area.left, y1: y, x2: area.right, y2: y });
      // Running-share labels are placed first (above their points); the threshold label then
      // takes the spot that covers no bar, no label and no stretch of the line.
      const meta = c.getDatasetMeta(0);
      const shareFont = font(13 * u, true);
      const cumulative = meta.data.map((el, i) => {
        const text = spec.bars[i]!.cumulativeText;
        cx.font = shareFont;
        const m = cx.measureText(text);
        const pad = 2 * u;
        const w = m.width + 2 * pad;
        const h = m.actualBoundingBoxAscent + m.actualBoundingBoxDescent + 2 * pad;
        const bottom = el.y - 10 * u + pad;
        return { el, text, box: { left: el.x - w / 2, top: bottom - h, right: el.x + w / 2, bottom } };
      });
      const obstacles: Obstacle[] = [
        ...c.getDatasetMeta(1).data.map((el) => {
          const { x, y: top, base, width } = el as unknown as { x: number; y: number; base: number; width: number };
          const box = { left: x - width / 2, top: Math.min(top, base), right: x + width / 2, bottom: Math.max(top, base) };
          barBoxes.push(box);
          return { kind: 'box' as const, box, weight: 50 };
        }),
        ...cumulative.map((k) => ({ kind: 'box' as const, box: inflate(k.box, 2 * u), weight: 100 })),
        ...polyline(meta.data.map((el) => ({ x: el.x, y: el.y }))).map((segment) => ({ kind: 'segment' as const, segment, weight: 30 })),
      ];
      if (spec.foldBroken) drawFoldBreak(cx, c.getDatasetMeta(1).data, spec, area, u, obstacles);
      const label = spec.thresholdText;
      const labelFont = font(13 * u, true);
      cx.font = labelFont;
      const lm = cx.measureText(label);
      const pad = 2 * u;
      const w = lm.width + 2 * pad;
      const h = lm.actualBoundingBoxAscent + lm.actualBoundingBoxDescent + 2 * pad;
      const chosen = pickPlacement(thresholdCandidates(area, y, w, h, u, meta.data.map((el) => el.x)), obstacles, area);
      const tbox = chosen.box;
      drawBackedText(cx, label, tbox.left + pad, tbox.top + pad, { font: labelFont, color: INK.title, align: 'left', baseline: 'top', pad });
      marks.push({ role: 'threshold-label', x: (tbox.left + tbox.right) / 2, y, box: tbox });
      // Line points drawn again on top of the reference line, with their running share.
      for (const k of cumulative) {
        drawBackedText(cx, k.text, k.box.left + pad, k.box.top + pad, { font: shareFont, color: LINE_TEXT, align: 'left', baseline: 'top', pad });
        marks.push({ role: 'cumulative', x: k.el.x, y: k.el.y, box: k.box });
      }
    },
  });
  const s = spec.scale;
  const geometry = emptyGeometry(canvas.width, canvas.height, scaleBox(chartArea(chart), s));
  geometry.valueAxis = { min: chart.scales['y']!.min, max: chart.scales['y']!.max };
  geometry.points = chart.getDatasetMeta(1).data.map((el) => ({ x: el.x * s, y: el.y * s }));
  geometry.marks = marks.map((m) => ({ role: m.role, x: m.x * s, y: m.y * s, ...(m.box ? { box: scaleBox(m.box, s) } : {}) }));
  geometry.lines = lines.map((l) => ({ role: l.role, x1: l.x1 * s, y1: l.y1 * s, x2: l.x2 * s, y2: l.y2 * s }));
  geometry.cells = barBoxes.map((b) => scaleBox(b, s));
  // chart.js clears the canvas when destroyed, so the caller releases it after encoding.
  return { geometry, release: () => chart.destroy() };
}

/**
 * The fold's bar cut at the top of the plot: a white zigzag gap across it, so it reads as taller
 * than drawn, and its value written inside it under the gap (added to the obstacles of later labels).
 */
function drawFoldBreak(cx: ReturnType<Canvas['getContext']>, bars: readonly unknown[], spec: ParetoSpec, area: Box, u: number, obstacles: Obstacle[]): void {
  const i = spec.bars.findIndex((b) => b.other);
  const el = bars[i] as { x: number; width: number } | undefined;
  if (!el) return;
  const left = el.x - el.width / 2 - 2 * u;
  const right = el.x + el.width / 2 + 2 * u;
  const y = area.top + 22 * u;
  const gap = 7 * u;
  const teeth = 4;
  const step = (right - left) / teeth;
  const zigzag = (dy: number) => {
    cx.moveTo(left, y + dy);
    for (let k = 1; k <= teeth; k++) cx.lineTo(left + k * step, y + dy + (k % 2 === 1 ? -4 * u : 0));
  };
  cx.save();
  cx.fillStyle = INK.background;
  cx.beginPath();
  zigzag(0);
  for (let k = teeth; k >= 0; k--) cx.lineTo(left + k * step, y + gap + (k % 2 === 1 ? -4 * u : 0));
  cx.closePath();
  cx.fill();
  cx.restore();
  const bar = spec.bars[i]!;
  const text = bar.text;
  const textFont = font(13 * u, true);
  cx.font = textFont;
  const m = cx.measureText(text);
  const pad = 2 * u;
  const w = m.width + 2 * pad;
  const h = m.actualBoundingBoxAscent + m.actualBoundingBoxDescent + 2 * pad;
  const box = { left: el.x - w / 2, top: y + gap + 6 * u, right: el.x + w / 2, bottom: y + gap + 6 * u + h };
  drawBackedText(cx, text, box.left + pad, box.top + pad, { font: textFont, color: INK.title, align: 'left', baseline: 'top', pad });
  obstacles.push({ kind: 'box', box: inflate(box, 2 * u), weight: 100 });
}

/**
 * A left-axis maximum with as many round steps as the share axis has (4 steps of 25% or 5 of
 * 20%, whichever hugs the tallest bar more closely), so every gridline marks both axes.
 * Null with negative values, where the axes cannot share a zero and a top.
 */
export function alignedScale(values: readonly number[]): { max: number; step: number; intervals: number } | null {
  if (values.some((v) => v < 0)) return null;
  const top = Math.max(0, ...values.filter((v) => Number.isFinite(v)));
  if (!(top > 0)) return null;
  let best: { max: number; step: number; intervals: number } | null = null;
  for (const intervals of [5, 4]) {
    const raw = top / intervals;
    const magnitude = 10 ** Math.floor(Math.log10(raw));
    const step = [1, 2, 2.5, 5, 10].map((m) => m * magnitude).find((st) => st >= raw * (1 - 1e-9))!;
    const max = step * intervals;
    if (!best || max < best.max - 1e-9 * max) best = { max, step, intervals };
  }
  return best;
}

/** Spots for the threshold label: under or over the line at the right end, then over each bar, then the left end. */
function thresholdCandidates(area: Box, y: number, w: number, h: number, u: number, centres: number[]): Candidate[] {
  const below = y + 5 * u;
  const above = y - 5 * u - h;
  const at = (left: number, top: number, penalty: number): Candidate => {
    const l = Math.min(Math.max(left, area.left + 4 * u), area.right - 4 * u - w);
    return { box: { left: l, top, right: l + w, bottom: top + h }, penalty };
  };
  const out: Candidate[] = [at(area.right - 6 * u - w, below, 0), at(area.right - 6 * u - w, above, 1)];
  [...centres].reverse().forEach((x, i) => {
    out.push(at(x - w / 2, below, 2 + i), at(x - w / 2, above, 2.5 + i));
  });
  out.push(at(area.left + 6 * u, below, 20), at(area.left + 6 * u, above, 21));
  return out;
}
