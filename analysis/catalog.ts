// Lookups over one dataset's catalog. Names reaching SQL are checked here first.
import type { ComparisonGroup, DatasetConfig, Dimension, Metric, MetricKind, OwnLevelsReading } from '../config/schema.js';
import { type Expr, expressionColumns } from '../config/expression.js';
import type { SeasonalModel } from './stats/decomposition.js';
import { percentScale, percentsApply, type PercentScale } from './stats/growth.js';
import type { ChangeBasis } from './findings/table.js';
import type { RankOrder, SegmentFilter } from './types.js';

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

/**
 * Sums and counts add up across segments and periods; averages, distinct counts, ratios and rates
 * do not, and neither does a sum declared a level over time (a headcount: see `isLevelSum`).
 */
export function isAdditive(metric: Metric): boolean {
  return addsAcrossSegments(metric) && !isLevelSum(metric);
}

/** Sums and counts add up across segments at one time, levels (headcounts, balances) included: shares and drivers apply. */
export function addsAcrossSegments(metric: Metric): boolean {
  return metric.definition.type === 'sum' || metric.definition.type === 'count';
}

/** A sum declared `kind: level`: totalled across segments at each stamp of the time column, averaged over the stamps of a period. */
export function isLevelSum(metric: Metric): boolean {
  return metric.definition.type === 'sum' && metric.kind === 'level';
}

/** A metric that counts something (rows, with or without a filter): per-unit comparisons are counts per unit. */
export function isCountMetric(metric: Metric): boolean {
  return metric.definition.type === 'count';
}

/** The catalog's plain count of rows (such as bookings), so shares of rows and frequencies can be named. */
export function plainCountMetric(ds: DatasetConfig): Metric | undefined {
  return ds.metrics.find((m) => m.definition.type === 'count' && !m.definition.where);
}

/**
 * Whether one row is a thing a reader can picture (a booking, a flight): the catalog counts rows
 * under a name of their own. A table of daily totals per shop and channel has no such count (or
 * only one called "rows"), and a mean per row of it would mean nothing to a manager.
 */
export function rowsAreEvents(ds: DatasetConfig): boolean {
  const count = plainCountMetric(ds);
  return !!count && !/^rows?$/i.test(count.label.trim()) && !/^rows?$/i.test(count.name);
}

/** True when the dimension exists and may be grouped by or filtered on (personal data never may). */
export function isGroupable(ds: DatasetConfig, name: string): boolean {
  const d = ds.dimensions.find((x) => x.name === name);
  return !!d && !d.personal_data;
}

/**
 * True when the dimension may be a breakdown: groupable, and not the column of a comparison
 * group (a breakdown by the group's own column would repeat the comparison).
 */
export function isBreakdownDimension(ds: DatasetConfig, name: string): boolean {
  const d = ds.dimensions.find((x) => x.name === name);
  return !!d && isGroupable(ds, name) && !ds.comparison_groups.some((g) => g.column === d.column);
}

/** The columns a comparison group's rule reads: its own true/false column, or those its `when` condition reads. */
/**
 * Whether the group's members chose to be in it: its column or labels say they signed up, opted
 * in, enrolled, subscribed, joined, registered, volunteered, applied, bought or hold something (a
 * pass, a plan, a membership). Then the caution says members chose; any other group (sites
 * refitted, regions picked) gets neutral words, since who put units in it is not known.
 */
export function isSelfSelected(g: ComparisonGroup): boolean {
  const words = [g.column, g.label, g.members_label, ...(g.synonyms ?? [])].join(' ').replace(/[_-]+/g, ' ').toLowerCase();
  return /\b(?:sign(?:ed|s)?\s*ups?|opt(?:ed|s)?\s*ins?|enrol\w*|subscri\w*|join\w*|regist\w*|volunteer\w*|appl(?:ied|icants?)|(?:card|pass|plan|policy|account)?\s*holders?|members?(?:hip)?s?|loyalty|bought|purchas\w*|adopt\w*)\b/.test(words);
}

export function groupColumns(ds: DatasetConfig, g: ComparisonGroup): string[] {
  const derived = ds.derived?.find((x) => x.name === g.column);
  return derived ? expressionColumns(derived.expr) : [g.column];
}

/**
 * Whether a group is made of a dimension's values alone (`{column: shop, one_of: [...]}`, or the
 * group's own column as a dimension): every segment of it is then all members or all others, so
 * the group is never compared within it, and naming its values names the sides of the comparison.
 */
