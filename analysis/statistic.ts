// A statistic named in the request ("median delay", "90th percentile delay", "p90"): the one
// place the concept is defined. For a metric that is the average of a column (metric.average),
// the statistic asks for that quantile of the column instead of its mean. The sub-question carries
// it; while it is compiled, read and presented, its metrics are seen through statisticDataset: the
// same metric with the quantile in its definition and the statistic in its label ("Median
// delay"), so every statement, title and caption that names or measures the metric says it.
// A metric that is no average of a column (a count, a sum, a ratio of sums) cannot take it: the
// plan says so and answers the mean. Only templates whose figures come straight from the metric's
// aggregate take it (a rollup or a pooled mean cannot rebuild a quantile), see STATISTIC_TEMPLATES.
import type { DatasetConfig, Metric } from '../config/schema.js';
import type { SubQuestion } from './types.js';

export interface Statistic {
  /** The quantile asked, strictly between 0 and 1 (0.5 for the median). */
  quantile: number;
}

/** Sub-question templates whose every figure of the metric is its aggregate per period or segment. */
export const STATISTIC_TEMPLATES: ReadonlySet<string> = new Set(['series', 'trend_test', 'segment_trend', 'segment_shares', 'kpi_by_segment']);

/** "median", "90th percentile", "25th percentile". */
export function statisticWords(s: Statistic): string {
  if (s.quantile === 0.5) return 'median';
  const pct = Math.round(s.quantile * 1000) / 10;
  const n = Number.isInteger(pct) ? pct : pct;
  const mod100 = Math.round(n) % 100;
  const suffix = mod100 >= 11 && mod100 <= 13 ? 'th' : ({ 1: 'st', 2: 'nd', 3: 'rd' } as Record<number, string>)[Math.round(n) % 10] ?? 'th';
  return `${n}${Number.isInteger(n) ? suffix : 'th'} percentile`;
}

/** The metric is the average of a column, whose quantile can be taken instead. */
export function takesStatistic(metric: Metric): boolean {
  return metric.definition.type === 'average';
}

/** "Average delay" -> "Median delay"; a label without "average"/"mean" is prefixed ("Median of Temp max"). */
export function statisticLabel(label: string, s: Statistic): string {
  const words = statisticWords(s);
  const cap = words[0]!.toUpperCase() + words.slice(1);
  if (/\b(?:average|mean|avg)\b/i.test(label)) return label.replace(/\b(?:average|mean|avg)\b/i, (m) => (m[0] === m[0]!.toUpperCase() ? cap : words));
  return `${cap} of ${label.charAt(0).toLowerCase()}${label.slice(1)}`;
}

/** The dataset as the sub-question sees it: its averaged metrics take the statistic asked; unchanged without one. */
export function statisticDataset(ds: DatasetConfig, sq: Pick<SubQuestion, 'metrics' | 'statistic'>): DatasetConfig {
  const s = sq.statistic;
  if (!s) return ds;
  return {
    ...ds,
    metrics: ds.metrics.map((m) =>
      sq.metrics.includes(m.name) && m.definition.type === 'average'
        ? { ...m, label: statisticLabel(m.label, s), definition: { ...m.definition, quantile: s.quantile } }
        : m,
    ),
  };
}

/**
 * The plan's items of one question given the statistic asked: items of an averaged metric whose
 * template takes it carry it; that metric's other items are left out (their figures would be means
 * under a median's name) unless none takes it, when they stay as means and a note says so. A
 * metric that is no average of a column keeps its items as they are, and a note says why.
 */
export function withStatistic<T extends { template: string; metrics: string[]; statistic?: Statistic }>(items: readonly T[], s: Statistic, ds: DatasetConfig): { items: T[]; notes: string[] } {
  const words = statisticWords(s);
  const notes: string[] = [];
  const out: T[] = [];
  const metrics = [...new Set(items.flatMap((d) => d.metrics))];
  for (const name of metrics) {
    const metric = ds.metrics.find((m) => m.name === name);
    const own = items.filter((d) => d.metrics.length === 1 && d.metrics[0] === name);
    if (!metric || !takesStatistic(metric)) {
      if (metric) notes.push(`${metric.label} is not an average of one column (it is a ${metric.definition.type === 'count' ? 'count of rows' : metric.definition.type === 'sum' ? 'total' : metric.definition.type === 'distinct_count' ? 'count of distinct values' : 'ratio of totals'}), so it has no ${words}: it is answered as it stands`);
      out.push(...own);
      continue;
    }
    const taking = own.filter((d) => STATISTIC_TEMPLATES.has(d.template));
    if (taking.length === 0) {
      notes.push(`the ${words} of ${metric.label.toLowerCase()} is not available for this kind of answer: it is answered with the mean`);
      out.push(...own);
      continue;
    }
    for (const d of taking) out.push({ ...d, statistic: { quantile: s.quantile } });
  }
  // Items of several metrics at once (a period table) stay as they are.
  out.push(...items.filter((d) => d.metrics.length !== 1));
  return { items: items.filter((d) => out.some((o) => o === d || (o.template === d.template && o.metrics === d.metrics))).map((d) => out.find((o) => o === d || (o.template === d.template && o.metrics === d.metrics))!), notes };
}
