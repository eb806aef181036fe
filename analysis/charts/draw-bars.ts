import type { Canvas } from '@napi-rs/canvas';
import type { ChartConfiguration } from 'chart.js';
import { baseOptions, chartArea, drawBackedText, drawChartJs, tickFont, valueAxis } from './chartjs.js';
import { layoutFrame, type LegendItem } from './frame.js';
import { emptyGeometry, scaleBox, type Box, type DrawResult, type PlacedLine, type PlacedMark } from './geometry.js';
import type { Bar, BarsSpec } from './spec.js';
import { wrapText } from './text.js';
import { font, INK, OKABE_ITO, SENTIMENT } from './theme.js';

/** The fill of one bar: neutral for the folded tail, by sign when the spec says which way is good. */
export function barColour(bar: Bar, higherIsBetter: boolean | undefined): string {
  if (bar.other) return INK.other;
  if (higherIsBetter === undefined) return OKABE_ITO.blue;
  if (bar.value === 0) return INK.muted;
  return bar.value > 0 === higherIsBetter ? SENTIMENT.good : SENTIMENT.bad;
}

/** Horizontal bars: segment names stay readable, however long, and the ranking reads top-down. */
export function drawBars(canvas: Canvas, spec: BarsSpec): DrawResult {
  const ctx = canvas.getContext('2d');
  const signed = spec.higherIsBetter !== undefined;
  const named = spec.bars.filter((b) => !b.other && b.value !== 0);
  const legend: LegendItem[] = [];
  if (signed) {
    const rise = spec.higherIsBetter ? SENTIMENT.good : SENTIMENT.bad;
    const fall = spec.higherIsBetter ? SENTIMENT.bad : SENTIMENT.good;
    if (named.some((b) => b.value > 0)) legend.push({ label: 'Increase', color: rise, shape: 'box' });
    if (named.some((b) => b.value < 0)) legend.push({ label: 'Decrease', color: fall, shape: 'box' });
  }
  const layout = layoutFrame(ctx, spec, legend);
  const { u } = layout;
  const width = layout.plot.right - layout.plot.left;

  ctx.font = font(tickFont(layout).size);
  const labels = spec.bars.map((b) => wrapText(ctx, b.label, width * 0.28, 2));
  const valueFont = font(14 * u, true);
  ctx.font = valueFont;
  const textWidth = (pick: (b: Bar) => boolean) => Math.max(0, ...spec.bars.filter(pick).map((b) => ctx.measureText(b.text).width));
  const widestRight = textWidth((b) => b.value >= 0);
  const widestLeft = textWidth((b) => b.value < 0);
  const hasNegative = spec.bars.some((b) => b.value < 0);
  const gap = 8 * u;

  const config: ChartConfiguration<'bar'> = {
    type: 'bar',
    data: {
      labels,
      datasets: [
        {
          data: spec.bars.map((b) => b.value),
          backgroundColor: spec.bars.map((b) => barColour(b, spec.higherIsBetter)),
          categoryPercentage: 0.78,
          barPercentage: 0.9,
          maxBarThickness: 56 * u,
          borderRadius: 2 * u,
        },
      ],
    },
    options: {
      ...baseOptions(layout, spec.scale, { right: widestRight + gap + 4 * u }),
      indexAxis: 'y',
      scales: {
        x: {
          ...valueAxis(layout, spec.format),
          beginAtZero: true,
          // With bars both sides of zero, rounding both ends out to whole ticks can waste a third
          // of the width; the axis stops at the data (plus label room) and ticks fall inside.
          ...(hasNegative
            ? {
                bounds: 'data' as const,
                afterBuildTicks: (scale: { min: number; max: number; ticks: { value: number }[] }) => {
                  scale.ticks = roundTicks(scale.min, scale.max).map((value) => ({ value }));
                },
              }
            : {}),
          // Bars hanging left of zero write their value to their left: stretch the axis so that
          // text stays inside the plot instead of running into the category names.
          afterDataLimits: (scale: { min: number; max: number; maxWidth: number }) => {
            if (!hasNegative || !(scale.maxWidth > 0)) return;
            const room = Math.min(0.45, (widestLeft + gap + 6 * u) / scale.maxWidth);
            const span = (scale.max - scale.min) / (1 - room);
            scale.min -= room * span;
          },
        },
        y: {
          type: 'category',
          grid: { display: false },
          // With negative bars the zero rule is the baseline; an axis line at the far left would be a false one.
          border: { display: !hasNegative, color: INK.axis, width: Math.max(1, u) },
          ticks: { font: tickFont(layout), color: INK.text, padding: 8 * u, autoSkip: false },
        },
      },
    },
  };

  const valueEnds: { x: number; y: number }[] = [];
  const marks: PlacedMark[] = [];
  const lines: PlacedLine[] = [];
  const barBoxes: Box[] = [];
  const chart = drawChartJs(canvas, layout, config, {
    afterDatasets: (c, cx) => {
      const area = chartArea(c);
      if (hasNegative) {
        const zero = c.scales['x']!.getPixelForValue(0);
        cx.save();
        cx.strokeStyle = INK.title;
        cx.lineWidth = 1.5 * u;
        cx.beginPath();
        cx.moveTo(zero, area.top);
        cx.lineTo(zero, area.bottom);
        cx.stroke();
        cx.restore();
        lines.push({ role: 'zero', x1: zero, y1: area.top, x2: zero, y2: area.bottom });
      }
      c.getDatasetMeta(0).data.forEach((el, i) => {
        const bar = spec.bars[i]!;
        const right = bar.value >= 0;
        const box = drawBackedText(cx, bar.text, right ? el.x + gap : el.x - gap, el.y, {
          font: valueFont,
          color: INK.title,
          align: right ? 'left' : 'right',
          baseline: 'middle',
          pad: 0,
        });
        valueEnds.push({ x: el.x, y: el.y });
        marks.push({ role: 'value', x: el.x, y: el.y, box });
        const { base, height } = el as unknown as { base: number; height: number };
        barBoxes.push({ left: Math.min(el.x, base), top: el.y - height / 2, right: Math.max(el.x, base), bottom: el.y + height / 2 });
      });
    },
  });
  const s = spec.scale;
  const geometry = emptyGeometry(canvas.width, canvas.height, scaleBox(chartArea(chart), s));
  geometry.valueAxis = { min: chart.scales['x']!.min, max: chart.scales['x']!.max };
  geometry.points = valueEnds.map((p) => ({ x: p.x * s, y: p.y * s }));
  geometry.marks = marks.map((m) => ({ role: m.role, x: m.x * s, y: m.y * s, ...(m.box ? { box: scaleBox(m.box, s) } : {}) }));
  geometry.lines = lines.map((l) => ({ role: l.role, x1: l.x1 * s, y1: l.y1 * s, x2: l.x2 * s, y2: l.y2 * s }));
  geometry.cells = barBoxes.map((b) => scaleBox(b, s));
  // chart.js clears the canvas when destroyed, so the caller releases it after encoding.
  return { geometry, release: () => chart.destroy() };
}

/** Multiples of a round step (1, 2, 2.5 or 5 × 10^k) inside [min, max], zero always among them; four to six. */
export function roundTicks(min: number, max: number): number[] {
  if (!(max > min)) return [0];
  const raw = (max - min) / 6;
  const magnitude = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * magnitude).find((st) => st >= raw * (1 - 1e-9))!;
  const out: number[] = [];
  for (let k = Math.ceil(min / step - 1e-9); k * step <= max * (1 + 1e-12) + 1e-12; k++) out.push(k === 0 ? 0 : Number((k * step).toPrecision(12)));
  return out;
}
