import type { Canvas, SKRSContext2D } from '@napi-rs/canvas';
import type { Chart, ChartConfiguration, ScriptableLineSegmentContext } from 'chart.js';
import { axisTitle, baseOptions, categoryAxis, chartArea, drawBackedText, drawChartJs, tickFont, valueAxis } from './chartjs.js';
import { layoutFrame, type LegendItem } from './frame.js';
import { emptyGeometry, scaleBox, type DrawResult, type Box } from './geometry.js';
import type { LineSpec } from './spec.js';
import { timeTicks } from './axis-ticks.js';
import { font, INK, OKABE_ITO } from './theme.js';

const MAIN = OKABE_ITO.blue;
const OVERLAY = '#8FBFE0'; // Okabe–Ito sky blue, lightened: last year recedes behind this year.

export function drawLine(canvas: Canvas, spec: LineSpec): DrawResult {
  const ctx = canvas.getContext('2d');
  const legend: LegendItem[] = [];
  const hasPartial = spec.points.some((p) => p.partial && p.value !== null);
  if (spec.overlay) {
    legend.push({ label: spec.seriesLabel, color: MAIN, shape: 'line' });
    legend.push({ label: spec.overlay.label, color: OVERLAY, shape: 'line' });
  }
  if (hasPartial) legend.push({ label: 'Partial period', color: MAIN, shape: 'hollow' });
  const layout = layoutFrame(ctx, spec, legend);
  const { u } = layout;

  const labels = spec.points.map((p) => p.label);
  const values = spec.points.map((p) => p.value);
  const partial = spec.points.map((p) => p.partial);
  const few = spec.points.length <= 18;
  ctx.font = font(tickFont(layout).size);
  const ticks = timeTicks(
    ctx,
    labels,
    spec.points.map((p) => p.period),
    spec.grain,
    spec.format.locale,
    layout.plot.right - layout.plot.left - 90 * u,
    22 * u,
  );

  const finite = values.filter((v): v is number => v !== null);
  const overlayFinite = (spec.overlay?.values ?? []).filter((v): v is number => v !== null);
  const all = [...finite, ...overlayFinite];
  const min = all.length ? Math.min(...all) : 0;
  const max = all.length ? Math.max(...all) : 0;
  // Start at zero when zero is near anyway; otherwise let the axis zoom in on the movement.
  const beginAtZero = min >= 0 && min < max * 0.4;

  const plotHeight = layout.plot.bottom - layout.plot.top - 50 * u;
  const labelRoom = 40 * u; // marker, gap, one line of bold text, padding
  const headroom = spec.marks.length > 0 ? Math.min(0.5, (labelRoom / Math.max(1, plotHeight - 2 * labelRoom)) * 1.1) : 0.04;

  const datasets: ChartConfiguration<'line'>['data']['datasets'] = [
    {
      data: values,
      borderColor: MAIN,
      borderWidth: 3 * u,
      borderJoinStyle: 'round',
      borderCapStyle: 'round',
      spanGaps: false,
      tension: 0,
      order: 0,
      pointRadius: spec.points.map((p) => (p.partial ? 5.5 * u : few ? 3.5 * u : 0)),
      pointBackgroundColor: spec.points.map((p) => (p.partial ? INK.background : MAIN)),
      pointBorderColor: MAIN,
      pointBorderWidth: 2.5 * u,
      segment: {
        borderDash: (c: ScriptableLineSegmentContext) =>
          partial[c.p0DataIndex] || partial[c.p1DataIndex] ? [7 * u, 5 * u] : undefined,
      },
    },
  ];
  if (spec.overlay) {
    datasets.push({
      data: spec.overlay.values,
      borderColor: OVERLAY,
      borderWidth: 2.5 * u,
      spanGaps: false,
      tension: 0,
      order: 1,
      pointRadius: 0,
    });
  }

  const marks: { role: string; x: number; y: number; box: Box }[] = [];
  const config: ChartConfiguration<'line'> = {
    type: 'line',
    data: { labels, datasets },
    options: {
      ...baseOptions(layout, spec.scale),
      scales: {
        x: {
          ...categoryAxis(layout),
          // Half a slot of room at each end, so edge markers and labels are not clipped.
          offset: true,
          ticks: { ...categoryAxis(layout).ticks, autoSkip: false, callback: (_v, i) => ticks[i] ?? null },
        },
        y: {
          ...valueAxis(layout, spec.format),
          beginAtZero,
          title: axisTitle(layout, ''),
          // Headroom for the high and low labels, in pixels turned into value units; nice tick
          // rounding only widens the range afterwards.
          afterDataLimits: (scale: { min: number; max: number }) => {
            const range = scale.max - scale.min || Math.abs(scale.max) || 1;
            scale.max += range * headroom;
            if (!(beginAtZero && scale.min === 0)) scale.min -= range * headroom;
          },
        },
      },
    },
  };

  const chart = drawChartJs(canvas, layout, config, {
    afterDatasets: (c, cx) => drawMarks(c, cx, spec, layout.u, layout.margin, layout.width, marks),
  });
  const s = spec.scale;
  const geometry = emptyGeometry(canvas.width, canvas.height, scaleBox(chartArea(chart), s));
  geometry.points = chart.getDatasetMeta(0).data.map((el, i) => ({
    x: el.x * s,
    y: values[i] === null ? Number.NaN : el.y * s,
  }));
  geometry.marks = marks.map((m) => ({ role: m.role, x: m.x * s, y: m.y * s, box: scaleBox(m.box, s) }));
  // chart.js clears the canvas when destroyed, so the caller releases it after encoding.
  return { geometry, release: () => chart.destroy() };
}

