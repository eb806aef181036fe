import type { Canvas } from '@napi-rs/canvas';
import type { ChartConfiguration } from 'chart.js';
import { axisTitle, baseOptions, chartArea, drawChartJs, tickFont, valueAxis } from './chartjs.js';
import { layoutFrame, type LegendItem } from './frame.js';
import { emptyGeometry, scaleBox, type DrawResult, type PlacedMark } from './geometry.js';
import type { GroupCompareSpec } from './spec.js';
import { wrapText } from './text.js';
import { font, INK, OKABE_ITO } from './theme.js';
import { drawWhisker } from './whisker.js';

const GROUP_COLOURS = [OKABE_ITO.blue, OKABE_ITO.orange, OKABE_ITO.bluishGreen, OKABE_ITO.reddishPurple, OKABE_ITO.skyBlue];

/** One horizontal bar per group, its confidence interval as a whisker, the numbers beside it. */
export function drawGroupCompare(canvas: Canvas, spec: GroupCompareSpec): DrawResult {
  const ctx = canvas.getContext('2d');
  const levelText = `${Math.round(spec.level * 1000) / 10}% confidence interval`;
  const legend: LegendItem[] = spec.groups.some((g) => g.low !== null && g.high !== null)
    ? [{ label: levelText, color: INK.title, shape: 'whisker' }]
    : [];
  const layout = layoutFrame(ctx, spec, legend);
  const { u } = layout;
  const width = layout.plot.right - layout.plot.left;

  ctx.font = font(tickFont(layout).size);
  const labels = spec.groups.map((g) => [...wrapText(ctx, g.label, width * 0.26, 2), g.nText]);
  const estFont = font(16 * u, true);
  const ciFont = font(13 * u);
  const widest = Math.max(
    0,
    ...spec.groups.map((g) => {
      ctx.font = estFont;
      const a = ctx.measureText(g.estimateText).width;
      ctx.font = ciFont;
      return Math.max(a, ctx.measureText(g.intervalText).width);
    }),
  );
  const maxValue = Math.max(0, ...spec.groups.map((g) => Math.max(g.estimate, g.high ?? g.estimate)));
  const axis = niceAxis(maxValue * 1.04);

  const config: ChartConfiguration<'bar'> = {
    type: 'bar',
    data: {
      labels,
      datasets: [
        {
          data: spec.groups.map((g) => g.estimate),
          backgroundColor: spec.groups.map((_, i) => GROUP_COLOURS[i % GROUP_COLOURS.length]!),
          categoryPercentage: 0.7,
          barPercentage: 0.9,
          maxBarThickness: 90 * u,
          borderRadius: 2 * u,
        },
      ],
    },
    options: {
      ...baseOptions(layout, spec.scale, { right: widest + 18 * u }),
      indexAxis: 'y',
      scales: {
        x: {
          ...valueAxis(layout, spec.format),
          beginAtZero: true,
          // A round maximum just past the data, on a whole number of round steps: chart.js's own
          // choice can leave a third empty, or end on a stray tick ("100K 120K" after steps of 50K).
          max: axis.max,
          ticks: { ...valueAxis(layout, spec.format).ticks, stepSize: axis.step, maxTicksLimit: axis.intervals + 1 },
          title: axisTitle(layout, spec.valueLabel),
        },
        y: {
          type: 'category',
          grid: { display: false },
          border: { display: true, color: INK.axis, width: Math.max(1, u) },
          ticks: { font: { ...tickFont(layout), size: 15 * u }, color: INK.title, padding: 10 * u, autoSkip: false },
        },
      },
    },
  };

  const marks: PlacedMark[] = [];
  const chart = drawChartJs(canvas, layout, config, {
    afterDatasets: (c, cx) => {
      const xs = c.scales['x']!;
      c.getDatasetMeta(0).data.forEach((el, i) => {
        const g = spec.groups[i]!;
        let end = el.x;
        if (g.low !== null && g.high !== null) {
          const lo = xs.getPixelForValue(g.low);
          const hi = xs.getPixelForValue(g.high);
          drawWhisker(cx, el.y, lo, hi, 22 * u, false, INK.title, 2.5 * u);
          marks.push({ role: 'ci-low', x: lo, y: el.y }, { role: 'ci-high', x: hi, y: el.y });
          end = Math.max(end, hi);
        }
        const x = end + 12 * u;
        cx.textAlign = 'left';
        cx.textBaseline = g.intervalText ? 'alphabetic' : 'middle';
        cx.fillStyle = INK.title;
        cx.font = estFont;
        cx.fillText(g.estimateText, x, g.intervalText ? el.y - 2 * u : el.y);
        if (g.intervalText) {
          cx.textBaseline = 'top';
          cx.font = ciFont;
          cx.fillStyle = INK.muted;
          cx.fillText(g.intervalText, x, el.y + 3 * u);
        }
      });
    },
  });
  const s = spec.scale;
  const geometry = emptyGeometry(canvas.width, canvas.height, scaleBox(chartArea(chart), s));
  geometry.valueAxis = { min: chart.scales['x']!.min, max: chart.scales['x']!.max };
  geometry.points = chart.getDatasetMeta(0).data.map((el) => ({ x: el.x * s, y: el.y * s }));
  geometry.marks = marks.map((m) => ({ role: m.role, x: m.x * s, y: m.y * s }));
  // chart.js clears the canvas when destroyed, so the caller releases it after encoding.
  return { geometry, release: () => chart.destroy() };
}

/** The smallest round maximum reachable in 4 to 6 round steps (1, 2, 2.5 or 5 × 10^k) at or above `v`. */
export function niceAxis(v: number): { max: number; step: number; intervals: number } {
  if (!(v > 0)) return { max: 1, step: 0.2, intervals: 5 };
  let best = { max: Number.POSITIVE_INFINITY, step: 1, intervals: 5 };
  for (const intervals of [4, 5, 6]) {
    const raw = v / intervals;
    const magnitude = 10 ** Math.floor(Math.log10(raw));
    const step = [1, 2, 2.5, 5, 10].map((m) => m * magnitude).find((st) => st >= raw * (1 - 1e-9))!;
    const max = Number((step * intervals).toPrecision(12));
    if (max < best.max * (1 - 1e-9)) best = { max, step, intervals };
  }
  return best;
}
