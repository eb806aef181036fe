// Shared wording for the performance family's captions: group and row nouns, numbers of a
// comparison, chance and p-value phrases. Everything numeric goes through format.ts.
import type { ComparisonGroup, DatasetConfig, Metric } from '../../config/schema.js';
import type {
  GroupRole,
  PerformanceDifferenceFinding,
  PerformanceFinding,
  PerformanceGroupSeriesFinding,
  PerformanceNoTestFinding,
  PerformanceUnitsLeftOutFinding,
  Quantity,
} from '../findings/performance.js';
import { formatPeriod, formatPointChange, formatValue, significant, type ValueFormat, valueFormatOf } from '../format.js';
import { addDays } from '../periods.js';
import type { Audience, DateWindow, Finding } from '../types.js';

export interface WordsContext {
  dataset: DatasetConfig;
  metric: Metric;
  group: ComparisonGroup;
  locale: string;
  audience: Audience;
  /** The data's last date (ISO), so an open-ended window reads "since …". */
  dataAsOf: string | null;
}

export type FindingOf<T extends PerformanceFinding['type']> = Extract<PerformanceFinding, { type: T }>;

export function findOne<T extends PerformanceFinding['type']>(
  findings: readonly Finding[],
  type: T,
  pred: (f: FindingOf<T>) => boolean = () => true,
): FindingOf<T> | undefined {
  return findings.find((f): f is FindingOf<T> => f.type === type && pred(f as FindingOf<T>));
}

export function findAll<T extends PerformanceFinding['type']>(findings: readonly Finding[], type: T): FindingOf<T>[] {
  return findings.filter((f): f is FindingOf<T> => f.type === type);
}

export function groupLabel(group: ComparisonGroup, role: GroupRole): string {
  return role === 'members' ? group.members_label : group.others_label;
}

/** The label in running text: "pass holders" (lower case first letter unless it looks like a name). */
import { countOf, inSentence as inText, pluralNoun, verbFor } from './grammar.js';
export { inText };

/** What one row is called, from a plain count metric's label ("bookings"), else "rows". */
/** "is" or "are" to agree with a metric label: "Revenue is", "Bookings are". */
export function isAre(label: string): 'is' | 'are' {
  return verbFor(label) as 'is' | 'are';
}

export function rowNoun(ds: DatasetConfig): { plural: string; singular: string } {
  const count = ds.metrics.find((m) => m.definition.type === 'count' && !m.definition.where);
  return nounPair(count?.label ?? 'rows');
}

/** What one unit is called, from a distinct count of the unit column ("customers"), else "units". */
export function unitNoun(ds: DatasetConfig, group: ComparisonGroup): { plural: string; singular: string } {
  const distinct = ds.metrics.find((m) => m.definition.type === 'distinct_count' && m.definition.column === group.unit_column && !m.definition.where);
  return nounPair(distinct?.label ?? 'units');
}

function nounPair(label: string): { plural: string; singular: string } {
  const plural = inText(label);
  const singular = plural.endsWith('ies') ? `${plural.slice(0, -3)}y` : plural.endsWith('s') ? plural.slice(0, -1) : plural;
  return { plural, singular };
}

/** What one unit of a unit column is called, from a distinct count of it ("customer"), else "unit". */
export function unitColumnNoun(ds: DatasetConfig, column: string | undefined): { plural: string; singular: string } {
  const distinct = ds.metrics.find((m) => m.definition.type === 'distinct_count' && m.definition.column === column && !m.definition.where);
  return nounPair(distinct?.label ?? 'units');
}

/** What one unit of a `per_unit_day` comparison is called, from its dimension's label: "site", "sites". */
export function unitDimensionNoun(ds: DatasetConfig, unit: string | undefined): { plural: string; singular: string } {
  const dim = ds.dimensions.find((d) => d.name === unit);
  const singular = inText(dim?.label ?? unit ?? 'unit');
  return { singular, plural: pluralNoun(singular) };
}

/**
 * "Average fare per booking", "Revenue per booking" for a sum compared per row, "Weekday visits
 * per day" for a count, "Weekday visits per site per day" for a count between groups of sites.
 */
