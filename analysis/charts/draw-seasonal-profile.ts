import type { Canvas } from '@napi-rs/canvas';
import type { ChartConfiguration } from 'chart.js';
import { axisTitle, baseOptions, categoryAxis, chartArea, drawBackedText, drawChartJs, tickFont, valueAxis } from './chartjs.js';
import { layoutFrame, type LegendItem } from './frame.js';
import { emptyGeometry, scaleBox, type DrawResult, type PlacedLine, type PlacedMark } from './geometry.js';
import type { SeasonalProfileSpec } from './spec.js';
import { font, INK, OKABE_ITO } from './theme.js';
import { drawWhisker } from './whisker.js';

const ABOVE = OKABE_ITO.blue;
const BELOW = OKABE_ITO.skyBlue;

/** Bars per calendar month (1.0 = an average month), whiskers for the spread across years. */
export function drawSeasonalProfile(canvas: Canvas, spec: SeasonalProfileSpec): DrawResult {
  const ctx = canvas.getContext('2d');
  const hasRange = spec.months.some((m) => m.min !== null && m.max !== null);
  const units = spec.units;
  const legend: LegendItem[] = [
    { label: units?.above ?? 'Busier than an average month', color: ABOVE, shape: 'box' },
    { label: units?.below ?? 'Quieter', color: BELOW, shape: 'box' },
    ...(hasRange ? [{ label: spec.rangeLabel, color: INK.title, shape: 'whisker' as const }] : []),
  ];
  const layout = layoutFrame(ctx, spec, legend);
  const { u } = layout;
  const top = Math.max(spec.reference, ...spec.months.map((m) => Math.max(m.index ?? 0, m.max ?? 0)));
  // A deviation in units runs below zero as well: the axis spans both sides with room for labels.
  const bottom = Math.min(0, ...spec.months.map((m) => Math.min(m.index ?? 0, m.min ?? 0)));
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
        y: units ? deviationScale(layout, units, top, bottom) : {
          type: 'linear',
          beginAtZero: true,
          // Quarter steps keep the axis close to the data (1.75, not 2.0, for a 1.5 peak).
          max: Math.ceil((top * 1.1) / step) * step,
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
      const tops: number[] = [];
      meta.data.forEach((el, i) => {
        const m = spec.months[i]!;
        // A bar below the reference is labelled beneath its end, one above it over its end.
        const down = m.index !== null && m.index < spec.reference;
        let labelY = m.index === null ? area.bottom : el.y;
        if (m.min !== null && m.max !== null) {
          const lo = ys.getPixelForValue(m.min);
          const hi = ys.getPixelForValue(m.max);
          drawWhisker(cx, el.x, lo, hi, Math.min(18 * u, barW * 0.45), true, INK.title, 2 * u);
          marks.push({ role: 'range-low', x: el.x, y: lo }, { role: 'range-high', x: el.x, y: hi });
          labelY = down ? Math.max(labelY, lo) : Math.min(labelY, hi);
        }
        tops.push(down ? refY : labelY);
        if (m.index === null) return;
        drawBackedText(cx, m.text, el.x, down ? labelY + 5 * u : labelY - 5 * u, {
          font: font(13 * u, true),
          color: INK.title,
          align: 'center',
          baseline: down ? 'top' : 'bottom',
          pad: 1.5 * u,
        });
      });
      // The reference label goes above the line at whichever end has the lower bars.
      const first = tops[0] ?? area.bottom;
      const last = tops[tops.length - 1] ?? area.bottom;
      const atLeft = first > last;
      drawBackedText(cx, units ? units.referenceLabel : `Average month = ${indexFmt.format(spec.reference)}`, atLeft ? area.left + 6 * u : area.right - 6 * u, refY - 6 * u, {
        font: font(13 * u),
        color: INK.text,
        align: atLeft ? 'left' : 'right',
        baseline: 'bottom',
        pad: 2 * u,
      });
    },
  });
  const s = spec.scale;
  const geometry = emptyGeometry(canvas.width, canvas.height, scaleBox(chartArea(chart), s));
  geometry.valueAxis = { min: chart.scales['y']!.min, max: chart.scales['y']!.max };
  geometry.points = chart.getDatasetMeta(0).data.map((el) => ({ x: el.x * s, y: el.y * s }));
  geometry.marks = marks.map((m) => ({ role: m.role, x: m.x * s, y: m.y * s }));
  geometry.lines = lines.map((l) => ({ role: l.role, x1: l.x1 * s, y1: l.y1 * s, x2: l.x2 * s, y2: l.y2 * s }));
  // chart.js clears the canvas when destroyed, so the caller releases it after encoding.
  return { geometry, release: () => chart.destroy() };
}

/** The value axis of a deviation in units: through zero, a little beyond both extremes, ticks in the metric's format. */
function deviationScale(layout: ReturnType<typeof layoutFrame>, units: NonNullable<SeasonalProfileSpec['units']>, top: number, bottom: number) {
  const axis = valueAxis(layout, units.format);
  const pad = (top - bottom) * 0.05 || 1;
  return { ...axis, suggestedMax: top + pad, suggestedMin: bottom - pad, title: axisTitle(layout, units.axisTitle) };
}

function numberFormat(locale: string, options: Intl.NumberFormatOptions): Intl.NumberFormat {
  try {
    return new Intl.NumberFormat(locale, options);
  } catch {
    return new Intl.NumberFormat('en', options);
  }
}
