// The change of a latest value against one comparison point, and whether it went the good way.
import type { KpiDelta } from '../findings/kpi.js';
import { relativeChange } from '../stats/index.js';

export function kpiDelta(latest: number | null, period: string, base: number | null, higherIsBetter: boolean | null): KpiDelta {
  const absolute = latest !== null && base !== null ? latest - base : null;
  return {
    period,
    value: base,
    absolute,
    relative: relativeChange(base, latest),
    improved: absolute === null || absolute === 0 || higherIsBetter === null ? null : absolute > 0 === higherIsBetter,
  };
}

/** True when both values exist but the relative change is undefined (a zero or negative base). */
export function baseIsZero(d: KpiDelta | null, latest: number | null): boolean {
  return d !== null && latest !== null && d.value !== null && d.relative === null;
}