export function quantityLabel(metric: Metric, quantity: Quantity, ds: DatasetConfig, unit?: string): string {
  if (quantity === 'per_day') return `${metric.label} per day`;
  if (quantity === 'per_unit_day') return `${metric.label} per ${unitDimensionNoun(ds, unit).singular} per day`;
  if (quantity === 'per_unit_month') return `${metric.label} per ${unitColumnNoun(ds, unit).singular} per month`;
  return quantity === 'per_row' ? `${metric.label} per ${rowNoun(ds).singular}` : metric.label;
}

/**
 * Value format of the compared quantity. A count per row, per day or per unit is a rate: it is
 * printed by format.ts's rate rule (three significant figures below 100), so "0.0417 a day" never
 * reads "0.0 a day" and the chart's labels print what the caption says. A count's own decimals
 * (usually 0) say how the count is printed, not its rate; decimals above 0 still win.
 */
export function quantityFormat(metric: Metric, quantity: Quantity, locale: string): ValueFormat {
  if (quantity !== 'metric' && metric.unit === 'count') {
    const { decimals, ...own } = valueFormatOf(metric, locale);
    return { ...own, unit: 'number', rate: true, ...(decimals !== undefined && decimals > 0 ? { decimals } : {}) };
  }
  return valueFormatOf(metric, locale);
}

/** The unit of a before/after answer's per-unit series (a shop's dimension), if it has one. */
export function seriesUnit(findings: readonly Finding[]): string | undefined {
  return findings.find((f): f is PerformanceGroupSeriesFinding => f.type === 'performance_group_series')?.unit;
}

/** The compared quantity of a before/after answer, from its series (older findings: per row for a sum). */
export function seriesQuantity(findings: readonly Finding[], metric: Metric): Quantity {
  const series = findings.find((f): f is PerformanceGroupSeriesFinding => f.type === 'performance_group_series');
  return series?.quantity ?? (metric.definition.type === 'sum' ? 'per_row' : 'metric');
}

export function perUnitFormat(locale: string): ValueFormat {
  return { unit: 'number', decimals: 2, locale };
}

export function day(iso: string, locale: string): string {
  return formatPeriod(iso, 'day', locale, 'long');
}

/** "from 1 April 2023 to 18 June 2025" for a half-open window. */
export function windowText(w: DateWindow, locale: string): string {
  if (w.start >= w.end) return `in the period asked for`;
  return `from ${day(w.start, locale)} to ${day(addDays(w.end, -1), locale)}`;
}

/**
 * The compared period as a sentence opener: "Since the SkerryPass launch on 1 April 2023" when the
 * window was moved to the launch and runs to the data's end, else "From 1 April 2023 to 18 June 2025".
 */
export function periodLead(win: DateWindow & { clippedToLaunch?: boolean }, ctx: Pick<WordsContext, 'locale' | 'group' | 'dataAsOf'>): string {
  if (win.start >= win.end) return 'In the period asked for';
  const toEnd = ctx.dataAsOf !== null && addDays(win.end, -1) >= ctx.dataAsOf;
  if (win.clippedToLaunch) {
    const launch = `the ${ctx.group.label} launch on ${day(win.start, ctx.locale)}`;
    return toEnd ? `Since ${launch}` : `From ${launch} to ${day(addDays(win.end, -1), ctx.locale)}`;
  }
  return `From ${day(win.start, ctx.locale)} to ${day(addDays(win.end, -1), ctx.locale)}`;
}

/** The same period inside a sentence ("since the SkerryPass launch on …", "from … to …"). */
export function periodInText(win: (DateWindow & { clippedToLaunch?: boolean }) | undefined, ctx: Pick<WordsContext, 'locale' | 'group' | 'dataAsOf'>): string {
  if (!win) return 'in the period asked for';
  const lead = periodLead(win, ctx);
  return lead.charAt(0).toLowerCase() + lead.slice(1);
}

/** A difference in the metric's own terms; shares read in percentage points (see formatPointChange). */
export function formatDifference(diff: number, fmt: ValueFormat, opts: { signed?: boolean } = {}): string {
  if (fmt.unit === 'percent') return formatPointChange(diff, fmt.locale, { signed: opts.signed ?? false });
  return formatValue(opts.signed ? diff : Math.abs(diff), fmt, { signed: opts.signed ?? false });
}

