import { formatValue, type ValueFormat } from '../format.js';
import { headerOf } from './header.js';
import type { ChartHeader, GroupCompareSpec, GroupEstimate } from './spec.js';

export interface GroupInput {
  label: string;
  estimate: number;
  low: number | null;
  high: number | null;
  n: number;
}

export interface GroupCompareInput extends ChartHeader {
  groups: GroupInput[];
  format: ValueFormat;
  valueLabel: string;
  /** Confidence level of the intervals (default 0.95). */
  level?: number;
}

export function buildGroupCompare(input: GroupCompareInput): GroupCompareSpec {
  const level = input.level ?? 0.95;
  const { format } = input;
  const countFmt: ValueFormat = { unit: 'count', locale: format.locale };
  const levelText = formatValue(level, { unit: 'percent', decimals: level * 100 === Math.round(level * 100) ? 0 : 1, locale: format.locale });
  const groups: GroupEstimate[] = input.groups.map((g) => {
    const low = finiteOrNull(g.low);
    const high = finiteOrNull(g.high);
    const hasInterval = low !== null && high !== null;
    return {
      label: g.label,
      estimate: g.estimate,
      low,
      high,
      n: g.n,
      estimateText: formatValue(g.estimate, format),
      intervalText: hasInterval ? `${levelText} CI ${intervalBounds(low, high, format)}` : '',
      nText: `n = ${formatValue(g.n, countFmt)}`,
    };
  });
  return { kind: 'group_compare', ...headerOf(input), format: { ...format }, groups, level, valueLabel: input.valueLabel };
}

/** "9.5 – 10.1": adds decimals, up to four, until a narrow interval's two ends read differently. */
function intervalBounds(low: number, high: number, format: ValueFormat): string {
  let lo = formatValue(low, format);
  let hi = formatValue(high, format);
  for (let d = (format.decimals ?? 0) + 1; lo === hi && low !== high && d <= 4; d++) {
    const finer = { ...format, decimals: Math.max(d, format.unit === 'percent' ? 2 : d) };
    lo = formatValue(low, finer);
    hi = formatValue(high, finer);
  }
  return `${lo} – ${hi}`;
}

function finiteOrNull(v: number | null): number | null {
  return v !== null && Number.isFinite(v) ? v : null;
}