function drawMarks(
  chart: Chart,
  ctx: SKRSContext2D,
  spec: LineSpec,
  u: number,
  margin: number,
  width: number,
  out: { role: string; x: number; y: number; box: Box }[],
): void {
  const meta = chart.getDatasetMeta(0);
  const overlayMeta = spec.overlay ? chart.getDatasetMeta(1) : undefined;
  const area = chartArea(chart);
  const labelFont = font(14 * u, true);
  for (const mark of spec.marks) {
    const el = meta.data[mark.index];
    if (!el) continue;
    const { x, y } = el;
    // Keep the label clear of the overlay line at the same period, too.
    const other = overlayMeta?.data[mark.index];
    const otherY = other && spec.overlay?.values[mark.index] !== null && Number.isFinite(other.y) ? other.y : y;
    const clearAbove = Math.min(y, otherY);
    const clearBelow = Math.max(y, otherY);
    ctx.beginPath();
    ctx.arc(x, y, 6.5 * u, 0, Math.PI * 2);
    ctx.fillStyle = MAIN;
    ctx.fill();
    ctx.lineWidth = 2.5 * u;
    ctx.strokeStyle = INK.background;
    ctx.stroke();

    ctx.font = labelFont;
    const m = ctx.measureText(mark.text);
    const h = m.actualBoundingBoxAscent + m.actualBoundingBoxDescent;
    const gap = 14 * u;
    let above = mark.role === 'high';
    if (above && clearAbove - gap - h < area.top - 4 * u) above = false;
    if (!above && clearBelow + gap + h > area.bottom) above = true;
    // Keep the label inside the image: centred on the point unless that would clip an edge.
    const half = m.width / 2;
    const cx = Math.min(Math.max(x, margin + half), width - margin - half);
    const top = above ? clearAbove - gap - h : clearBelow + gap;
    const box = drawBackedText(ctx, mark.text, cx, top, {
      font: labelFont,
      color: INK.title,
      align: 'center',
      baseline: 'top',
      pad: 3 * u,
    });
    out.push({ role: mark.role, x, y, box });
  }
}
