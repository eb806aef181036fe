// Demo-style inputs for chart tests: Skerrywake Ferries (invented). Every number is computed
// here from a small seeded model, so tests never depend on outside data.
import { buildBars, type BarsInput } from '../../../analysis/charts/build-bars.js';
import { buildGroupCompare } from '../../../analysis/charts/build-group-compare.js';
import { buildGrowthGrid, type GrowthCell } from '../../../analysis/charts/build-growth-grid.js';
import { buildKpiCard } from '../../../analysis/charts/build-kpi-card.js';
import { buildLine } from '../../../analysis/charts/build-line.js';
import { buildPareto } from '../../../analysis/charts/build-pareto.js';
import { buildPeriodTablePages, type PeriodTableInput } from '../../../analysis/charts/build-period-table.js';
import { buildSeasonalProfile, type SeasonalIndex } from '../../../analysis/charts/build-seasonal-profile.js';
import type { ChartHeader, ChartSpec, PeriodTableSpec } from '../../../analysis/charts/spec.js';
import type { Metric } from '../../../config/schema.js';
import type { ValueFormat } from '../../../analysis/format.js';
import type { PeriodPoint } from '../../../analysis/types.js';

export const LOCALE = 'en-IE';
export const EUR: ValueFormat = { unit: 'currency', currency: 'EUR', locale: LOCALE };
const FOOTER = ['Source: Skerrywake bookings (demo data)', 'Data as of 18 Jun 2025'];

export function header(title: string, subtitle: string, extra: Partial<ChartHeader> = {}): ChartHeader {
  return { title, subtitle, footer: [...FOOTER], width: 1200, height: 675, scale: 1, ...extra };
}

/** Small deterministic noise in [-1, 1] (a linear congruential generator). */
function noise(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return (s / 2 ** 32) * 2 - 1;
  };
}

// Calendar-month shape: July and August busiest, January and February quietest, a December bump.
export const SEASON = [0.62, 0.66, 0.8, 0.92, 1.02, 1.18, 1.45, 1.5, 1.1, 0.92, 0.78, 0.95];
const YEAR_LEVEL: Record<number, number> = { 2022: 1, 2023: 1.08, 2024: 1.08, 2025: 1.026 };

/** Monthly revenue, Jan 2022 to Jun 2025, June 2025 only 18 days in. */
export function monthlyRevenue(): PeriodPoint[] {
  const rnd = noise(7);
  const points: PeriodPoint[] = [];
  for (let y = 2022; y <= 2025; y++) {
    for (let m = 0; m < 12; m++) {
      if (y === 2025 && m > 5) break;
      let value = 1_400_000 * YEAR_LEVEL[y]! * SEASON[m]! * (1 + 0.03 * rnd());
      if (y === 2024 && m === 0) value *= 0.8; // the January storm week
      const partial = y === 2025 && m === 5;
      if (partial) value *= 18 / 30;
      points.push({ period: `${y}-${String(m + 1).padStart(2, '0')}-01`, value: Math.round(value), partial });
    }
  }
  return points;
}

export function lineSpec(extra: Partial<ChartHeader> = {}) {
  return buildLine({
    ...header('Revenue peaks every summer; 2025 is running below 2024', 'Revenue per month, Jan 2022 to Jun 2025 (June 2025 is partial)', extra),
    seriesLabel: 'Revenue',
    grain: 'month',
    points: monthlyRevenue(),
    format: EUR,
  });
}

export function lineOverlaySpec(extra: Partial<ChartHeader> = {}) {
  const all = monthlyRevenue();
  const recent = all.slice(-12);
  const lastYear = all.slice(-24, -12).map((p) => p.value);
  return buildLine({
    ...header('The last twelve months ran below the year before', 'Revenue per month, Jul 2024 to Jun 2025, against the same month a year earlier', extra),
    seriesLabel: 'Revenue',
    grain: 'month',
    points: recent,
    format: EUR,
    overlay: { label: 'Same month last year', values: lastYear },
  });
}

