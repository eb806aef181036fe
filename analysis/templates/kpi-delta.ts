// The change of a latest value against one comparison point, and whether it went the good way.
import type { Metric } from '../../config/schema.js';
import { metricDirection, metricPercentScale } from '../catalog.js';
import type { KpiDelta } from '../findings/kpi.js';
import { percentChange } from '../stats/index.js';

/**
 * The relative change is given only where the one rule allows a percentage of the metric
 * (catalog.ts metricPercentScale): never for a temperature or a value at or below zero.
 */
export function kpiDelta(latest: number | null, period: string, base: number | null, metric: Metric): KpiDelta {
  const absolute = latest !== null && base !== null ? latest - base : null;
  const higherIsBetter = metricDirection(metric);
  return {
    period,
    value: base,
    absolute,
    relative: percentChange(base, latest, metricPercentScale(metric, [base, latest])),
    improved: absolute === null || absolute === 0 || higherIsBetter === null ? null : absolute > 0 === higherIsBetter,
  };
}

/**
 * True when both values exist but the relative change is undefined because of its base (zero or
 * negative), on a metric that otherwise takes percentages: a temperature has none by its scale.
 */
export function baseIsZero(d: KpiDelta | null, latest: number | null, metric?: Metric): boolean {
  if (d === null || latest === null || d.value === null || d.relative !== null) return false;
  return metric === undefined || !metricPercentScale(metric, []).interval;
}
