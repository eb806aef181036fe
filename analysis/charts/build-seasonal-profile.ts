import { formatPointChange, formatValue, hasMagnitudeLabel, withoutUnitLabel, type ValueFormat } from '../format.js';
import { headerOf, monthNames } from './header.js';
import type { ChartHeader, SeasonalMonth, SeasonalProfileSpec } from './spec.js';

export interface SeasonalIndex {
  /** Calendar month, 1–12. */
  month: number;
  index: number | null;
  min: number | null;
  max: number | null;
}

export interface SeasonalProfileInput extends ChartHeader {
  months: SeasonalIndex[];
  locale: string;
  /** Legend text of the whiskers, e.g. "Range 2022–2024". */
  rangeLabel: string;
  /** A level's pattern: indices are deviations in these units from the yearly mean (additive). */
  deviationFormat?: ValueFormat;
  /** The index axis's title, when not the default (a flow's index is of monthly totals). */
  indexTitle?: string;
  /**
   * The metric is a flow (bookings, revenue): its months are busier or quieter than an average
   * one. A level or a ratio (an average basket, a rate) is higher or lower instead.
   */
  flow: boolean;
}

export function buildSeasonalProfile(input: SeasonalProfileInput): SeasonalProfileSpec {
  const names = monthNames(input.locale);
  const byMonth = new Map(input.months.map((m) => [m.month, m]));
  // A rate's deviations are differences of fractions: drawn and labelled in percentage points
  // ("+0.8 pts", formatPointChange), never "+0.8%", which reads as growth of the rate itself.
  const points = input.deviationFormat?.unit === 'percent';
  const scale = (v: number | null) => (v === null || !points ? v : v * 100);
  const months: SeasonalMonth[] = names.map((label, i) => {
    const m = byMonth.get(i + 1);
    const index = finiteOrNull(m?.index ?? null);
    return {
      label,
      index: scale(index),
      min: scale(finiteOrNull(m?.min ?? null)),
      max: scale(finiteOrNull(m?.max ?? null)),
      text: points
        ? formatPointChange(index, input.locale, { signed: true })
        : input.deviationFormat
        ? deviationText(index, input.deviationFormat)
        : formatValue(index, { unit: 'number', decimals: indexDecimals(index), locale: input.locale }),
    };
  });
  return {
    kind: 'seasonal_profile',
    ...headerOf(input),
    months,
    locale: input.locale,
    reference: input.deviationFormat ? 0 : 1,
    rangeLabel: input.rangeLabel,
    ...(input.indexTitle ? { indexTitle: input.indexTitle } : {}),
    ...(input.deviationFormat ? { units: deviationAxis(input.deviationFormat) } : {}),
    legend: legendWords(input),
  };
}

/**
 * A deviation's bar label without the unit's name, which the axis title gives once: "+5.71", not
 * "+5.71 thousand" twelve times over a crowded chart. A magnitude unit ("thousand") keeps whole
 * figures ("+1,234"), never a suffix stacked on it ("+1.23K" thousand).
 */
function deviationText(index: number | null, format: ValueFormat): string {
  return formatValue(index, withoutUnitLabel(format), { compact: !hasMagnitudeLabel(format), signed: true });
}

function legendWords(input: SeasonalProfileInput): SeasonalProfileSpec['legend'] {
  if (input.deviationFormat) return { above: 'Above the yearly mean', below: 'Below', reference: 'Yearly mean' };
  const reference = `Average month = ${formatValue(1, { unit: 'number', decimals: 1, locale: input.locale })}`;
  return input.flow
    ? { above: 'Busier than an average month', below: 'Quieter', reference }
    : { above: 'Higher than an average month', below: 'Lower', reference };
}

/**
 * Two decimals, or three for an index that would print as the average ("1.00") while its bar is
 * coloured busier or quieter: "0.996" and "1.004" say why the colours differ.
 */
function indexDecimals(index: number | null): number {
  return index !== null && index !== 1 && Math.abs(index - 1) < 0.005 ? 3 : 2;
}

function finiteOrNull(v: number | null): number | null {
  return v !== null && Number.isFinite(v) ? v : null;
}

/** The axis's ticks go without the unit's name too: its title carries it (points for a rate, drawn ×100). */
function deviationAxis(format: ValueFormat): NonNullable<SeasonalProfileSpec['units']> {
  if (format.unit === 'percent') return { format: { unit: 'number', decimals: 1, locale: format.locale }, axisTitle: 'Difference from the yearly mean (pts)' };
  return {
    format: withoutUnitLabel(format),
    axisTitle: `Difference from the yearly mean${format.label ? ` (${format.label})` : ''}`,
  };
}
