// Which sub-questions read the run's rollup instead of the table, and what the rollup must keep
// for them. A template is listed only when every number it computes is a sum or a count of rows
// grouped by day and dimensions (so a rollup rebuilds it exactly); the performance templates
// compare per-unit or per-row values (means and variances of bookings, medians, frequencies)
// and read the table (but for a plain count's before/after series, see performanceReadsRollup).
import type { DatasetConfig } from '../../config/schema.js';
import { CatalogError, metricByName } from '../catalog.js';
import { mixMeasure } from '../templates/kpi-mix.js';
import { measureShape, totalOfRows } from '../templates/performance-measure.js';
import type { SubQuestion } from '../types.js';
import { isRollupMetric, rollupColumns, type RollupShape } from './rollup.js';

export const ROLLUP_TEMPLATES: ReadonlySet<string> = new Set([
  'series',
  'trend_test',
  'trend_summary',
  'trend_seasonality',
  'segment_trend',
  'segment_shares',
  'growth_series',
  'growth_summary',
  'growth_drivers',
  'growth_share_shift',
  'kpi_snapshot',
  'kpi_context',
  'kpi_by_segment',
  'kpi_mix',
]);

/** The metrics a sub-question's queries aggregate (a KPI mix also shows its metric's base). */
function metricsRead(sq: SubQuestion, ds: DatasetConfig): string[] {
  const names = new Set(sq.metrics);
  if (sq.template === 'kpi_mix') {
    for (const m of sq.metrics) {
      const base = mixMeasure(ds, metricByName(ds, m));
      if (base) names.add(base.name);
    }
  }
  return [...names];
}

/**
 * Performance templates compare rows' values (means, variances, medians) and read the table,
 * except the before/after series of a plain count (bookings per group and period), which is a
 * sum of counts.
 */
function performanceReadsRollup(sq: SubQuestion, ds: DatasetConfig): boolean {
  if (sq.template !== 'performance_before_after') return false;
  const metric = metricByName(ds, sq.metrics[0]!);
  return totalOfRows(measureShape(ds, metric));
}

/** What the rollup must keep for this sub-question, or null when it has to read the table. */
export function rollupNeeds(sq: SubQuestion, ds: DatasetConfig): RollupShape | null {
  try {
    if (!ROLLUP_TEMPLATES.has(sq.template) && !performanceReadsRollup(sq, ds)) return null;
    const metrics = metricsRead(sq, ds);
    if (!metrics.every((m) => isRollupMetric(ds, metricByName(ds, m)))) return null;
    const dimensions = [...(sq.dimension ? [sq.dimension] : []), ...sq.filters.map((f) => f.dimension)];
    const columns = rollupColumns(ds, { dimensions, groups: sq.comparisonGroup ? [sq.comparisonGroup] : [] });
    return { columns, metrics: metrics.sort() };
  } catch (err) {
    // An unknown or personal-data term: the template reports it in its own words.
    if (err instanceof CatalogError) return null;
    throw err;
  }
}

/** One rollup for a run: the union of what its sub-questions need (null when fewer than `minReaders` can use one). */
export function runRollup(items: SubQuestion[], ds: DatasetConfig, minReaders = 1): RollupShape | null {
  const columns = new Set<string>();
  const metrics = new Set<string>();
  let readers = 0;
  for (const sq of items) {
    const need = rollupNeeds(sq, ds);
    if (!need) continue;
    readers++;
    for (const c of need.columns) columns.add(c);
    for (const m of need.metrics) metrics.add(m);
  }
  return readers >= minReaders ? { columns: [...columns].sort(), metrics: [...metrics].sort() } : null;
}

/** True when `shape` keeps everything `need` asks for. */
export function covers(shape: RollupShape, need: RollupShape): boolean {
  return need.columns.every((c) => shape.columns.includes(c)) && need.metrics.every((m) => shape.metrics.includes(m));
}
