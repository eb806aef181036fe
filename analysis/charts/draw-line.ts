import type { Canvas, SKRSContext2D } from '@napi-rs/canvas';
import type { Chart, ChartConfiguration, ScriptableLineSegmentContext } from 'chart.js';
import { axisTitle, baseOptions, categoryAxis, chartArea, drawBackedText, drawChartJs, tickFont, valueAxis } from './chartjs.js';
import { layoutFrame, type LegendItem } from './frame.js';
import { emptyGeometry, scaleBox, type Box, type DrawResult, type PlacedLine } from './geometry.js';
import { pickPlacement, polyline, type Candidate, type Obstacle } from './placement.js';
import type { LineSpec } from './spec.js';
import { timeTicks } from './axis-ticks.js';
import { font, INK, OKABE_ITO } from './theme.js';

const MAIN = OKABE_ITO.blue;
const OVERLAY = '#8FBFE0'; // Okabe–Ito sky blue, lightened: last year recedes behind this year.
const EVENT = INK.text;
// Okabe–Ito vermillion: the unusual periods' rings and labels stand apart from the blue line and its high/low dots.
const UNUSUAL = OKABE_ITO.vermillion;

export function drawLine(canvas: Canvas, spec: LineSpec): DrawResult {
  const ctx = canvas.getContext('2d');
  const legend: LegendItem[] = [];
  const hasPartial = spec.points.some((p) => p.partial && p.value !== null);
  if (spec.overlay) {
    legend.push({ label: spec.seriesLabel, color: MAIN, shape: 'line' });
    legend.push({ label: spec.overlay.label, color: OVERLAY, shape: 'line' });
  }
  if (hasPartial) legend.push({ label: 'Partial period', color: MAIN, shape: 'hollow' });
  if (spec.unusual) legend.push({ label: spec.unusual.legend, color: UNUSUAL, shape: 'ring' });
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
  const headroom = spec.marks.length > 0 || (spec.unusual?.points.length ?? 0) > 0 ? Math.min(0.5, (labelRoom / Math.max(1, plotHeight - 2 * labelRoom)) * 1.1) : 0.04;

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
  const lines: PlacedLine[] = [];
  const events = spec.events ?? [];
  // Event labels sit in a band above the plot, so they never cover the data.
  const eventRoom = events.length > 0 ? 24 * u : 0;
  const config: ChartConfiguration<'line'> = {
    type: 'line',
    data: { labels, datasets },
    options: {
      ...baseOptions(layout, spec.scale, { top: eventRoom }),
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
    afterDatasets: (c, cx) => drawAnnotations(c, cx, spec, layout.u, eventRoom, marks, lines),
  });
  const s = spec.scale;
  const geometry = emptyGeometry(canvas.width, canvas.height, scaleBox(chartArea(chart), s));
  geometry.valueAxis = { min: chart.scales['y']!.min, max: chart.scales['y']!.max };
  geometry.points = chart.getDatasetMeta(0).data.map((el, i) => ({
    x: el.x * s,
    y: values[i] === null ? Number.NaN : el.y * s,
  }));
  geometry.marks = marks.map((m) => ({ role: m.role, x: m.x * s, y: m.y * s, box: scaleBox(m.box, s) }));
  geometry.lines = lines.map((l) => ({ role: l.role, x1: l.x1 * s, y1: l.y1 * s, x2: l.x2 * s, y2: l.y2 * s }));
  // chart.js clears the canvas when destroyed, so the caller releases it after encoding.
  return { geometry, release: () => chart.destroy() };
}

