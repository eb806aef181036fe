// Which sub-questions read the run's rollup instead of the table, and what the rollup must keep
// for them. Each sub-question declares its own use (analysis/sub-questions/): only those whose
// every number is a sum or a count of rows grouped by day and dimensions, or a group comparison
// whose means and variances add up from per-day counts, sums and sums of squares (so a rollup
// rebuilds it exactly). Medians, distinct counts and per-unit frequencies read the table.
import type { DatasetConfig } from '../../config/schema.js';
import { CatalogError, metricByName } from '../catalog.js';
import { definitionOf } from '../sub-questions/registry.js';
import type { SubQuestion } from '../types.js';
// A day-of-week filter reads the rollup's own day (its local date), so it needs no column kept.
import { isDayFilter } from '../day-of-week.js';
import { isRollupMetric, rollupColumns, type RollupShape } from './rollup.js';

/** What the rollup must keep for this sub-question, or null when it has to read the table. */
export function rollupNeeds(sq: SubQuestion, ds: DatasetConfig): RollupShape | null {
  // A mean and median per row ("gross per film") need each row's value.
  if (sq.perRow) return null;
  // A quantile ("median delay") needs each row's value: medians of days never add up to the median.
  if (sq.statistic) return null;
  try {
    const use = definitionOf(sq).rollup;
    if (!use || (use.when && !use.when(sq, ds))) return null;
    const metrics = use.metrics ? use.metrics(sq, ds) : [...new Set(sq.metrics)];
    if (!metrics.every((m) => isRollupMetric(ds, metricByName(ds, m)))) return null;
    const dimensions = [...(sq.dimension ? [sq.dimension] : []), ...sq.filters.filter((f) => !isDayFilter(f)).map((f) => f.dimension)];
    const columns = rollupColumns(ds, { dimensions, groups: sq.comparisonGroup ? [sq.comparisonGroup] : [] });
    const moments = use.moments ? [...new Set(use.moments(sq, ds))].sort() : [];
    return { columns, metrics: metrics.sort(), ...(moments.length ? { moments } : {}) };
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
  const moments = new Set<string>();
  let readers = 0;
  for (const sq of items) {
    const need = rollupNeeds(sq, ds);
    if (!need) continue;
    readers++;
    for (const c of need.columns) columns.add(c);
    for (const m of need.metrics) metrics.add(m);
    for (const m of need.moments ?? []) moments.add(m);
  }
  if (readers < minReaders) return null;
  return { columns: [...columns].sort(), metrics: [...metrics].sort(), ...(moments.size ? { moments: [...moments].sort() } : {}) };
}

/** True when `shape` keeps everything `need` asks for. */
export function covers(shape: RollupShape, need: RollupShape): boolean {
  return (
    need.columns.every((c) => shape.columns.includes(c)) &&
    need.metrics.every((m) => shape.metrics.includes(m)) &&
    (need.moments ?? []).every((m) => (shape.moments ?? []).includes(m))
  );
}
