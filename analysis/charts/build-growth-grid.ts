import { formatChange, formatValue, type ValueFormat } from '../format.js';
import { headerOf, monthNames } from './header.js';
import type { ChartHeader, GrowthCellState, GrowthGridRow, GrowthGridSpec } from './spec.js';

export interface GrowthCell {
  /** ISO date of the month's first day. */
  period: string;
  /** Relative change against the same month a year earlier; null when not comparable. */
  change: number | null;
  /**
   * `partial`: the month is only partly covered, drawn hatched and never coloured (its change
   * would compare part of a month with a whole one). `no_data`: the data does not reach the
   * month, drawn blank. Months missing from `cells` are blank too.
   */
  state?: 'partial' | 'no_data';
}

export interface GrowthGridInput extends ChartHeader {
  cells: GrowthCell[];
  higherIsBetter: boolean | null;
  locale: string;
  legendLabel?: string;
}

const NICE_DOMAINS = [0.02, 0.05, 0.1, 0.15, 0.2, 0.25, 0.3, 0.4, 0.5, 0.75, 1, 1.5, 2, 3, 5, 10];

export function buildGrowthGrid(input: GrowthGridInput): GrowthGridSpec {
  const byYear = new Map<number, { cells: (number | null)[]; states: GrowthCellState[] }>();
  for (const cell of input.cells) {
    const m = /^(\d{4})-(\d{2})/.exec(cell.period);
    if (!m) continue;
    const year = Number(m[1]);
    const month = Number(m[2]) - 1;
    if (month < 0 || month > 11) continue;
    const row = byYear.get(year) ?? { cells: Array<number | null>(12).fill(null), states: Array<GrowthCellState>(12).fill('no_data') };
    const change = cell.change !== null && Number.isFinite(cell.change) ? cell.change : null;
    const state: GrowthCellState = cell.state ?? (change === null ? 'not_comparable' : 'value');
    row.cells[month] = state === 'value' ? change : null;
    row.states[month] = state;
    byYear.set(year, row);
  }
  const rows: GrowthGridRow[] = [...byYear.keys()]
    .sort((a, b) => a - b)
    .filter((year) => byYear.get(year)!.states.some((st) => st !== 'no_data'))
    .map((year) => {
      const { cells, states } = byYear.get(year)!;
      return { label: String(year), cells, texts: cells.map((c, j) => cellText(c, states[j]!, input.locale)), states };
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

function cellText(change: number | null, state: GrowthCellState, locale: string): string {
  if (state === 'no_data') return '';
  if (state === 'partial') return 'partial';
  return formatChange(change, locale);
}