/** Event rules and labels, then the high and low markers with labels placed clear of both lines. */
function drawAnnotations(
  chart: Chart,
  ctx: SKRSContext2D,
  spec: LineSpec,
  u: number,
  eventRoom: number,
  out: { role: string; x: number; y: number; box: Box }[],
  lines: PlacedLine[],
): void {
  const meta = chart.getDatasetMeta(0);
  const area = chartArea(chart);
  const pointsOf = (data: { x: number; y: number }[], vals: (number | null)[]) =>
    data.map((el, i) => (vals[i] === null || vals[i] === undefined ? null : { x: el.x, y: el.y }));
  const main = pointsOf(meta.data, spec.points.map((p) => p.value));
  const overlay = spec.overlay ? pointsOf(chart.getDatasetMeta(1).data, spec.overlay.values) : [];
  const overlaySegments = polyline(overlay);
  for (const seg of overlaySegments) lines.push({ role: 'overlay', x1: seg.a.x, y1: seg.a.y, x2: seg.b.x, y2: seg.b.y });
  const obstacles: Obstacle[] = [
    ...polyline(main).map((segment) => ({ kind: 'segment' as const, segment, weight: 40 })),
    ...overlaySegments.map((segment) => ({ kind: 'segment' as const, segment, weight: 40 })),
  ];

  // Events: a thin dashed rule through the plot, its label in the band above.
  const eventFont = font(13 * u, true);
  const xScale = chart.scales['x']!;
  for (const event of spec.events ?? []) {
    const x = xScale.getPixelForValue(event.index);
    if (!Number.isFinite(x)) continue;
    ctx.font = eventFont;
    const m = ctx.measureText(event.label);
    const pad = 2 * u;
    const w = m.width + 2 * pad;
    const h = m.actualBoundingBoxAscent + m.actualBoundingBoxDescent + 2 * pad;
    const top = area.top - eventRoom + 2 * u;
    // Beside the rule's top, on the side with room.
    const left = x + 6 * u + w <= area.right ? x + 5 * u : x - 5 * u - w;
    const box = { left, top, right: left + w, bottom: top + h };
    ctx.save();
    ctx.strokeStyle = EVENT;
    ctx.lineWidth = 1.5 * u;
    ctx.setLineDash([5 * u, 4 * u]);
    ctx.beginPath();
    ctx.moveTo(x, top);
    ctx.lineTo(x, area.bottom);
    ctx.stroke();
    ctx.restore();
    drawBackedText(ctx, event.label, left + pad, top + pad, { font: eventFont, color: EVENT, align: 'left', baseline: 'top', pad });
    obstacles.push({ kind: 'segment', segment: { a: { x, y: top }, b: { x, y: area.bottom } }, weight: 8 });
    obstacles.push({ kind: 'box', box, weight: 100 });
    out.push({ role: 'event', x, y: area.top, box });
    lines.push({ role: 'event', x1: x, y1: top, x2: x, y2: area.bottom });
  }

  // Markers first, so every label can keep clear of every marker.
  const placed = spec.marks.flatMap((mark) => {
    const p = main[mark.index];
    return p ? [{ mark, x: p.x, y: p.y }] : [];
  });
  for (const { x, y } of placed) {
    ctx.beginPath();
    ctx.arc(x, y, 6.5 * u, 0, Math.PI * 2);
    ctx.fillStyle = MAIN;
    ctx.fill();
    ctx.lineWidth = 2.5 * u;
    ctx.strokeStyle = INK.background;
    ctx.stroke();
    obstacles.push({ kind: 'box', box: { left: x - 8 * u, top: y - 8 * u, right: x + 8 * u, bottom: y + 8 * u }, weight: 100 });
  }

  // Unusual periods: a vermillion ring around the point, wider than the high/low dot so both show on one point.
  const rings = (spec.unusual?.points ?? []).flatMap((r) => {
    const p = main[r.index];
    return p ? [{ r, x: p.x, y: p.y }] : [];
  });
  for (const { x, y } of rings) {
    ctx.save();
    ctx.beginPath();
    ctx.arc(x, y, 10 * u, 0, Math.PI * 2);
    ctx.lineWidth = 3 * u;
    ctx.strokeStyle = UNUSUAL;
    ctx.stroke();
    ctx.restore();
    obstacles.push({ kind: 'box', box: { left: x - 12 * u, top: y - 12 * u, right: x + 12 * u, bottom: y + 12 * u }, weight: 100 });
    out.push({ role: 'unusual', x, y, box: { left: x - 10 * u, top: y - 10 * u, right: x + 10 * u, bottom: y + 10 * u } });
  }

  const labelFont = font(14 * u, true);
  // The plot, plus a sliver above it; never left of the y axis or over the x axis labels.
  const bounds = { left: area.left, top: area.top - (eventRoom > 0 ? 0 : 4 * u), right: area.right, bottom: area.bottom - 1 };
  for (const { mark, x, y } of placed) {
    ctx.font = labelFont;
    const m = ctx.measureText(mark.text);
    const pad = 3 * u;
    const w = m.width + 2 * pad;
    const h = m.actualBoundingBoxAscent + m.actualBoundingBoxDescent + 2 * pad;
    const chosen = pickPlacement(markCandidates(x, y, w, h, mark.role === 'high', u, bounds), obstacles, bounds);
    const box = chosen.box;
    if (chosen.leader) {
      // Moved away from its point: a thin leader keeps the label tied to it.
      const ty = box.top > y ? box.top : box.bottom;
      ctx.save();
      ctx.strokeStyle = INK.muted;
      ctx.lineWidth = Math.max(1, u);
      ctx.beginPath();
      ctx.moveTo(x, y + (ty > y ? 7 * u : -7 * u));
      ctx.lineTo(Math.min(Math.max(x, box.left + pad), box.right - pad), ty);
      ctx.stroke();
      ctx.restore();
    }
    drawBackedText(ctx, mark.text, box.left + pad, box.top + pad, { font: labelFont, color: INK.title, align: 'left', baseline: 'top', pad });
    obstacles.push({ kind: 'box', box, weight: 100 });
    out.push({ role: mark.role, x, y, box });
  }

  const unusualFont = font(13 * u, true);
  for (const { r, x, y } of rings) {
    if (!r.labelled) continue;
    ctx.font = unusualFont;
    const m = ctx.measureText(r.text);
    const pad = 3 * u;
    const w = m.width + 2 * pad;
    const h = m.actualBoundingBoxAscent + m.actualBoundingBoxDescent + 2 * pad;
    const chosen = pickPlacement(markCandidates(x, y, w, h, r.above, u, bounds), obstacles, bounds);
    const box = chosen.box;
    if (chosen.leader) {
      const ty = box.top > y ? box.top : box.bottom;
      ctx.save();
      ctx.strokeStyle = UNUSUAL;
      ctx.lineWidth = Math.max(1, u);
      ctx.beginPath();
      ctx.moveTo(x, y + (ty > y ? 10 * u : -10 * u));
      ctx.lineTo(Math.min(Math.max(x, box.left + pad), box.right - pad), ty);
      ctx.stroke();
      ctx.restore();
    }
    drawBackedText(ctx, r.text, box.left + pad, box.top + pad, { font: unusualFont, color: UNUSUAL, align: 'left', baseline: 'top', pad });
    obstacles.push({ kind: 'box', box, weight: 100 });
    out.push({ role: 'unusual-label', x, y, box });
  }
}

