import type { Canvas } from '@napi-rs/canvas';
import type { ChartConfiguration } from 'chart.js';
import { axisTitle, baseOptions, categoryAxis, chartArea, drawBackedText, drawChartJs, tickFont, valueAxis } from './chartjs.js';
import { layoutFrame, type LegendItem } from './frame.js';
import { emptyGeometry, scaleBox, type DrawResult, type PlacedLine, type PlacedMark } from './geometry.js';
import type { SeasonalProfileSpec } from './spec.js';
import { font, INK, OKABE_ITO } from './theme.js';
import type { Obstacle } from './placement.js';
import { layOutLabels, type ValueLabel } from './value-labels.js';
import { drawWhisker } from './whisker.js';

const ABOVE = OKABE_ITO.blue;
const BELOW = OKABE_ITO.skyBlue;

/** Bars per calendar month (1.0 = an average month), whiskers for the spread across years. */
export function drawSeasonalProfile(canvas: Canvas, spec: SeasonalProfileSpec): DrawResult {
  const ctx = canvas.getContext('2d');
  const hasRange = spec.months.some((m) => m.min !== null && m.max !== null);
  const units = spec.units;
  // The reference line is named in the legend, not on the plot, where it met the months' labels.
  const legend: LegendItem[] = [
    { label: spec.legend.above, color: ABOVE, shape: 'box' },
    { label: spec.legend.below, color: BELOW, shape: 'box' },
    { label: spec.legend.reference, color: INK.title, shape: 'dashed' },
    ...(hasRange ? [{ label: spec.rangeLabel, color: INK.title, shape: 'whisker' as const }] : []),
  ];
  const layout = layoutFrame(ctx, spec, legend);
  const { u } = layout;
  const top = Math.max(spec.reference, ...spec.months.map((m) => Math.max(m.index ?? 0, m.max ?? 0)));
  // A deviation in units runs below zero as well: the axis spans both sides with room for labels.
  const bottom = Math.min(0, ...spec.months.map((m) => Math.min(m.index ?? 0, m.min ?? 0)));
  // Room for a label beyond the outermost whisker, as a share of the value range.
  const room = labelRoom(layout);
  const step = top * 1.1 > 2.5 ? 0.5 : 0.25;
  const digits = step === 0.5 ? 1 : 2;
  const indexFmt = numberFormat(spec.locale, { minimumFractionDigits: digits, maximumFractionDigits: digits });

  const config: ChartConfiguration<'bar'> = {
    type: 'bar',
    data: {
      labels: spec.months.map((m) => m.label),
      datasets: [
        {
          data: spec.months.map((m) => m.index),
          backgroundColor: spec.months.map((m) => ((m.index ?? 0) >= spec.reference ? ABOVE : BELOW)),
          categoryPercentage: 0.78,
          barPercentage: 0.92,
          borderRadius: 2 * u,
        },
      ],
    },
    options: {
      ...baseOptions(layout, spec.scale),
      scales: {
        x: categoryAxis(layout),
        y: units ? deviationScale(layout, units, top, bottom, room) : {
          type: 'linear',
          beginAtZero: true,
          // Quarter steps keep the axis close to the data (1.75, not 2.0, for a 1.5 peak).
          max: Math.ceil(Math.max(top * 1.1, top * (1 + room)) / step) * step,
          grid: { color: INK.grid, lineWidth: Math.max(1, u), drawTicks: false },
          border: { display: false },
          ticks: {
            font: tickFont(layout),
            color: INK.muted,
            padding: 8 * u,
            stepSize: step,
            callback: (v: number | string) => indexFmt.format(Number(v)),
          },
          title: axisTitle(layout, spec.indexTitle ?? 'Seasonal index (average month = 1.0)'),
        },
      },
    },
  };

  const marks: PlacedMark[] = [];
  const lines: PlacedLine[] = [];
  const chart = drawChartJs(canvas, layout, config, {
    afterDatasets: (c, cx) => {
      const ys = c.scales['y']!;
      const area = chartArea(c);
      const refY = ys.getPixelForValue(spec.reference);
      cx.save();
      cx.strokeStyle = INK.title;
      cx.lineWidth = 1.5 * u;
      cx.setLineDash([8 * u, 5 * u]);
      cx.beginPath();
      cx.moveTo(area.left, refY);
      cx.lineTo(area.right, refY);
      cx.stroke();
      cx.restore();
      lines.push({ role: 'reference', x1: area.left, y1: refY, x2: area.right, y2: refY });
      const meta = c.getDatasetMeta(0);
      const barW = meta.data[0] ? (meta.data[0] as unknown as { width: number }).width : 40 * u;
      const obstacles: Obstacle[] = [{ kind: 'segment', segment: { a: { x: area.left, y: refY }, b: { x: area.right, y: refY } }, weight: 1 }];
      const anchors: MonthAnchor[] = [];
      meta.data.forEach((el, i) => {
        const m = spec.months[i]!;
        const end = m.index === null ? refY : el.y;
        const base = (el as unknown as { base?: number }).base ?? refY;
        obstacles.push({ kind: 'box', box: { left: el.x - barW / 2, top: Math.min(end, base), right: el.x + barW / 2, bottom: Math.max(end, base) }, weight: 3 });
        let high = end;
        let low = end;
        if (m.min !== null && m.max !== null) {
          const lo = ys.getPixelForValue(m.min);
          const hi = ys.getPixelForValue(m.max);
          drawWhisker(cx, el.x, lo, hi, Math.min(18 * u, barW * 0.45), true, INK.title, 2 * u);
          marks.push({ role: 'range-low', x: el.x, y: lo }, { role: 'range-high', x: el.x, y: hi });
          obstacles.push({ kind: 'segment', segment: { a: { x: el.x, y: hi }, b: { x: el.x, y: lo } }, weight: 3 });
          high = Math.min(high, hi);
          low = Math.max(low, lo);
        }
        if (m.index !== null) anchors.push({ month: i, x: el.x, end, high, low, up: m.index >= spec.reference });
      });
      const found = spec.months.map((m) => m.index);
      const highest = anchors.reduce<MonthAnchor | null>((b, a) => (b === null || found[a.month]! > found[b.month]! ? a : b), null);
      const lowest = anchors.reduce<MonthAnchor | null>((b, a) => (b === null || found[a.month]! < found[b.month]! ? a : b), null);
      const gap = 5 * u;
      const labels: ValueLabel[] = anchors.map((a) => ({
        text: spec.months[a.month]!.text,
        keep: a === highest || a === lowest,
        spots: (w, h) => {
          const at = (y: number, below: boolean) => ({ left: a.x - w / 2, top: below ? y : y - h, right: a.x + w / 2, bottom: below ? y + h : y });
          // Always on the bar's own side, so the side still reads as the sign: beyond the whisker;
          // else one line further out, clear of a neighbour's label; else beside the bar's end.
          const far = a.up ? at(a.high - gap, false) : at(a.low + gap, true);
          const staggered = a.up ? at(a.high - 2 * gap - h, false) : at(a.low + 2 * gap + h, true);
          const near = a.up ? at(a.end - gap, false) : at(a.end + gap, true);
          return [far, staggered, near];
        },
      }));
      const fontOf = (size: number) => font(size, true);
      const laid = layOutLabels(cx, labels, { sizes: [13 * u, 12 * u, 11 * u], font: fontOf, gap: 4 * u, obstacles, bounds: area });
      for (const p of laid.placed) {
        const a = anchors[p.index]!;
        const text = labels[p.index]!.text;
        drawBackedText(cx, text, p.box.left, p.box.top, { font: fontOf(laid.size), color: INK.title, align: 'left', baseline: 'top', pad: 1.5 * u });
        marks.push({ role: 'value-label', x: a.x, y: a.end, box: p.box, text, fontSize: laid.size });
      }
    },
  });
  const s = spec.scale;
  const geometry = emptyGeometry(canvas.width, canvas.height, scaleBox(chartArea(chart), s));
  geometry.valueAxis = { min: chart.scales['y']!.min, max: chart.scales['y']!.max };
  geometry.points = chart.getDatasetMeta(0).data.map((el) => ({ x: el.x * s, y: el.y * s }));
  geometry.marks = marks.map((m) => ({
    ...m,
    x: m.x * s,
    y: m.y * s,
    ...(m.box ? { box: scaleBox(m.box, s) } : {}),
    ...(m.fontSize !== undefined ? { fontSize: m.fontSize * s } : {}),
  }));
  geometry.lines = lines.map((l) => ({ role: l.role, x1: l.x1 * s, y1: l.y1 * s, x2: l.x2 * s, y2: l.y2 * s }));
  // chart.js clears the canvas when destroyed, so the caller releases it after encoding.
  return { geometry, release: () => chart.destroy() };
}

