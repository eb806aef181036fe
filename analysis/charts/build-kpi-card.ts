import { formatChange, formatPeriod, formatPointChange, formatValue, type ValueFormat } from '../format.js';
import type { Grain } from '../types.js';
import { headerOf } from './header.js';
import type { ChartHeader, KpiCardSpec, KpiComparison } from './spec.js';

export interface KpiValue {
  period: string;
  value: number | null;
}

export interface KpiCardInput extends ChartHeader {
  metricLabel: string;
  format: ValueFormat;
  higherIsBetter: boolean | null;
  grain: Grain;
  current: KpiValue;
  previous?: KpiValue;
  lastYear?: KpiValue;
}

// Changes smaller than this (relative) are shown as flat: "+0.0%" in blue would be noise.
const FLAT = 0.0005;

export function buildKpiCard(input: KpiCardInput): KpiCardSpec {
  const { format, grain } = input;
  const comparisons: KpiComparison[] = [];
  // The year earlier first: it shares the season, so a seasonal series is read against it first.
  for (const base of [input.lastYear, input.previous]) {
    if (base) comparisons.push(compare(input.current.value, base, format, grain, input.higherIsBetter));
  }
  return {
    kind: 'kpi_card',
    ...headerOf(input),
    metricLabel: input.metricLabel,
    valueText: formatValue(input.current.value, format),
    periodText: formatPeriod(input.current.period, grain, format.locale, 'long'),
    comparisons,
  };
}

function compare(
  value: number | null,
  base: KpiValue,
  fmt: ValueFormat,
  grain: Grain,
  higherIsBetter: boolean | null,
): KpiComparison {
  const label = `vs ${formatPeriod(base.period, grain, fmt.locale, 'long')}`;
  const baseText = formatValue(base.value, fmt);
  const ok = value !== null && base.value !== null && Number.isFinite(value) && Number.isFinite(base.value);
  if (!ok) return { label, changeText: 'n/a', baseText, direction: 'none', sentiment: 'neutral' };
  const diff = value - base.value!;
  const relative = base.value !== 0 ? diff / Math.abs(base.value!) : null;
  // Rates are compared in percentage points: "+0.4 pts" is what a rate moving 3.8% → 4.2% means.
  const changeText =
    fmt.unit === 'percent'
      ? formatPointChange(diff, fmt.locale, { signed: true })
      : formatChange(relative, fmt.locale);
  const size = relative ?? (diff === 0 ? 0 : Math.sign(diff));
  const direction = Math.abs(size) < FLAT ? 'flat' : diff > 0 ? 'up' : 'down';
  const sentiment =
    direction === 'flat' || higherIsBetter === null ? 'neutral' : (direction === 'up') === higherIsBetter ? 'good' : 'bad';
  return { label, changeText, baseText, direction, sentiment };
}
