// Words the KPI captions share: a change against a
// comparison point, period names and segment labels. Every number and date goes through format.ts.
import { metricDirection, onIntervalScale } from '../catalog.js';
import type { DatasetConfig, Dimension, Metric } from '../../config/schema.js';
import type { KpiDelta, SegmentKey } from '../findings/kpi.js';
import { formatChange, formatPeriod, formatPointChange, formatValue, valueFormatOf } from '../format.js';
import type { Grain } from '../types.js';
import { inSentence, pluralNoun } from './grammar.js';

// Changes smaller than this are "level": the KPI card uses the same cut, so words and arrows agree.
export const FLAT_RELATIVE = 0.0005;
// Rates move in percentage points; under 0.05 points is level.
export const FLAT_POINTS = 0.0005;

export function isRate(metric: Metric): boolean {
  return metric.unit === 'percent';
}

/** A value with about three significant figures: "€20.9", "€198K", "5.1%". */
export function kpiValue(value: number | null, metric: Metric, locale: string): string {
  return formatValue(value, valueFormatOf(metric, locale), { compact: true });
}

/**
 * The value exactly as the KPI card shows it ("€20.93"), for a snapshot's headline: a fare
 * with its catalog decimals reads the same in the title and in the picture.
 */
export function cardValue(value: number | null, metric: Metric, locale: string): string {
  if (value !== null && metric.decimals !== undefined && Math.abs(value) < 1000) return formatValue(value, valueFormatOf(metric, locale));
  return kpiValue(value, metric, locale);
}


/** "up 1.3 pts", "down 0.8 pts", "about the same as": a share moving between two periods. */
export function shareMove(diff: number, locale: string, flat: number): string {
  if (Math.abs(diff) < flat) return 'about the same as';
  return `${diff > 0 ? 'up' : 'down'} ${formatPointChange(Math.abs(diff), locale)} on`;
}

/** A share or rate difference in percentage points, signed: "+1.3 pts" (format.ts formatPointChange). */
export function points(diff: number, locale: string): string {
  return formatPointChange(diff, locale, { signed: true });
}

/** Unsigned size of a change: "1.6%", "0.4 pts"; null when there is no comparable base. */
export function changeSize(d: KpiDelta, metric: Metric, locale: string): string | null {
  if (d.absolute === null) return null;
  if (isRate(metric)) return formatPointChange(Math.abs(d.absolute), locale);
  if (d.relative !== null && !onIntervalScale(metric)) return formatChange(Math.abs(d.relative), locale).replace(/^\+/, '');
  // A zero or negative base: the relative change is undefined, so give the difference itself.
  return formatValue(Math.abs(d.absolute), valueFormatOf(metric, locale), { compact: true });
}

export type Direction = 'up' | 'down' | 'level' | 'none';

export function directionOf(d: KpiDelta, metric: Metric): Direction {
  if (d.absolute === null) return 'none';
  const flat = isRate(metric) ? Math.abs(d.absolute) < FLAT_POINTS : d.relative !== null && !onIntervalScale(metric) ? Math.abs(d.relative) < FLAT_RELATIVE : d.absolute === 0;
  if (flat) return 'level';
  return d.absolute > 0 ? 'up' : 'down';
}

/** "up 1.6%", "down 0.4 pts", "level"; null when there is no base to compare with. */
export function changePhrase(d: KpiDelta, metric: Metric, locale: string): string | null {
  const dir = directionOf(d, metric);
  if (dir === 'none') return null;
  if (dir === 'level') return 'level';
  return `${dir} ${changeSize(d, metric, locale)}`;
}

/** A signed short change for labels: "+1.6%", "−0.4 pts", "n/a". */
export function signedChange(d: KpiDelta | null, metric: Metric, locale: string): string {
  if (!d || d.absolute === null) return 'n/a';
  if (isRate(metric)) return points(d.absolute, locale);
  if (d.relative !== null && !onIntervalScale(metric)) return formatChange(d.relative, locale);
  return formatValue(d.absolute, valueFormatOf(metric, locale), { compact: true, signed: true });
}

/** "better" / "worse" by higher_is_better; null when level or unknown. */
export function verdict(d: KpiDelta, metric: Metric): 'better' | 'worse' | null {
  const dir = directionOf(d, metric);
  if (dir === 'none' || dir === 'level') return null;
  const good = metricDirection(metric);
  if (good === null) return null;
  return (dir === 'up') === good ? 'better' : 'worse';
}

/** A period's long name: "May 2025", "Q2 2025", "week commencing 5 May 2025". */
export function periodName(period: string, grain: Grain, locale: string): string {
  return formatPeriod(period, grain, locale, 'long');
}

/**
 * A comparison period named as briefly as reads clearly next to the latest: "April" when it is
 * a month of the same year, else its full name ("December 2024").
 */
export function shortPeriodName(period: string, latest: string, grain: Grain, locale: string): string {
  const full = periodName(period, grain, locale);
  if (grain !== 'month' || period.slice(0, 4) !== latest.slice(0, 4)) return full;
  const year = formatPeriod(period, 'year', locale);
  const stripped = full.replace(year, '').replace(/\s+/g, ' ').trim();
  return stripped.length > 0 ? stripped : full;
}

export function grainNoun(grain: Grain, count = 1): string {
  return count === 1 ? grain : `${grain}s`;
}

/** A segment key as people read it: booleans by the comparison group's labels when there is one. */
export function segmentLabel(key: SegmentKey, dim: Dimension | undefined, ds: DatasetConfig, locale: string): string {
  if (key === null) return 'Not recorded';
  if (typeof key === 'boolean') {
    const group = ds.comparison_groups.find((g) => g.column === dim?.column);
    if (group) return key ? group.members_label : group.others_label;
    return key ? 'Yes' : 'No';
  }
  if (typeof key === 'number') return formatValue(key, { unit: 'number', locale });
  return key.length > 0 ? key : '(blank)';
}

/** "routes", "fare classes", "booking channels". */
export function pluralOf(label: string): string {
  return pluralNoun(inSentence(label));
}

/** 1 → "1st", 2 → "2nd", 11 → "11th". */
export function ordinal(n: number): string {
  const k = Math.round(n);
  const tens = k % 100;
  const suffix = tens >= 11 && tens <= 13 ? 'th' : ({ 1: 'st', 2: 'nd', 3: 'rd' } as Record<number, string>)[k % 10] ?? 'th';
  return `${formatValue(k, { unit: 'count', locale: 'en' })}${suffix}`;
}

export { inSentence };