/** "about 14%", rounded to whole percent (one decimal below 1%). */
export function aboutPercent(relative: number, locale: string): string {
  const a = Math.abs(relative);
  return `about ${formatValue(a, { unit: 'percent', decimals: a < 0.01 ? 1 : 0, locale })}`;
}

/** "about 14% lower" / "about 3.5% higher"; "about the same" below half a percent. */
export function relativeWords(relative: number | null, locale: string): string | null {
  if (relative === null || !Number.isFinite(relative)) return null;
  if (Math.abs(relative) < 0.005) return 'about the same';
  return `${aboutPercent(relative, locale)} ${relative > 0 ? 'higher' : 'lower'}`;
}

/** "p < 0.001" or "p = 0.023". */
export function formatP(p: number, locale: string): string {
  if (!Number.isFinite(p)) return 'p = n/a';
  if (p < 0.001) return `p < ${formatValue(0.001, { unit: 'number', decimals: 3, locale })}`;
  // Two significant figures: 0.023, 0.0038, 0.70.
  const decimals = Math.min(6, Math.max(1, 1 - Math.floor(Math.log10(p))));
  return `p = ${formatValue(significant(p, 2), { unit: 'number', decimals, locale })}`;
}

export function chancePhrase(pValue: number | null, alpha: number): string {
  if (pValue === null) return 'there is no test of chance for it';
  return pValue < alpha ? 'the difference is unlikely to be chance' : 'a difference this size could be chance';
}

export function testName(test: PerformanceDifferenceFinding['test']): string {
  switch (test) {
    case 'welch_t':
      return "Welch's t-test";
    case 'two_proportion_z':
      return 'two-proportion z-test';
    case 'delta_ratio_z':
      return 'z-test on the ratio (delta method)';
    case 'did_t':
      return 'difference in differences (t, Welch–Satterthwaite df)';
    case 'did_z':
      return 'difference in differences (z)';
  }
}

export function statisticText(d: { test: PerformanceDifferenceFinding['test']; statistic: number; df: number | null }, locale: string): string {
  const name = d.test === 'welch_t' || d.test === 'did_t' ? 't' : 'z';
  const a = Math.abs(d.statistic);
  const stat = formatValue(significant(d.statistic, 3), { unit: 'number', decimals: a >= 100 ? 0 : a >= 10 ? 1 : 2, locale });
  const df = d.df === null ? '' : `, df = ${formatValue(d.df, { unit: 'number', decimals: d.df >= 100 ? 0 : 1, locale })}`;
  return `${name} = ${stat}${df}`;
}

export function intervalText(ci: [number, number], confidence: number, fmt: ValueFormat, locale: string): string {
  const level = formatValue(confidence, { unit: 'percent', decimals: 0, locale });
  return `${level} CI ${rangeText(ci[0], ci[1], fmt, { signed: true })}`;
}

/** "€5.26 to €5.84", or "1.6 to 2.1 pts" with the unit once. */
export function rangeText(lo: number, hi: number, fmt: ValueFormat, opts: { signed?: boolean } = {}): string {
  if (fmt.unit === 'percent') {
    const unitless = (v: number) => formatDifference(v, fmt, opts).replace(/\s\S+$/, '');
    return `${unitless(lo)} to ${formatDifference(hi, fmt, opts)}`;
  }
  return `${formatDifference(lo, fmt, opts)} to ${formatDifference(hi, fmt, opts)}`;
}

export function countText(n: number, locale: string): string {
  return formatValue(n, { unit: 'count', locale });
}

