// What a metric means, in words for its reader: analysts see the catalog's description (or the
// formula) as written, column names and all; managers and leadership never see a raw column
// name ("sum of fare_total"): a breakdown's column reads as its label, any other as plain words.
import type { DatasetConfig, Metric, MetricDefinition } from '../../config/schema.js';
import type { Audience } from '../types.js';

/** The catalog definition as a formula in words: "sum of fare_total", "revenue divided by passengers". */
export function metricFormula(metric: Metric, ds: DatasetConfig): string {
  return formulaOf(metric.definition, ds);
}

/** The catalog's description, else the formula; for readers other than analysts, without raw column names. */
export function metricMeaning(metric: Metric, ds: DatasetConfig, audience: Audience): string {
  const text = metric.description ?? metricFormula(metric, ds);
  return audience === 'analysts' ? text : plainColumnWords(text, ds);
}

// Codes that end a money column's name ("revenue_eur"): said as the code in capitals.
const CURRENCY_CODES = new Set(['eur', 'usd', 'gbp', 'jpy', 'chf', 'cad', 'aud', 'sek', 'nok', 'dkk', 'pln', 'cny', 'inr']);

/**
 * `text` with every raw column name in words: a breakdown's column becomes the breakdown's label
 * ("fare_class" → "fare class" or the label the catalog gives it), and any other identifier
 * (a name with an underscore or inner capitals) its parts spelled out ("fare_total" → "fare total").
 */
export function plainColumnWords(text: string, ds: DatasetConfig): string {
  const labels = new Map<string, string>();
  for (const d of ds.dimensions) labels.set(d.column, d.label.toLowerCase());
  for (const g of ds.comparison_groups) labels.set(g.column, g.label);
  return text.replace(/\b[A-Za-z][A-Za-z0-9]*(?:_[A-Za-z0-9]+)+\b|\b[a-z]+(?:[A-Z][a-z0-9]*)+\b/g, (name) => {
    const label = labels.get(name);
    if (label) return label;
    const parts = name.split(/_|(?=[A-Z])/).filter((p) => p !== '').map((p) => p.toLowerCase());
    const last = parts[parts.length - 1]!;
    if (parts.length > 1 && CURRENCY_CODES.has(last)) return `${parts.slice(0, -1).join(' ')} (${last.toUpperCase()})`;
    return parts.join(' ');
  });
}

function formulaOf(def: MetricDefinition, ds: DatasetConfig): string {
  const label = (name: string) => ds.metrics.find((m) => m.name === name)?.label.toLowerCase() ?? name;
  const where = 'where' in def && def.where ? ` where ${conditionText(def.where)}` : '';
  switch (def.type) {
    case 'sum':
      return `sum of ${def.column}${where}`;
    case 'count':
      return `number of rows${where}`;
    case 'distinct_count':
      return `number of distinct ${def.column} values${where}`;
    case 'average':
      return `mean of ${def.column}${where}`;
    case 'ratio':
      return `${label(def.numerator)} divided by ${label(def.denominator)}`;
    case 'rate':
      return def.of ? `share of ${label(def.of)} from rows where ${conditionText(def.where)}` : `share of rows where ${conditionText(def.where)}`;
  }
}

function conditionText(f: { column: string; op: string; value?: unknown }): string {
  const ops: Record<string, string> = { eq: 'is', ne: 'is not', gt: 'is above', gte: 'is at least', lt: 'is below', lte: 'is at most', in: 'is one of' };
  if (f.op === 'is_true') return `${f.column} is true`;
  if (f.op === 'is_false') return `${f.column} is false`;
  const v = Array.isArray(f.value) ? f.value.join(', ') : String(f.value ?? '');
  return `${f.column} ${ops[f.op] ?? f.op} ${v}`;
}