/** Where a month's label may go: its bar's end and the whisker's two ends, in layout pixels. */
interface MonthAnchor {
  month: number;
  x: number;
  end: number;
  /** The topmost and lowest pixel of the bar and whisker together. */
  high: number;
  low: number;
  up: boolean;
}

/** A label's height and gap as a share of the plot's height, so the axis leaves that much beyond the data. */
function labelRoom(layout: ReturnType<typeof layoutFrame>): number {
  const plotHeight = Math.max(1, layout.plot.bottom - layout.plot.top - 40 * layout.u);
  const px = 24 * layout.u;
  return px / Math.max(px, plotHeight - 2 * px);
}

/** The value axis of a deviation in units: through zero, a little beyond both extremes, ticks in the metric's format. */
function deviationScale(layout: ReturnType<typeof layoutFrame>, units: NonNullable<SeasonalProfileSpec['units']>, top: number, bottom: number, room: number) {
  const axis = valueAxis(layout, units.format);
  const pad = (top - bottom) * Math.max(0.05, room) || 1;
  return { ...axis, suggestedMax: top + pad, suggestedMin: bottom - pad, title: axisTitle(layout, units.axisTitle) };
}

function numberFormat(locale: string, options: Intl.NumberFormatOptions): Intl.NumberFormat {
  try {
    return new Intl.NumberFormat(locale, options);
  } catch {
    return new Intl.NumberFormat('en', options);
  }
}
