import { formatValue, type ValueFormat } from '../format.js';
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
}

export function buildSeasonalProfile(input: SeasonalProfileInput): SeasonalProfileSpec {
  const names = monthNames(input.locale);
  const byMonth = new Map(input.months.map((m) => [m.month, m]));
  const months: SeasonalMonth[] = names.map((label, i) => {
    const m = byMonth.get(i + 1);
    const index = finiteOrNull(m?.index ?? null);
    return {
      label,
      index,
      min: finiteOrNull(m?.min ?? null),
      max: finiteOrNull(m?.max ?? null),
      text: input.deviationFormat
        ? formatValue(index, input.deviationFormat, { compact: true, signed: true })
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
  };
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

function deviationAxis(format: ValueFormat): NonNullable<SeasonalProfileSpec['units']> {
  return {
    format,
    axisTitle: `Difference from the yearly mean${format.label ? ` (${format.label})` : ''}`,
    referenceLabel: 'Yearly mean',
    above: 'Above the yearly mean',
    below: 'Below',
  };
}