const ROUTES = ['Mainland–Tern Holm', 'Mainland–Saltreach', 'Mainland–Kelpie Sound', 'Mainland–Dunlin Quay', 'Tern Holm–Saltreach'];
const ROUTE_SHARE = [0.41, 0.29, 0.12, 0.1, 0.08];
const FARE_CLASSES = ['foot', 'bicycle', 'car', 'van'];
const CLASS_SHARE = [0.34, 0.06, 0.45, 0.15];

/** Members' line starting at the launch (April 2023), others' line throughout, the launch marked. */
export function lineEventsSpec(extra: Partial<ChartHeader> = {}) {
  const all = monthlyRevenue();
  const launch = all.findIndex((p) => p.period === '2023-04-01');
  const rnd = noise(11);
  const members = all.map((p, i) => ({ ...p, value: i < launch ? null : Math.round(p.value! * (0.18 + 0.004 * (i - launch)) * (1 + 0.05 * rnd())) }));
  return buildLine({
    ...header('Pass holders grew to a third of revenue after the launch', 'Revenue per month, pass holders and other customers, Jan 2022 to Jun 2025', extra),
    seriesLabel: 'Pass holders',
    grain: 'month',
    points: members,
    format: EUR,
    overlay: { label: 'Other customers', values: all.map((p, i) => (members[i]!.value === null ? p.value : p.value! - members[i]!.value!)) },
    events: [{ index: launch, label: 'SkerryPass launch' }],
  });
}

export function routeRevenue(): { label: string; value: number }[] {
  return ROUTES.map((label, i) => ({ label, value: Math.round(18_400_000 * ROUTE_SHARE[i]!) }));
}

export function barsInput(extra: Partial<ChartHeader> = {}): BarsInput {
  const items = ROUTES.flatMap((route, i) =>
    FARE_CLASSES.map((fc, j) => ({ label: `${route}, ${fc}`, value: Math.round(6_100_000 * ROUTE_SHARE[i]! * CLASS_SHARE[j]!) })),
  );
  return {
    ...header('Car fares on the two main routes bring in half the revenue', 'Revenue by route and fare class, Jan–Jun 2025', extra),
    items,
    format: EUR,
    topN: 8,
  };
}

export function barsSpec(extra: Partial<ChartHeader> = {}) {
  return buildBars(barsInput(extra));
}

/** Change by booking channel between two summers: rises and falls, coloured by sign. */
export function barsSignedSpec(extra: Partial<ChartHeader> = {}) {
  return buildBars({
    ...header('App drove the biggest change in revenue: +€32.9K', 'Revenue, Jun–Aug 2024 against Jun–Aug 2023', extra),
    items: [
      { label: 'app', value: 32_900 },
      { label: 'kiosk', value: 363 },
      { label: 'phone', value: -8_140 },
      { label: 'web', value: -19_200 },
    ],
    folded: { label: 'All others (2)', value: -1_250 },
    format: EUR,
    signed: true,
    higherIsBetter: true,
  });
}

/** A Pareto whose SQL-folded tail is the tallest bar: it stays last and neutral. */
export function paretoFoldedSpec(extra: Partial<ChartHeader> = {}) {
  const routes = routeRevenue();
  return buildPareto({
    ...header('Beyond the two main routes, revenue is spread thin', 'Revenue by route, the smaller routes folded together', extra),
    items: routes.slice(0, 4).map((r) => ({ ...r, label: `${r.label} (+1.0\u00A0pts)` })),
    folded: { label: 'All others (9)', value: 9_000_000 },
    format: EUR,
    valueLabel: 'Revenue',
  });
}

export function paretoSpec(extra: Partial<ChartHeader> = {}) {
  return buildPareto({
    ...header('Two routes carry 70% of revenue', 'Revenue by route, Jan 2022 to Jun 2025, with the running share of the total', extra),
    items: routeRevenue(),
    format: EUR,
    valueLabel: 'Revenue',
  });
}

/** Year-over-year change per month from 2023; the partly covered June 2025 is marked, not compared. */
export function growthCells(): GrowthCell[] {
  const series = monthlyRevenue();
  const byPeriod = new Map(series.map((p) => [p.period, p.value]));
  return series
    .filter((p) => p.period >= '2023-01-01')
    .map((p) => {
      if (p.partial) return { period: p.period, change: null, state: 'partial' as const };
      const prior = byPeriod.get(`${Number(p.period.slice(0, 4)) - 1}${p.period.slice(4)}`) ?? null;
      return { period: p.period, change: prior && p.value !== null ? p.value / prior - 1 : null };
    });
}