/**
 * Where a high or low label may go: above or below its point (the high prefers above, the low
 * below), centred or shifted sideways, a step or more further out if nearer spots are taken.
 */
function markCandidates(x: number, y: number, w: number, h: number, high: boolean, u: number, bounds: Box): (Candidate & { leader: boolean })[] {
  const out: (Candidate & { leader: boolean })[] = [];
  const gap = 12 * u;
  const clampLeft = (left: number) => Math.min(Math.max(left, bounds.left), bounds.right - w);
  for (const above of high ? [true, false] : [false, true]) {
    const sidePenalty = above === high ? 0 : 4;
    for (let level = 0; level < 4; level++) {
      const off = gap + level * (h + 4 * u);
      const top = above ? y - off - h : y + off;
      const lefts: [number, number][] = [
        [clampLeft(x - w / 2), 0],
        [clampLeft(x - 10 * u), 1],
        [clampLeft(x + 10 * u - w), 1],
      ];
      for (const [left, shift] of lefts) {
        out.push({ box: { left, top, right: left + w, bottom: top + h }, penalty: sidePenalty + level * 3 + shift, leader: level > 0 });
      }
    }
  }
  // Beside the point, level with it.
  for (const [left, penalty] of [
    [x + 12 * u, 6],
    [x - 12 * u - w, 6],
  ] as const) {
    out.push({ box: { left, top: y - h / 2, right: left + w, bottom: y + h / 2 }, penalty, leader: false });
  }
  return out;
}
