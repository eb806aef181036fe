import { formatChange, formatValue, type ValueFormat } from '../format.js';
import { headerOf, monthNames } from './header.js';
import type { ChartHeader, GrowthGridRow, GrowthGridSpec } from './spec.js';

export interface GrowthCell {
  /** ISO date of the month's first day. */
  period: string;
  /** Relative change against the same month a year earlier; null when not comparable. */
  change: number | null;
}

export interface GrowthGridInput extends ChartHeader {
  cells: GrowthCell[];
  higherIsBetter: boolean;
  locale: string;
  legendLabel?: string;
}

const NICE_DOMAINS = [0.02, 0.05, 0.1, 0.15, 0.2, 0.25, 0.3, 0.4, 0.5, 0.75, 1, 1.5, 2, 3, 5, 10];

export function buildGrowthGrid(input: GrowthGridInput): GrowthGridSpec {
  const byYear = new Map<number, (number | null)[]>();
  for (const cell of input.cells) {
    const m = /^(\d{4})-(\d{2})/.exec(cell.period);
    if (!m) continue;
    const year = Number(m[1]);
    const month = Number(m[2]) - 1;
    if (month < 0 || month > 11) continue;
    const row = byYear.get(year) ?? Array<number | null>(12).fill(null);
    row[month] = cell.change !== null && Number.isFinite(cell.change) ? cell.change : null;
    byYear.set(year, row);
  }
  const rows: GrowthGridRow[] = [...byYear.keys()]
    .sort((a, b) => a - b)
    .map((year) => {
      const cells = byYear.get(year)!;
      return { label: String(year), cells, texts: cells.map((c) => formatChange(c, input.locale)) };
    });
  const values = rows.flatMap((r) => r.cells).filter((c): c is number => c !== null);
  const domain = colourDomain(values);
  const saturated = values.some((v) => Math.abs(v) > domain);
  const pct: ValueFormat = { unit: 'percent', decimals: 0, locale: input.locale };
  const end = (v: number) => formatValue(v, pct, { signed: true });
  return {
    kind: 'growth_grid',
    ...headerOf(input),
    columns: monthNames(input.locale),
    rows,
    domain,
    higherIsBetter: input.higherIsBetter,
    legendLabel: input.legendLabel ?? 'Change vs same month a year earlier',
    legendTexts: [
      saturated ? `≤ ${end(-domain)}` : end(-domain),
      formatValue(0, pct),
      saturated ? `≥ ${end(domain)}` : end(domain),
    ],
  };
}

/**
 * The colour scale's half-width: the 90th percentile of absolute changes, rounded up to a
 * round number. One storm month at +300% would otherwise wash every other cell out to neutral.
 */
export function colourDomain(values: number[]): number {
  if (values.length === 0) return NICE_DOMAINS[1]!;
  const abs = values.map(Math.abs).sort((a, b) => a - b);
  const p90 = abs[Math.min(abs.length - 1, Math.ceil(0.9 * abs.length) - 1)]!;
  return NICE_DOMAINS.find((d) => d >= p90 - 1e-12) ?? NICE_DOMAINS[NICE_DOMAINS.length - 1]!;
}