export function growthGridSpec(extra: Partial<ChartHeader> = {}) {
  return buildGrowthGrid({
    ...header('Growth stalled in 2024 and turned negative in 2025', 'Revenue, change against the same month a year earlier', extra),
    cells: growthCells(),
    higherIsBetter: true,
    locale: LOCALE,
  });
}

export function kpiSpec(extra: Partial<ChartHeader> = {}) {
  return buildKpiCard({
    ...header('Average fare per passenger, May 2025', 'Revenue divided by passengers carried, bookings sailing in the month', extra),
    metricLabel: 'Average fare per passenger',
    format: { ...EUR, decimals: 2 },
    higherIsBetter: true,
    grain: 'month',
    current: { period: '2025-05-01', value: 23.46 },
    previous: { period: '2025-04-01', value: 22.91 },
    lastYear: { period: '2024-05-01', value: 24.1 },
  });
}

export function kpiRefundSpec(extra: Partial<ChartHeader> = {}) {
  return buildKpiCard({
    ...header('Share of revenue refunded, May 2025', 'Refunded amount as a share of revenue', extra),
    metricLabel: 'Share of revenue refunded',
    format: { unit: 'percent', locale: LOCALE },
    higherIsBetter: false,
    grain: 'month',
    current: { period: '2025-05-01', value: 0.0521 },
    previous: { period: '2025-04-01', value: 0.0488 },
    lastYear: { period: '2024-05-01', value: 0.0597 },
  });
}

export function groupCompareSpec(extra: Partial<ChartHeader> = {}) {
  // Means and normal-approximation 95% intervals from a stated mean, SD and n.
  const group = (label: string, mean: number, sd: number, n: number) => {
    const half = (1.959964 * sd) / Math.sqrt(n);
    return { label, estimate: mean, low: mean - half, high: mean + half, n };
  };
  return buildGroupCompare({
    ...header('SkerryPass holders book about 2.5 times as often', 'Bookings per customer since the SkerryPass launch (1 Apr 2023)', extra),
    groups: [group('SkerryPass holders', 9.8, 6.1, 1_840), group('Other customers', 3.9, 3.2, 27_450)],
    format: { unit: 'number', decimals: 1, locale: LOCALE },
    valueLabel: 'Bookings per customer',
  });
}

export function seasonalIndices(): SeasonalIndex[] {
  const series = monthlyRevenue().filter((p) => p.period < '2025-01-01');
  const perYear = new Map<string, number[]>();
  for (const p of series) {
    const y = p.period.slice(0, 4);
    perYear.set(y, [...(perYear.get(y) ?? []), p.value!]);
  }
  const indices = [...perYear.values()].map((vals) => {
    const mean = vals.reduce((a, b) => a + b, 0) / vals.length;
    return vals.map((v) => v / mean);
  });
  return Array.from({ length: 12 }, (_, m) => {
    const xs = indices.map((row) => row[m]!);
    return { month: m + 1, index: xs.reduce((a, b) => a + b, 0) / xs.length, min: Math.min(...xs), max: Math.max(...xs) };
  });
}

export function seasonalSpec(extra: Partial<ChartHeader> = {}) {
  return buildSeasonalProfile({
    ...header('July and August are half as busy again as an average month', 'Seasonal index of revenue by calendar month, 2022–2024', extra),
    months: seasonalIndices(),
    locale: LOCALE,
    rangeLabel: 'Range across 2022–2024',
    flow: true,
  });
}

/** One realistic spec per kind, more for line, bars, Pareto and KPI. */
const TABLE_METRICS: Metric[] = [
  { name: 'bookings', label: 'Bookings', synonyms: [], definition: { type: 'count' }, unit: 'count', higher_is_better: true },
  { name: 'revenue', label: 'Revenue', synonyms: [], definition: { type: 'sum', column: 'fare_total' }, unit: 'currency', currency: 'EUR', higher_is_better: true },
  { name: 'refund_rate', label: 'Refund rate', synonyms: [], definition: { type: 'rate', where: { column: 'refunded', op: 'is_true' } }, unit: 'percent', higher_is_better: false },
];

