import type { Canvas } from '@napi-rs/canvas';
import type { ChartConfiguration } from 'chart.js';
import { baseOptions, chartArea, drawBackedText, drawChartJs, tickFont, valueAxis } from './chartjs.js';
import { layoutFrame } from './frame.js';
import { emptyGeometry, scaleBox, type DrawResult } from './geometry.js';
import type { BarsSpec } from './spec.js';
import { wrapText } from './text.js';
import { font, INK, OKABE_ITO } from './theme.js';

/** Horizontal bars: segment names stay readable, however long, and the ranking reads top-down. */
export function drawBars(canvas: Canvas, spec: BarsSpec): DrawResult {
  const ctx = canvas.getContext('2d');
  const layout = layoutFrame(ctx, spec);
  const { u } = layout;
  const width = layout.plot.right - layout.plot.left;

  ctx.font = font(tickFont(layout).size);
  const labels = spec.bars.map((b) => wrapText(ctx, b.label, width * 0.28, 2));
  const valueFont = font(14 * u, true);
  ctx.font = valueFont;
  const widestValue = Math.max(0, ...spec.bars.map((b) => ctx.measureText(b.text).width));
  const hasNegative = spec.bars.some((b) => b.value < 0);

  const config: ChartConfiguration<'bar'> = {
    type: 'bar',
    data: {
      labels,
      datasets: [
        {
          data: spec.bars.map((b) => b.value),
          backgroundColor: spec.bars.map((b) => (b.other ? INK.other : OKABE_ITO.blue)),
          categoryPercentage: 0.78,
          barPercentage: 0.9,
          maxBarThickness: 56 * u,
          borderRadius: 2 * u,
        },
      ],
    },
    options: {
      ...baseOptions(layout, spec.scale, { right: widestValue + 12 * u, left: hasNegative ? widestValue + 12 * u : 0 }),
      indexAxis: 'y',
      scales: {
        x: { ...valueAxis(layout, spec.format), beginAtZero: true },
        y: {
          type: 'category',
          grid: { display: false },
          border: { display: true, color: INK.axis, width: Math.max(1, u) },
          ticks: { font: tickFont(layout), color: INK.text, padding: 8 * u, autoSkip: false },
        },
      },
    },
  };

  const valueBoxes: { x: number; y: number }[] = [];
  const chart = drawChartJs(canvas, layout, config, {
    afterDatasets: (c, cx) => {
      c.getDatasetMeta(0).data.forEach((el, i) => {
        const bar = spec.bars[i]!;
        const right = bar.value >= 0;
        drawBackedText(cx, bar.text, right ? el.x + 8 * u : el.x - 8 * u, el.y, {
          font: valueFont,
          color: INK.title,
          align: right ? 'left' : 'right',
          baseline: 'middle',
          pad: 0,
        });
        valueBoxes.push({ x: el.x, y: el.y });
      });
    },
  });
  const s = spec.scale;
  const geometry = emptyGeometry(canvas.width, canvas.height, scaleBox(chartArea(chart), s));
  geometry.points = valueBoxes.map((p) => ({ x: p.x * s, y: p.y * s }));
  // chart.js clears the canvas when destroyed, so the caller releases it after encoding.
  return { geometry, release: () => chart.destroy() };
}
