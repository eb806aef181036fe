// Lookups over one dataset's catalog. Names reaching SQL are checked here first.
import type { ComparisonGroup, DatasetConfig, Dimension, Metric, MetricKind } from '../config/schema.js';

export class CatalogError extends Error {
  constructor(
    readonly code: 'unknown_metric' | 'unknown_dimension' | 'personal_data' | 'unknown_group',
    readonly term: string,
    message: string,
  ) {
    super(message);
    this.name = 'CatalogError';
  }
}

export function metricByName(ds: DatasetConfig, name: string): Metric {
  const m = ds.metrics.find((x) => x.name === name);
  if (!m) throw new CatalogError('unknown_metric', name, `"${name}" is not a metric of dataset ${ds.name}`);
  return m;
}

export function dimensionByName(ds: DatasetConfig, name: string): Dimension {
  const d = ds.dimensions.find((x) => x.name === name);
  if (!d) throw new CatalogError('unknown_dimension', name, `"${name}" is not a dimension of dataset ${ds.name}`);
  return d;
}

/** A dimension that may be grouped by or filtered on: personal data never qualifies. */
export function groupableDimension(ds: DatasetConfig, name: string): Dimension {
  const d = dimensionByName(ds, name);
  if (d.personal_data) throw new CatalogError('personal_data', name, `"${d.label}" is personal data and cannot be broken down or shown`);
  return d;
}

export function comparisonGroupByName(ds: DatasetConfig, name: string): ComparisonGroup {
  const g = ds.comparison_groups.find((x) => x.name === name);
  if (!g) throw new CatalogError('unknown_group', name, `"${name}" is not a comparison group of dataset ${ds.name}`);
  return g;
}

/** Columns a metric reads, for data-quality checks on exactly what an answer used. */
export function metricColumns(ds: DatasetConfig, metric: Metric): string[] {
  const def = metric.definition;
  switch (def.type) {
    case 'sum':
    case 'average':
    case 'distinct_count':
      return [def.column, ...(def.where ? [def.where.column] : [])];
    case 'count':
      return def.where ? [def.where.column] : [];
    case 'ratio':
      return [...metricColumns(ds, metricByName(ds, def.numerator)), ...metricColumns(ds, metricByName(ds, def.denominator))];
    case 'rate':
      return [def.where.column, ...(def.of ? metricColumns(ds, metricByName(ds, def.of)) : [])];
  }
}

/**
 * The metric's kind of quantity (see MetricKind in config/schema.ts): the kind the config declares,
 * or the one its definition implies. Sums and counts are flows; ratios and rates are ratios; an
 * average is a ratio (a mean per row) unless declared a level (a reading such as a concentration).
 * A declared `level` on a sum stays a level: a column of daily balances summed per day is still one.
 */
export function metricKind(ds: DatasetConfig, metric: Metric): MetricKind {
  if (metric.kind) return metric.kind;
  switch (metric.definition.type) {
    case 'sum':
    case 'count':
    case 'distinct_count':
      return 'flow';
    case 'average':
    case 'ratio':
    case 'rate':
      return 'ratio';
  }
}