/**
 * Quarterly bookings, revenue and refund rate, Q1 2023 to Q2 2025 (the last quarter partial), as
 * the period table's input: changes on the quarter before (percent, points for the rate) and on
 * the same quarter a year earlier, best and worst quarters marked over the complete ones.
 */
export function periodTableInput(extra: Partial<ChartHeader> = {}, quarters = 10): PeriodTableInput {
  const rnd = noise(11);
  const periods = Array.from({ length: quarters }, (_, i) => `${2023 + Math.floor(i / 4)}-${String((i % 4) * 3 + 1).padStart(2, '0')}-01`);
  const season = [0.7, 1.05, 1.4, 0.85];
  const values = periods.map((p, i) => {
    const q = i % 4;
    const partial = i === quarters - 1;
    const bookings = Math.round(15_000 * season[q]! * (1 + 0.04 * rnd()) * (partial ? 0.6 : 1));
    const revenue = Math.round(bookings * 37.5 * (1 + 0.02 * rnd()));
    const refund = 0.055 + 0.01 * rnd() + (p === '2024-01-01' ? 0.05 : 0);
    return { p, partial, v: [bookings, revenue, refund] };
  });
  const change = (k: number, base: number | undefined, v: number) => (base === undefined ? null : k === 2 ? v - base : v / base - 1);
  const complete = values.filter((x) => !x.partial);
  const marks = TABLE_METRICS.map((m, k) => {
    const sorted = [...complete].sort((a, b) => a.v[k]! - b.v[k]!);
    const [low, high] = [sorted[0]!.p, sorted[sorted.length - 1]!.p];
    return m.higher_is_better ? { best: high, worst: low } : { best: low, worst: high };
  });
  return {
    ...header('Bookings peaked in Q3 2024 at 21.6K; the refund rate spiked in Q1 2024', 'Bookings, revenue and refund rate · quarterly, 1 Jan 2023 to 18 Jun 2025', extra),
    grain: 'quarter',
    locale: LOCALE,
    metrics: TABLE_METRICS.map((metric) => ({ metric, basis: metric.unit === 'percent' ? 'points' : 'percent' })),
    rows: values.map((x, i) => ({
      period: x.p,
      partial: x.partial,
      note: x.partial ? 'partial, to 18 Jun' : '',
      cells: x.v.map((v, k) => ({
        value: v,
        vsPrevious: x.partial || i === 0 ? null : change(k, values[i - 1]!.v[k], v),
        vsYearEarlier: x.partial || i < 4 ? null : change(k, values[i - 4]!.v[k], v),
        mark: x.partial ? null : x.p === marks[k]!.best ? 'best' : x.p === marks[k]!.worst ? 'worst' : null,
      })),
    })),
    total: { label: 'Whole period', values: [values.reduce((a, x) => a + x.v[0]!, 0), values.reduce((a, x) => a + x.v[1]!, 0), 0.061] },
    notes: ['Changes on the quarter before and on the same quarter a year earlier.', 'Whole period row: bookings and revenue are summed; the refund rate is worked out over the whole period.'],
  };
}

export function periodTableSpec(extra: Partial<ChartHeader> = {}): PeriodTableSpec {
  return buildPeriodTablePages(periodTableInput(extra, 7))[0]!;
}

export function allSamples(extra: Partial<ChartHeader> = {}): Record<string, ChartSpec> {
  return {
    line: lineSpec(extra),
    'line-overlay': lineOverlaySpec(extra),
    'line-events': lineEventsSpec(extra),
    bars: barsSpec(extra),
    'bars-signed': barsSignedSpec(extra),
    pareto: paretoSpec(extra),
    'pareto-folded': paretoFoldedSpec(extra),
    'growth-grid': growthGridSpec(extra),
    'kpi-card': kpiSpec(extra),
    'kpi-card-rate': kpiRefundSpec(extra),
    'group-compare': groupCompareSpec(extra),
    'seasonal-profile': seasonalSpec(extra),
    'period-table': periodTableSpec(extra),
  };
}