/** Why no test was run, in plain words. */
export function noTestWords(f: PerformanceNoTestFinding, ctx: WordsContext, nouns: { plural: string; singular: string }): string {
  const m = groupLabel(ctx.group, 'members');
  const o = groupLabel(ctx.group, 'others');
  switch (f.reason) {
    case 'empty_group': {
      const empty = [f.nFirst === 0 ? m : null, f.nSecond === 0 ? o : null].filter((x): x is string => x !== null);
      const who = empty.length === 2 ? `${inText(m)} or ${inText(o)}` : empty.length === 1 ? inText(empty[0]!) : 'one group';
      return `There are no ${nouns.plural} for ${who} in this period, so there is nothing to compare.`;
    }
    case 'too_few':
      return `One group has only ${countText(Math.min(f.nFirst, f.nSecond), ctx.locale)} ${Math.min(f.nFirst, f.nSecond) === 1 ? nouns.singular : nouns.plural}: too few to test a difference.`;
    case 'no_variation':
      return `Every ${nouns.singular} has the same value within each group, so there is no spread to test against.`;
    case 'not_testable':
      return `This metric is a total with no per-${nouns.singular} value, so the groups are shown side by side without a test.`;
    case 'suppressed': {
      // Which side is which depends on the comparison: members vs others, or one group after vs before.
      const [first, second] = f.comparison === 'members_vs_others' ? [m, o] : f.comparison === 'members_after_vs_before' ? [`${m} after`, `${m} before`] : [`${o} after`, `${o} before`];
      const hidden = [f.suppressedFirst ? first : null, f.suppressedSecond ? second : null].filter((x): x is string => x !== null);
      // Group labels name people in the plural ("Pass holders").
      const who = hidden.length === 2 ? `${inText(hidden[0]!)} and ${inText(hidden[1]!)} are` : hidden.length === 1 ? `${inText(hidden[0]!)} are` : 'The groups are';
      const under = f.minimum !== undefined ? ` (fewer than ${countText(f.minimum, ctx.locale)} ${nouns.plural}, the minimum group size)` : '';
      return `${who} too few to show${under}, so the figures are withheld and there is nothing to compare.`;
    }
  }
}

/**
 * The units left out of both groups, for the end of a caption: "1 site was not there through the
 * whole period and is left out of both groups, so neither changes its make-up: Harbour Road
 * (other sites, from 4 March 2024 to 31 December 2024)."
 */
export function unitsLeftOutSentence(findings: readonly Finding[], ctx: Pick<WordsContext, 'group' | 'locale' | 'dataset'>): string | null {
  const f = findings.find((x): x is PerformanceUnitsLeftOutFinding => x.type === 'performance_units_left_out');
  if (!f || f.units.length === 0) return null;
  const dim = ctx.dataset.dimensions.find((d) => d.name === f.dimension);
  const noun = inText(dim?.label ?? f.dimension);
  const list = f.units.map((u) => `${u.unit} (${inText(groupLabel(ctx.group, u.group))}, from ${day(u.first, ctx.locale)} to ${day(u.last, ctx.locale)})`);
  const one = f.units.length === 1;
  return `${countOf(f.units.length, noun, ctx.locale)} ${one ? 'was' : 'were'} not there through the whole period and ${one ? 'is' : 'are'} left out of both groups, so neither changes its make-up: ${list.join('; ')}.`;
}

/** What the compared n counts: days for a count compared per day, units per unit, otherwise the dataset's rows. */
export function sampleNoun(ds: DatasetConfig, quantity: Quantity, unit?: string): { plural: string; singular: string } {
  if (quantity === 'per_unit_day') return unitDimensionNoun(ds, unit);
  return quantity === 'per_day' ? { plural: 'days', singular: 'day' } : rowNoun(ds);
}

/**
 * For a count compared per day between two groups: the groups' volumes, not what each member
 * does, so no better or worse is said of it.
 */
export function volumeNote(quantity: Quantity, members: string): string | null {
  return quantity === 'per_day' ? ` This compares the two groups' daily volumes, not how often each of the ${members} does it.` : null;
}

/**
 * For a count compared per unit (`per_unit_day`): how the figure is formed, so a reader knows the
 * groups' sizes are out of it and what n counts.
 */
export function perUnitNote(quantity: Quantity, metric: Metric, unit: { singular: string; plural: string }): string | null {
  if (quantity !== 'per_unit_day') return null;
  return `Each ${unit.singular} counts once, at its ${inText(metric.label)} per day over the period, so the groups are compared per ${unit.singular} whatever their number of ${unit.plural}; the interval treats the ${unit.plural} as the sample.`;
}
