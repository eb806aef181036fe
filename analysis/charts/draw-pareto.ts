import type { Canvas } from '@napi-rs/canvas';
import type { ChartConfiguration } from 'chart.js';
import { formatValue } from '../format.js';
import { axisTitle, baseOptions, categoryAxis, chartArea, drawBackedText, drawChartJs, tickFont, valueAxis } from './chartjs.js';
import { layoutFrame, type LegendItem } from './frame.js';
import { emptyGeometry, scaleBox, type DrawResult, type PlacedLine, type PlacedMark } from './geometry.js';
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
          order: 1,
        },
      ],
    },
    options: {
      // Room above the 100% line for the running-share labels.
      ...baseOptions(layout, spec.scale, { top: 26 * u }),
      scales: {
        x: { ...categoryAxis(layout), ticks: { ...categoryAxis(layout).ticks, autoSkip: false } },
        y: { ...valueAxis(layout, spec.format), beginAtZero: true, position: 'left', title: axisTitle(layout, spec.valueLabel) },
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
            stepSize: 0.2,
            callback: (v: number | string) => formatValue(Number(v), pctFmt),
          },
          title: axisTitle(layout, 'Cumulative share'),
        },
      },
    },
  } as unknown as ChartConfiguration<'bar'>;

  const marks: PlacedMark[] = [];
  const lines: PlacedLine[] = [];
  const chart = drawChartJs(canvas, layout, config, {
    afterDatasets: (c, cx) => {
      const area = chartArea(c);
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
      drawBackedText(cx, `${formatValue(spec.threshold, pctFmt)} of total`, area.right - 6 * u, y + 6 * u, {
        font: font(13 * u, true),
        color: INK.title,
        align: 'right',
        baseline: 'top',
        pad: 2 * u,
      });
      // Line points drawn again on top of the reference line, with their running share.
      const meta = c.getDatasetMeta(0);
      meta.data.forEach((el, i) => {
        const bar = spec.bars[i]!;
        const box = drawBackedText(cx, bar.cumulativeText, el.x, el.y - 10 * u, {
          font: font(13 * u, true),
          color: LINE_TEXT,
          align: 'center',
          baseline: 'bottom',
          pad: 2 * u,
        });
        marks.push({ role: 'cumulative', x: el.x, y: el.y, box });
      });
    },
  });
  const s = spec.scale;
  const geometry = emptyGeometry(canvas.width, canvas.height, scaleBox(chartArea(chart), s));
  geometry.points = chart.getDatasetMeta(1).data.map((el) => ({ x: el.x * s, y: el.y * s }));
  geometry.marks = marks.map((m) => ({ role: m.role, x: m.x * s, y: m.y * s, ...(m.box ? { box: scaleBox(m.box, s) } : {}) }));
  geometry.lines = lines.map((l) => ({ role: l.role, x1: l.x1 * s, y1: l.y1 * s, x2: l.x2 * s, y2: l.y2 * s }));
  // chart.js clears the canvas when destroyed, so the caller releases it after encoding.
  return { geometry, release: () => chart.destroy() };
}
