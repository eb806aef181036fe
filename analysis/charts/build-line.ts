import { formatPeriod, formatValue, type ValueFormat } from '../format.js';
import type { Grain, PeriodPoint } from '../types.js';
import { nextPeriod } from '../periods.js';
import { headerOf } from './header.js';
import type { ChartHeader, LineEvent, LineMark, LineSpec, LineUnusual } from './spec.js';

export interface LineInput extends ChartHeader {
  /** Name of the series, e.g. "Revenue"; shown in the legend when there is an overlay. */
  seriesLabel: string;
  grain: Grain;
  points: PeriodPoint[];
  format: ValueFormat;
  /** The same periods a year earlier, aligned with `points` by index. */
  overlay?: { label: string; values: (number | null)[] };
  /** Dated events (a launch, a price change) marked with a thin vertical rule and a short label. */
  events?: LineEvent[];
  /** Periods the outlier screen flagged, with their modified z-scores, and what the ring means in the legend. */
  unusual?: { legend: string; periods: { period: string; score: number }[] };
}

/** Unusual periods labelled at most; the rest are ringed only, so labels never crowd the line. */
export const MAX_UNUSUAL_LABELS = 4;

export function buildLine(input: LineInput): LineSpec {
  const locale = input.format.locale;
  const points = input.points.map((p) => ({
    label: formatPeriod(p.period, input.grain, locale),
    period: p.period,
    value: finiteOrNull(p.value),
    partial: p.partial,
  }));
  const spec: LineSpec = {
    kind: 'line',
    ...headerOf(input),
    seriesLabel: input.seriesLabel,
    grain: input.grain,
    points,
    format: { ...input.format },
    marks: highLowMarks(input.points, input.grain, input.format),
  };
  if (input.overlay) {
    const values = points.map((_, i) => finiteOrNull(input.overlay!.values[i] ?? null));
    spec.overlay = { label: input.overlay.label, values };
  }
  const events = (input.events ?? []).filter((e) => Number.isInteger(e.index) && e.index >= 0 && e.index < points.length && e.label.trim() !== '');
  if (events.length > 0) spec.events = events.map((e) => ({ index: e.index, label: e.label.trim() }));
  const unusual = unusualMarks(input, spec.marks);
  if (unusual.length > 0) spec.unusual = { legend: input.unusual!.legend, points: unusual };
  return spec;
}

/**
 * Marks the highest and lowest complete periods. Partial periods are never marked: a half-covered
 * last month is low only because it is unfinished, and a partial quarter that includes a busy
 * month is not the high its title's complete periods name. Fewer than two complete: no marks.
 */
function highLowMarks(points: PeriodPoint[], grain: Grain, fmt: ValueFormat): LineMark[] {
  const candidates = points
    .map((p, index) => ({ p, index }))
    .filter(({ p }) => p.value !== null && Number.isFinite(p.value) && !p.partial);
  if (candidates.length < 2) return [];
  let high = candidates[0]!;
  let low = candidates[0]!;
  for (const c of candidates) {
    if (c.p.value! > high.p.value!) high = c;
    if (c.p.value! < low.p.value!) low = c;
  }
  if (high.p.value === low.p.value) return [];
  const text = (label: string, c: typeof high) =>
    `${label}: ${formatValue(c.p.value, fmt, { compact: true })}, ${formatPeriod(c.p.period, grain, fmt.locale)}`;
  return [
    { role: 'high', index: high.index, text: text('High', high) },
    { role: 'low', index: low.index, text: text('Low', low) },
  ];
}

/**
 * Rings for the flagged periods that are on the chart as complete values; labels ("Dec 2015: 284.5") for the
 * MAX_UNUSUAL_LABELS furthest out (largest |score|) that are not already the marked high or low.
 */
function unusualMarks(input: LineInput, marks: readonly LineMark[]): LineUnusual[] {
  const fmt = input.format;
  const found = (input.unusual?.periods ?? []).flatMap((u) => {
    const index = input.points.findIndex((p) => p.period === u.period);
    const p = input.points[index];
    return p && !p.partial && p.value !== null && Number.isFinite(p.value) ? [{ index, value: p.value, score: u.score }] : [];
  });
  const marked = new Set(marks.map((m) => m.index));
  const labelled = new Set(
    found
      .filter((u) => !marked.has(u.index))
      .sort((a, b) => Math.abs(b.score) - Math.abs(a.score))
      .slice(0, MAX_UNUSUAL_LABELS)
      .map((u) => u.index),
  );
  return found
    .sort((a, b) => a.index - b.index)
    .map((u) => ({
      index: u.index,
      text: `${formatPeriod(input.points[u.index]!.period, input.grain, fmt.locale)}: ${formatValue(u.value, fmt, { compact: true })}`,
      above: u.score > 0,
      labelled: labelled.has(u.index),
    }));
}

function finiteOrNull(v: number | null): number | null {
  return v !== null && Number.isFinite(v) ? v : null;
}

/**
 * Index of the point whose period contains `date` (ISO), for placing an event; null when the
 * date falls outside the points (before the first period or after the last one ends).
 */
export function periodIndexOf(points: readonly { period: string }[], date: string, grain: Grain): number | null {
  const day = date.slice(0, 10);
  for (let i = points.length - 1; i >= 0; i--) {
    const start = points[i]!.period.slice(0, 10);
    if (start <= day) return day < nextPeriod(start, grain) ? i : null;
  }
  return null;
}