export function groupMadeOf(ds: DatasetConfig, g: ComparisonGroup, dimension: string): boolean {
  const column = ds.dimensions.find((d) => d.name === dimension)?.column;
  if (column === undefined) return false;
  const columns = groupColumns(ds, g);
  return columns.length === 1 && columns[0] === column;
}

/** The values that mark a group's members, when its rule lists them (`{column: shop, one_of: [...]}`). */
export function memberValues(ds: DatasetConfig, g: ComparisonGroup): string[] | undefined {
  const e = ds.derived?.find((x) => x.name === g.column)?.expr;
  if (e?.type === 'in' && !e.negated && e.list.every((x) => x.type === 'string')) return e.list.map((x) => (x as { value: string }).value);
  if (e?.type === 'binary' && e.op === '=' && e.right.type === 'string') return [e.right.value];
  return undefined;
}

/**
 * Whether a value of the dimension a group is made of marks a member: read from a rule that lists
 * values (`one_of`, `is`, `is_not`) or a true/false column; undefined for any other rule.
 */
export function isMemberValue(ds: DatasetConfig, g: ComparisonGroup, value: string | number | boolean): boolean | undefined {
  const derived = ds.derived?.find((x) => x.name === g.column);
  if (!derived) {
    const text = String(value).toLowerCase();
    return ['true', 't', 'yes', '1'].includes(text) ? true : ['false', 'f', 'no', '0'].includes(text) ? false : undefined;
  }
  const e = derived.expr;
  const literal = (x: Expr): string | undefined => (x.type === 'string' ? x.value : x.type === 'number' ? x.text : x.type === 'boolean' ? String(x.value) : undefined);
  if (e.type === 'in' && e.value.type === 'column') {
    const list = e.list.map(literal);
    if (list.some((x) => x === undefined)) return undefined;
    return list.includes(String(value)) !== e.negated;
  }
  if (e.type === 'binary' && (e.op === '=' || e.op === '!=') && e.left.type === 'column') {
    const v = literal(e.right);
    return v === undefined ? undefined : (v === String(value)) === (e.op === '=');
  }
  return undefined;
}

/**
 * The first dimension that may be a breakdown, in catalog order, skipping any that `filters` pin
 * to a single value (a breakdown by team of "the Billing team only" has one row: 100%).
 */
export function firstBreakdownDimension(ds: DatasetConfig, filters: readonly SegmentFilter[] = [], group?: ComparisonGroup): string | undefined {
  return ds.dimensions.find((d) => isBreakdownDimension(ds, d.name) && !pinsOneValue(filters, d.name) && !(group && groupMadeOf(ds, group, d.name)))?.name;
}

