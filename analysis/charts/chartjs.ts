// chart.js on a server-side canvas: registered once, given a frame plugin, drawn synchronously.
import type { Canvas, SKRSContext2D } from '@napi-rs/canvas';
import {
  BarController,
  BarElement,
  CategoryScale,
  Chart,
  LinearScale,
  LineController,
  LineElement,
  PointElement,
  type ChartConfiguration,
  type ChartType,
  type Plugin,
} from 'chart.js';
import { formatValue, type ValueFormat } from '../format.js';
import { drawFrame, type FrameLayout } from './frame.js';
import type { Box } from './geometry.js';
import { FONT_FAMILY, INK } from './theme.js';

let registered = false;

function ensureChartJs(): void {
  if (registered) return;
  Chart.register(BarController, BarElement, LineController, LineElement, PointElement, CategoryScale, LinearScale);
  Chart.defaults.font.family = FONT_FAMILY;
  Chart.defaults.color = INK.muted;
  registered = true;
}

export interface ChartHooks {
  /** Draws marks over the datasets; the context is in layout pixels. */
  afterDatasets?: (chart: Chart, ctx: SKRSContext2D) => void;
}

/**
 * Draws a chart.js chart into `canvas` (created at layout size; chart.js scales it by
 * `scale`). Returns the live chart so callers can read element positions; they must destroy it.
 */
export function drawChartJs<T extends ChartType>(
  canvas: Canvas,
  layout: FrameLayout,
  config: ChartConfiguration<T>,
  hooks: ChartHooks = {},
): Chart {
  ensureChartJs();
  const frame: Plugin = {
    id: 'threadcountFrame',
    beforeDraw(chart) {
      drawFrame(chart.ctx as unknown as SKRSContext2D, layout);
    },
    afterDatasetsDraw(chart) {
      const ctx = chart.ctx as unknown as SKRSContext2D;
      ctx.save();
      hooks.afterDatasets?.(chart, ctx);
      ctx.restore();
    },
  };
  const full = { ...config, plugins: [...(config.plugins ?? []), frame] } as ChartConfiguration;
  // chart.js accepts any object with getContext('2d'); the server canvas provides one.
  return new Chart(canvas.getContext('2d') as never, full);
}

/** Options every chart.js chart shares: static, unscaled layout, frame padding, no interaction. */
export function baseOptions(layout: FrameLayout, scale: number, extraPadding: Partial<Box> = {}) {
  const { plot } = layout;
  return {
    animation: false as const,
    responsive: false,
    maintainAspectRatio: false,
    devicePixelRatio: scale,
    events: [],
    layout: {
      padding: {
        left: plot.left + (extraPadding.left ?? 0),
        top: plot.top + (extraPadding.top ?? 0),
        right: layout.width - plot.right + (extraPadding.right ?? 0),
        bottom: layout.height - plot.bottom + (extraPadding.bottom ?? 0),
      },
    },
  };
}

export function tickFont(layout: FrameLayout) {
  return { size: Math.round(14 * layout.u * 10) / 10, family: FONT_FAMILY };
}

export function axisTitle(layout: FrameLayout, text: string) {
  return {
    display: text !== '',
    text,
    color: INK.text,
    font: { size: Math.round(14 * layout.u * 10) / 10, family: FONT_FAMILY },
    padding: { top: 6 * layout.u, bottom: 6 * layout.u },
  };
}

/** A value axis with compact tick labels in the metric's unit. */
export function valueAxis(layout: FrameLayout, fmt: ValueFormat) {
  return {
    type: 'linear' as const,
    grid: {
      // The zero line is drawn stronger: it is where bars start and where change turns negative.
      color: (c: { tick?: { value: number } }) => (c.tick?.value === 0 ? INK.axis : INK.grid),
      lineWidth: Math.max(1, layout.u),
      drawTicks: false,
    },
    border: { display: false },
    ticks: {
      font: tickFont(layout),
      color: INK.muted,
      padding: 8 * layout.u,
      maxTicksLimit: 6,
      callback: (value: number | string, _i: number, ticks: { value: number }[]) => formatTick(Number(value), ticks.map((t) => t.value), fmt),
    },
  };
}

/**
 * One axis label. Every tick gets the same, fewest decimals that show all of them exactly:
 * "0%, 20%, 40%" rather than "0.0%, 20.0%", and "€19.50, €20.00" rather than "€19.5, €20".
 * Large values keep the compact form ("€1.5M").
 */
export function formatTick(value: number, ticks: readonly number[], fmt: ValueFormat): string {
  const all = ticks.length > 0 ? ticks : [value];
  const exactAt = (scale: number, d: number) => all.every((t) => Math.abs(t * scale * 10 ** d - Math.round(t * scale * 10 ** d)) < 1e-6);
  if (fmt.unit === 'percent') {
    const d = [0, 1, 2, 3].find((k) => exactAt(100, k)) ?? 3;
    return formatValue(value, { ...fmt, decimals: d });
  }
  if (Math.max(...all.map(Math.abs)) < 1000) {
    const d = fmt.unit === 'currency' ? (exactAt(1, 0) ? 0 : 2) : ([0, 1, 2, 3].find((k) => exactAt(1, k)) ?? 3);
    return formatValue(value, { ...fmt, decimals: d });
  }
  return formatValue(value, fmt, { compact: true });
}

export function categoryAxis(layout: FrameLayout) {
  return {
    type: 'category' as const,
    grid: { display: false },
    border: { display: true, color: INK.axis, width: Math.max(1, layout.u) },
    ticks: { font: tickFont(layout), color: INK.text, padding: 6 * layout.u, maxRotation: 0, minRotation: 0 },
  };
}

/** Draws a label with a soft white backing so it stays legible over grid lines and bars. */
export function drawBackedText(
  ctx: SKRSContext2D,
  text: string,
  x: number,
  y: number,
  opts: { font: string; color: string; align: 'left' | 'center' | 'right'; baseline: 'top' | 'middle' | 'bottom'; pad: number },
): Box {
  ctx.font = opts.font;
  const m = ctx.measureText(text);
  const w = m.width;
  const h = m.actualBoundingBoxAscent + m.actualBoundingBoxDescent;
  const left = opts.align === 'left' ? x : opts.align === 'center' ? x - w / 2 : x - w;
  const top = opts.baseline === 'top' ? y : opts.baseline === 'middle' ? y - h / 2 : y - h;
  const box = { left: left - opts.pad, top: top - opts.pad, right: left + w + opts.pad, bottom: top + h + opts.pad };
  ctx.fillStyle = 'rgba(255,255,255,0.88)';
  ctx.fillRect(box.left, box.top, box.right - box.left, box.bottom - box.top);
  ctx.fillStyle = opts.color;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  ctx.fillText(text, left, top + m.actualBoundingBoxAscent);
  return box;
}

export function chartArea(chart: Chart): Box {
  const a = chart.chartArea;
  return { left: a.left, top: a.top, right: a.right, bottom: a.bottom };
}
