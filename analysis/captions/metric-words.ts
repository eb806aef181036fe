// What a metric means, in words for its reader: analysts see the catalog's description (or the
// formula) as written, column names and all; managers and leadership never see a raw column
// name ("sum of fare_total"): a breakdown's column reads as its label, and words that would need
// one are left out, the metric's label saying it instead.
import type { DatasetConfig, Metric, MetricDefinition } from '../../config/schema.js';
import type { Audience } from '../types.js';
import { inSentence } from './grammar.js';

/**
 * A metric asked per day, as its answer's words state it: "Flights per day", read like a ratio (a
 * daily average is not a total of its period, so no "a month" follows it).
 */
export function perDayMetric(metric: Metric): Metric {
  return { ...metric, label: `${metric.label} per day`, kind: 'ratio' };
}

/** The catalog definition as a formula in words: "sum of fare_total", "revenue divided by passengers". */
export function metricFormula(metric: Metric, ds: DatasetConfig): string {
  return formulaOf(metric.definition, ds, (column) => column);
}

/**
 * The catalog's description, else the formula; for readers other than analysts, only in words a
 * manager would say: a breakdown's column by its label, a money column by its code, and nothing
 * at all ('') when the words still name a raw column ("sum of fare_total"): the chart's chip and
 * the caption already name the metric by its label (issue 17 item 10).
 */
export function metricMeaning(metric: Metric, ds: DatasetConfig, audience: Audience): string {
  if (audience === 'analysts') return metric.description ?? metricFormula(metric, ds);
  // A column named in words ("Worldwide Gross") is said as a label is in a sentence ("sum of worldwide gross").
  const formula = formulaOf(metric.definition, ds, (column) => (/\s/.test(column) ? inSentence(column) : column));
  return (metric.description !== undefined ? managerWords(metric.description, ds) : null) ?? managerWords(formula, ds) ?? '';
}

/** The meaning as an aside after the metric's label, " (revenue divided by passengers)"; none for leadership or when unsaid. */
export function meaningAside(metric: Metric, ds: DatasetConfig, audience: Audience): string {
  const meaning = audience === 'leadership' ? '' : metricMeaning(metric, ds, audience);
  return meaning ? ` (${meaning})` : '';
}

/**
 * How the config sets a metric up, for a sentence that follows from it ("Unemployed is set up
 * in the config as an average per row, so …"): what the catalog decided, not a fact about the
 * quantity. `change` names, as the subject of a sentence, the metric (the catalog's own, else a
 * config entry) that would be a total, where one would.
 */
export function configuredAs(metric: Metric, ds?: DatasetConfig): { as: string; change: string | null } {
  const def = metric.definition;
  const label = (name: string) => ds?.metrics.find((m) => m.name === name)?.label.toLowerCase() ?? name;
  switch (def.type) {
    case 'sum':
      return { as: 'a sum', change: null };
    case 'count':
      return { as: 'a count of rows', change: null };
    case 'average': {
      // A sum adds up across segments only for an amount: a percent summed is no total. The
      // catalog's own sum of the column is named where it has one.
      if (metric.unit === 'percent') return { as: 'an average per row', change: null };
      const sum = ds?.metrics.find((m) => m.definition.type === 'sum' && m.definition.column === def.column && !m.definition.where);
      return { as: 'an average per row', change: sum ? `${sum.label}, set up as sum: ${def.column},` : `a metric set up as sum: ${def.column}` };
    }
    case 'distinct_count':
      return { as: 'a count of distinct values', change: null };
    case 'ratio':
      return { as: `a ratio (${label(def.numerator)} per ${label(def.denominator)})`, change: null };
    case 'rate':
      return { as: 'a share of rows', change: null };
  }
}

// Codes that end a money column's name ("revenue_eur"): said as the code in capitals.
const CURRENCY_CODES = new Set(['eur', 'usd', 'gbp', 'jpy', 'chf', 'cad', 'aud', 'sek', 'nok', 'dkk', 'pln', 'cny', 'inr']);
// A name a person would not say: with an underscore, or with inner capitals.
const IDENTIFIER = /\b[A-Za-z][A-Za-z0-9]*(?:_[A-Za-z0-9]+)+\b|\b[a-z]+(?:[A-Z][a-z0-9]*)+\b/g;

/**
 * `text` with every raw column name in words: a breakdown's column becomes the breakdown's label
 * ("fare_class" → "fare class" or the label the catalog gives it), a money column its name and
 * code ("revenue_eur" → "revenue (EUR)"); null when any other identifier is left ("fare_total"),
 * which only its owner knows how to say.
 */
export function managerWords(text: string, ds: DatasetConfig): string | null {
  const labels = new Map<string, string>();
  for (const d of ds.dimensions) labels.set(d.column, inSentence(d.label));
  for (const g of ds.comparison_groups) labels.set(g.column, g.label);
  let unsaid = false;
  const out = text.replace(IDENTIFIER, (name) => {
    const label = labels.get(name);
    if (label) return label;
    const parts = name.split(/_|(?=[A-Z])/).filter((p) => p !== '').map((p) => p.toLowerCase());
    const last = parts[parts.length - 1]!;
    if (parts.length > 1 && CURRENCY_CODES.has(last)) return `${parts.slice(0, -1).join(' ')} (${last.toUpperCase()})`;
    unsaid = true;
    return name;
  });
  return unsaid ? null : out;
}

function formulaOf(def: MetricDefinition, ds: DatasetConfig, said: (column: string) => string): string {
  const label = (name: string) => inSentence(ds.metrics.find((m) => m.name === name)?.label ?? name);
  const where = 'where' in def && def.where ? ` where ${conditionText(def.where)}` : '';
  switch (def.type) {
    case 'sum':
      return `sum of ${said(def.column)}${where}`;
    case 'count':
      return `number of rows${where}`;
    case 'distinct_count':
      return `number of distinct ${said(def.column)} values${where}`;
    case 'average':
      return `mean of ${said(def.column)}${where}`;
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