/** The filters keep a single value of the dimension ("team: Billing"), so nothing is left to break down. */
export function pinsOneValue(filters: readonly SegmentFilter[], dimension: string): boolean {
  return filters.some((f) => f.dimension === dimension && !f.exclude && f.values.length === 1);
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
export function metricKind(_ds: DatasetConfig, metric: Metric): MetricKind {
  return quantityKind(metric);
}

/** metricKind for code that holds the metric alone (captions): the kind needs nothing else. */
export function quantityKind(metric: Metric): MetricKind {
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

/**
 * A level read as a mean of rows (a price, a temperature, a rate per industry), not totalled
 * across segments: across the members of a breakdown whose members each carry their own level, its
 * plain figure is an average of unlike things. A level that sums across segments (a headcount,
 * unemployed persons: parts of one whole) and every flow or per-event ratio never is.
 */
export function readsOwnLevel(metric: Metric): boolean {
  return quantityKind(metric) === 'level' && !addsAcrossSegments(metric);
}

/**
 * A breakdown's members are entities with levels of their own when, for the metric, each holds one
 * reading per stamp of the time column (at least OWN_READING_SHARE of its stamps hold exactly one
 * row: a symbol's price each month, a city's high each day), and the stamps hold at least
 * MEMBERS_PER_STAMP of them on average (several run side by side, not one after another). Our own
 * cut-offs. A description of each row (weather type: two cities share "sun" on a day) is no
 * entity; neither is a breakdown of events (many flights per airport a day).
 */
export const OWN_READING_SHARE = 0.9;
export const MEMBERS_PER_STAMP = 1.5;
/** Members whose medians stand this many times apart have unlike levels (our own cut-off, "a large factor"). */
export const UNLIKE_LEVEL_FACTOR = 2;

/** What makes a combined figure of a level across entities mislead, read from the data (ownLevelDimension). */
export interface OwnLevelEntities {
  dimension: string;
  members: number;
  /** The members with the lowest and highest median (over their own stamps). */
  lowest: { value: string; median: number };
  highest: { value: string; median: number };
  /** highest / lowest median, when both are above zero and the metric has a true zero; else null. */
  factor: number | null;
  /** Members that start after the first member does, or stop before the last does (by a twentieth of the span or more). */
  entering: { value: string; first: string }[];
  leaving: { value: string; last: string }[];
}

/**
 * THE rule for a level asked across entities: the first breakdown (catalog order) whose members
 * carry their own level of the metric (OWN_READING_SHARE, MEMBERS_PER_STAMP above), when the
 * metric is a level averaged across rows (readsOwnLevel) and `filters` leave more than one member.
 * An answer of the metric without that breakdown averages unlike things: the plan answers per
 * member (bot/brief-defaults.ts) and every combined answer carries a caution (answer-sub-question.ts).
 * Null when no breakdown qualifies, or the metric was not read from the data (Metric.ownLevels).
 */
export function ownLevelDimension(ds: DatasetConfig, metric: Metric, filters: readonly SegmentFilter[] = []): OwnLevelEntities | null {
  if (!readsOwnLevel(metric) || !metric.ownLevels) return null;
  for (const d of ds.dimensions) {
    const reading = metric.ownLevels.find((r) => r.dimension === d.name);
    if (!reading || !isBreakdownDimension(ds, d.name) || pinsOneValue(filters, d.name)) continue;
    const entities = entitiesOf(metric, reading, filters);
    if (entities) return entities;
  }
  return null;
}

function entitiesOf(metric: Metric, reading: OwnLevelsReading, filters: readonly SegmentFilter[]): OwnLevelEntities | null {
  const kept = reading.members.filter((m) => filters.every((f) => f.dimension !== reading.dimension || f.values.includes(m.value) !== !!f.exclude));
  if (kept.length < 2 || reading.stamps === 0) return null;
  const cells = reading.members.reduce((a, m) => a + m.cells, 0);
  const single = reading.members.reduce((a, m) => a + m.single, 0);
  if (single < OWN_READING_SHARE * cells || cells < MEMBERS_PER_STAMP * reading.stamps) return null;
  const valued = kept.filter((m): m is typeof m & { median: number } => m.median !== null).sort((a, b) => a.median - b.median);
  if (valued.length < 2) return null;
  const lowest = valued[0]!;
  const highest = valued[valued.length - 1]!;
  const factor = lowest.median > 0 && !onIntervalScale(metric) && metric.reachesZero !== true ? highest.median / lowest.median : null;
  const first = kept.map((m) => m.first).sort()[0]!;
  const last = kept.map((m) => m.last).sort().at(-1)!;
  const margin = Math.max(1, daySpan(first, last) / 20);
  return {
    dimension: reading.dimension,
    members: kept.length,
    lowest: { value: lowest.value, median: lowest.median },
    highest: { value: highest.value, median: highest.median },
    factor,
    entering: kept.filter((m) => daySpan(first, m.first) >= margin).map((m) => ({ value: m.value, first: m.first })),
    leaving: kept.filter((m) => daySpan(m.last, last) >= margin).map((m) => ({ value: m.value, last: m.last })),
  };
}

function daySpan(a: string, b: string): number {
  return (Date.parse(`${b.slice(0, 10)}T00:00:00Z`) - Date.parse(`${a.slice(0, 10)}T00:00:00Z`)) / 86_400_000;
}

/**
 * The metric's good direction: true when higher is better, false when lower is, null when the config
 * says neither (a count of unemployed, a price): then changes are told as rises and falls, never as
 * better or worse.
 */
export function metricDirection(metric: Metric): boolean | null {
  return metric.higher_is_better ?? null;
}

/**
 * Whether a ranking asked "highest", "lowest", "best" or "worst" puts the largest value first:
 * best and worst go through higher_is_better, taken as true when the catalog does not say.
 */
export function rankDescending(metric: Metric, order: RankOrder): boolean {
  if (order === 'highest' || order === 'lowest') return order === 'highest';
  const higherBetter = metricDirection(metric) ?? true;
  return order === 'best' ? higherBetter : !higherBetter;
}

/**
 * A level's change is stated in its own units ("+2.5 ppm"), never as a percentage of itself; a
 * level kept in percent (a share held over time) moves in points, as a rate does.
 */
export function changesInUnits(metric: Metric): boolean {
  return (quantityKind(metric) === 'level' && metric.unit !== 'percent') || onIntervalScale(metric);
}

// A temperature in Celsius or Fahrenheit (°C, °F, "degrees"): its zero is a point on the scale, not none of it.
const INTERVAL_UNIT = /°|\bdeg(?:rees?|\.)?(?:\s*[CF])?\b|\bcelsius\b|\bfahrenheit\b/i;

/**
 * A metric on an interval scale has no true zero (0 °C is not "no temperature"), so a percent
 * change or a ratio to its mean means nothing: its changes and comparisons are differences in its
 * unit ("+1.3 °C"). Read from the unit label here; a metric whose values reach or cross zero in
 * the data is caught by its values (stats/growth.ts percentScale) and by the dataset's reading of
 * its days (Metric.reachesZero, in metricPercentScale).
 */
export function onIntervalScale(metric: Metric): boolean {
  return metric.unit !== 'percent' && metric.unit_label !== undefined && INTERVAL_UNIT.test(metric.unit_label);
}

/**
 * THE rule for percentages of a metric: the scale its `values` (the ones an answer compares) give a
 * percentage against (stats/growth.ts percentScale), marked `interval` for a metric on an interval
 * scale (°C: onIntervalScale). Every change, ratio to a mean (a weekday or seasonal index) and
 * relative gap of a metric goes through this (percentBaseUsable, percentChange, percentsApply):
 * a temperature, or an average delay whose values reach or cross zero, is then compared in its
 * units ("+1.3 °C", "2.1 min higher"), never in percent. `zeroIsALevel`: a count or sum of amounts,
 * where zero means none (isAdditive by default).
 */
export function metricPercentScale(metric: Metric, values: readonly (number | null)[], zeroIsALevel = isAdditive(metric)): PercentScale {
  const scale = percentScale(values, zeroIsALevel, onIntervalScale(metric));
  // The dataset's own reading of the metric's days (Metric.reachesZero, read once with the
  // coverage): an average whose days reach or cross zero anywhere in the data is signed in every
  // answer, whatever the few values one answer compares. A flow's zero is "none", not a crossing.
  return metric.reachesZero === true && !zeroIsALevel ? { ...scale, signed: true } : scale;
}

/** Whether the metric's values may be set against one another in percent (metricPercentScale above). */
export function percentsApplyTo(metric: Metric, values: readonly (number | null)[], zeroIsALevel = isAdditive(metric)): boolean {
  return percentsApply(metricPercentScale(metric, values, zeroIsALevel));
}

/**
 * How a change of the metric is stated, from the one rule: points for a rate or share (unit
 * percent), units for a level (changesInUnits), a metric on an interval scale or one whose
 * `values` reach or cross zero, percent otherwise.
 */
export function changeBasisOf(metric: Metric, values: readonly (number | null)[] = [], zeroIsALevel = isAdditive(metric)): ChangeBasis {
  if (metric.unit === 'percent') return 'points';
  if (changesInUnits(metric)) return 'units';
  return percentsApplyTo(metric, values, zeroIsALevel) ? 'percent' : 'units';
}

/**
 * How a metric's seasonal cycle is measured: a level swings in its own units, a flow or ratio in
 * proportion; but a metric that may not be taken in percent (an interval scale, or `values` that
 * reach or cross zero: metricPercentScale) swings in its units too, and a rate in points.
 */
export function seasonalModel(metric: Metric, values: readonly (number | null)[] = []): SeasonalModel {
  if (quantityKind(metric) === 'level' || metric.unit === 'percent') return 'additive';
  // A flow's zero is "none" (a dry day), not a crossing: only a ratio's or level's zero tips it.
  return percentsApplyTo(metric, values) ? 'multiplicative' : 'additive';
}

/**
 * The dimension whose values are a comparison group's units (sites, stores), when its unit column
 * is one and not personal data; null for a unit key that is no dimension (a customer id). A group
 * without a unit column that is made of one dimension's values (`{column: shop, one_of: [...]}`)
 * has that dimension's values as its units: its members are shops, so it is compared per shop.
 */
export function namedUnitDimension(ds: DatasetConfig, group: ComparisonGroup): Dimension | null {
  if (!group.unit_column) return ds.dimensions.find((d) => !d.personal_data && groupMadeOf(ds, group, d.name) && d.column !== group.column) ?? null;
  return ds.dimensions.find((d) => d.column === group.unit_column && !d.personal_data) ?? null;
}
