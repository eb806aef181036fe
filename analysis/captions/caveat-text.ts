// Plain-words notes for caveats, and the short flags a chart footer carries.
import type { Grain } from '../types.js';
import { formatPeriod, formatValue } from '../format.js';
import { countOf, isAre, listJoin } from './grammar.js';
import type { Caveat } from '../types.js';
import { mixedLevelsNote } from './own-level-words.js';

/**
 * A caveat field as text; a missing one reads as `missing` ("a column", "some"), never as
 * "undefined" or "n/a", so a note stays a sentence whatever its data holds.
 */
function show(v: unknown, missing: string): string {
  if (typeof v === 'number') return Number.isFinite(v) ? v.toLocaleString('en') : missing;
  return typeof v === 'string' && v.length > 0 ? v : missing;
}

export function caveatNote(c: Caveat, locale: string): string {
  const d = c.data;
  const day = (iso: unknown) => (typeof iso === 'string' ? formatPeriod(iso, 'day', locale, 'long') : 'an unrecorded date');
  const period = (iso: unknown, grain: unknown) =>
    typeof iso === 'string' ? formatPeriod(iso, (grain as Grain) ?? 'month', locale, 'long') : 'one period';
  switch (c.code) {
    case 'partial_period':
      return `${period(d.period, d.grain)} is partial (data from ${day(d.coveredFrom)} to ${day(d.coveredTo)}); it is drawn dashed and left out of the highs and lows.`;
    case 'thin_period': {
      const grain = (typeof d.grain === 'string' ? d.grain : 'year') as Grain;
      const named = typeof d.periods === 'string' ? d.periods.split(',').filter(Boolean).map((p) => formatPeriod(p, grain, locale, 'long')) : [];
      // Many thin periods are counted, with the first and last named, not listed one by one.
      const all = named.length > 6 ? [`${countOf(named.length, grain)} from ${named[0]} to ${named[named.length - 1]!}`] : named;
      const held = d.fewest === d.most ? show(d.most, 'a few') : `${show(d.fewest, 'a few')}\u2013${show(d.most, 'a few')}`;
      return `${all.length > 0 ? listJoin(all) : 'Some periods'} ${named.length === 1 ? 'holds' : 'hold'} ${held} row${d.most === 1 ? '' : 's'}${named.length === 1 ? '' : ' each'} against a usual ${show(typeof d.typical === 'number' ? Math.round(d.typical) : d.typical, 'many')}: too few to read, so ${named.length === 1 ? 'it is' : 'they are'} drawn dashed and left out of the highs, lows and the latest complete ${grain}.`;
    }
    case 'partial_period_excluded':
      return `${period(d.period, d.grain)} is partial and was left out.`;
    case 'series_gap':
      if (d.zero === true) return `${periodsText(d.periods, d.grain)} ${d.periods === 1 ? 'has' : 'have'} no rows at all in the data${d.periods === 1 ? ':' : ', the first'} ${period(d.firstGap, d.grain ?? 'month')}; between the filter's first and last rows ${d.periods === 1 ? 'it counts' : 'they count'} as 0.`;
      return `${periodsText(d.periods, d.grain)} ${d.periods === 1 ? 'has' : 'have'} no data at all${d.periods === 1 ? ':' : ', the first in'} ${period(d.firstGap, d.grain ?? 'month')}.`;
    case 'empty_period': {
      const grain = (typeof d.grain === 'string' ? d.grain : 'month') as Grain;
      const n = typeof d.periods === 'number' ? d.periods : 0;
      if (d.leading === true) return `No rows match the filter before ${period(d.firstMatch, grain)} (the ${countOf(n, grain)} from ${period(d.firstEmpty, grain)}), so the series starts there.`;
      return `${countOf(n, grain)} ${n === 1 ? 'has' : 'have'} no rows that match the filter (the first is ${period(d.firstEmpty, grain)}): there is nothing to average, so ${n === 1 ? 'it is' : 'they are'} left blank rather than drawn as 0.`;
    }
    case 'no_data':
      return 'There is no data in the period asked for.';
    case 'mixed_levels':
      return mixedLevelsNote(c, locale);
    case 'all_null':
      return 'The metric has no values in this period (all missing).';
    case 'single_period':
      return 'Only one complete period is available, so there is no pattern to read yet.';
    case 'truncated':
      return typeof d.rows === 'number' ? `The result was cut at ${show(d.rows, '')} rows.` : 'The result was cut short.';
    case 'null_share':
      return `${show(d.column, 'A value')} is missing in ${typeof d.share === 'number' && Number.isFinite(d.share) ? `${(d.share * 100).toFixed(d.share < 0.01 ? 2 : 1)}%` : 'some'} of rows${typeof d.count === 'number' ? ` (${show(d.count, '')})` : ''}.`;
    case 'duplicate_keys':
      if (typeof d.sampledOneIn === 'number') {
        return `About ${show(d.count, 'some')} rows repeat a ${show(d.column, 'key')} that should be unique (estimated from 1 ${show(d.column, 'key')} in ${show(d.sampledOneIn, 'several')}); they are counted as they are.`;
      }
      return `${show(d.count, 'Some')} rows repeat a ${show(d.column, 'key')} that should be unique; they are counted as they are.`;
    case 'negative_amounts':
      if (d.periods === true) return `Some periods have a negative total of ${show(d.column, 'the amount')}, so they are left out.`;
      if (d.segments === true) return `Some segments have a negative total, so shares are not meaningful for them.`;
      return `${show(d.count, 'Some')} rows have a negative ${show(d.column, 'amount')}.`;
    case 'outlier': {
      const grain = (typeof d.grain === 'string' ? d.grain : 'month') as Grain;
      const how = outlierRuleText(d.rule, d.cycle, d.fallback, grain);
      if (typeof d.periods === 'string') {
        const all = d.periods.split(',').filter(Boolean).map((p) => formatPeriod(p, grain, locale, 'long'));
        if (all.length > 1) return `${listJoin(all)} are ${how.many}.`;
      }
      if (typeof d.count !== 'number') return `${period(d.periods ?? d.period, d.grain)} is ${how.one}.`;
      const names = String(d.examples ?? '').split(',').filter(Boolean).map((p) => formatPeriod(p, grain, locale, 'long'));
      return `${countOf(d.count, grain, 'en', grain === 'day' ? 'days' : undefined)} are ${how.many}; the ${names.length} most extreme: ${listJoin(names)}.`;
    }
    case 'stale_data':
      return typeof d.grain === 'string' ? `The latest data is for ${period(d.lastDate, d.grain)}, ${ageText(d.days)}.` : `The latest data is from ${day(d.lastDate)}, ${ageText(d.days)}.`;
    case 'small_sample':
      return typeof d.n === 'number' ? `Small sample (n = ${show(d.n, '')}): read with care.` : 'Small sample: read with care.';
    case 'too_few_cycles':
      // Gaps, not length: some calendar month has no value to measure it by (analysis/templates/trend-seasonality.ts).
      if (typeof d.uncoveredMonths === 'number' && d.uncoveredMonths > 0) return `${countOf(d.uncoveredMonths, 'calendar month')} ${d.uncoveredMonths === 1 ? 'has' : 'have'} no data to measure ${d.uncoveredMonths === 1 ? 'it' : 'them'} by: the seasonal pattern is not measured.`;
      return 'Fewer than two full years of data: too little to measure seasonality.';
    case 'observational':
      return 'This compares groups that were not randomly assigned, so it cannot prove cause.';
    case 'segments_folded':
      if (typeof d.count === 'number' && typeof d.minRows === 'number') return `${countOf(d.count, 'segment')} with fewer than ${formatValue(d.minRows, { unit: 'count', locale: 'en' })} rows ${isAre(d.count)} not ranked and ${isAre(d.count)} combined as "All others".`;
      // Folded by value: an average's or a lowest-first ranking's fold holds lower or higher values, not smaller segments.
      if (typeof d.count === 'number' && d.folded === 'later_share') return `${countOf(d.count, 'more segment')} with smaller shares in the later period than those named ${isAre(d.count)} combined as "All others".`;
      if (typeof d.count === 'number' && d.folded === 'change') return `${countOf(d.count, 'more segment')} with smaller changes than those named ${isAre(d.count)} combined as "All others".`;
      if (typeof d.count === 'number' && (d.folded === 'lower' || d.folded === 'higher')) return `${countOf(d.count, 'more segment')} with ${d.folded} values than those named ${isAre(d.count)} combined as "All others".`;
      return typeof d.count === 'number' ? `${countOf(d.count, 'smaller segment')} ${isAre(d.count)} combined as "All others".` : 'Smaller segments are combined as "All others".';
    case 'segment_gap':
      return `${show(d.segment, 'One segment')} has no data for ${periodsText(d.periods, d.grain)}, from ${period(d.firstGap, d.grain ?? 'month')}.`;
    case 'late_segment':
      return `${show(d.segment, 'One segment')} only has data from ${period(d.firstPeriod, d.grain ?? 'month')}.`;
    case 'base_zero':
      return 'Some growth rates cannot be computed because the earlier value is zero or missing.';
    case 'suppressed_small_groups': {
      const under = typeof d.minimum === 'number' ? `fewer than ${show(d.minimum, 'the minimum')} rows (the minimum group size)` : 'fewer rows than the minimum group size';
      const n = typeof d.count === 'number' ? d.count : 0;
      // Periods or cells of comparison groups; whole comparison groups; or segments folded into "All others".
      if (typeof d.groups === 'string' && d.periods === true) return `${show(n, 'Some')} ${n === 1 ? 'period' : 'periods'} of ${show(d.groups, 'a group')} had ${under}: too few to show, so they are left blank.`;
      if (typeof d.groups === 'string' && d.cells === true) {
        const more = typeof d.complementary === 'number' && d.complementary > 0 ? d.complementary : 0;
        const also = more > 0 ? `; ${show(more, 'some')} more ${more === 1 ? 'is' : 'are'} withheld so that ${n === 1 ? 'it' : 'they'} cannot be worked out from the totals` : '';
        return `${show(n, 'Some')} ${n === 1 ? 'value' : 'values'} of ${show(d.groups, 'a group')} within a segment had ${under}: too few to show, so they are withheld${also}.`;
      }
      if (typeof d.groups === 'string') return `Too few to show: ${show(d.groups, 'a group')} had ${under}, so their figures are withheld.`;
      const extra = typeof d.complementary === 'number' && d.complementary > 0 ? d.complementary : 0;
      // Complementary suppression: the segments folded beside the small ones are said, so the count stays true.
      const beside = extra > 0 ? `, with ${show(extra, 'some')} more ${extra === 1 ? 'segment' : 'segments'} so that ${n === 1 ? 'it' : 'they'} cannot be worked out from the total` : '';
      return `${show(n, 'Some')} ${n === 1 ? 'segment' : 'segments'} with ${under} ${n === 1 ? 'is' : 'are'} combined as "All others"${beside}.`;
    }
  }
}

/** "1 month", "12 weeks": a count of periods named by their grain (a period when the grain is not known). */
/**
 * How an unusual period was judged (quality/series-outliers.ts), said so a reader knows July was
 * weighed against other Julys: after the cycle and trend, or among the values when there were too
 * few cycles to measure one. An older caveat without a rule reads as before.
 */
function outlierRuleText(rule: unknown, cycle: unknown, fallback: unknown, grain: Grain): { one: string; many: string } {
  const weekly = cycle === 7 || (cycle === undefined && grain === 'day');
  const pattern = weekly ? 'weekly' : 'yearly';
  if (rule === 'seasonal' || rule === 'seasonal_and_values') {
    const even = weekly ? 'even for its day of the week' : 'even for the time of year';
    const evenMany = weekly ? 'even for their day of the week' : 'even for the time of year';
    const after = `judged on what is left once the usual ${pattern} pattern and the trend are taken out`;
    return { one: `unusual ${even} (${after})`, many: `unusual ${evenMany} (${after}; modified z-score above 3.5)` };
  }
  if (fallback === 'too_few_cycles') {
    const full = weekly ? 'full weeks' : 'full years';
    return {
      one: `an outlier among all the ${grain}s (modified z-score above 3.5; too few ${full} to allow for the ${pattern} pattern)`,
      many: `unusual among all the ${grain}s (modified z-score above 3.5; too few ${full} to allow for the ${pattern} pattern)`,
    };
  }
  return { one: 'an outlier', many: 'unusual (modified z-score above 3.5)' };
}

function periodsText(n: unknown, grain: unknown): string {
  const noun = typeof grain === 'string' && ['day', 'week', 'month', 'quarter', 'year'].includes(grain) ? grain : 'period';
  return typeof n === 'number' ? countOf(n, noun) : `some ${noun}s`;
}

/**
 * A caveat as the chart footer says it: one short plain sentence a reader outside the data team
 * follows, so an image forwarded alone still carries its warning (the full note is under the post).
 */
export function caveatFlag(c: Caveat): string {
  // A filtered series that starts at its first matching period is not empty anywhere it is drawn.
  if (c.code === 'empty_period' && c.data.leading === true) return 'The series starts at the first period with matching rows.';
  if (c.code === 'series_gap' && c.data.zero === true) return 'Periods with no rows at all count as 0 inside the filtered series.';
  // A fold by value holds lower (or higher) values, not a long tail of small segments.
  if (c.code === 'segments_folded' && (c.data.folded === 'lower' || c.data.folded === 'higher')) return `Segments with ${c.data.folded} values are combined as "All others".`;
  // Judged after the cycle: a reader of the image alone learns that July was weighed against other Julys.
  if (c.code === 'outlier' && (c.data.rule === 'seasonal' || c.data.rule === 'seasonal_and_values')) {
    return c.data.cycle === 7 ? 'Some periods are unusual even for their day of the week.' : 'Some periods are unusual even for the time of year.';
  }
  // Which members, and how many, so a forwarded chart says what its one line averages.
  if (c.code === 'mixed_levels' && typeof c.data.members === 'number' && typeof c.data.dimension === 'string') {
    return `Averages ${countOf(c.data.members, c.data.dimension.toLowerCase())} with levels of their own: unlike things.`;
  }
  const flags: Record<Caveat['code'], string> = {
    partial_period: 'A period with part of its data is drawn dashed.',
    partial_period_excluded: 'A period with part of its data is left out.',
    thin_period: 'Periods holding a sliver of the usual rows are drawn dashed and left out.',
    series_gap: 'Some periods have no data.',
    empty_period: 'Some periods have no rows that match the filter.',
    no_data: 'There is no data in the period asked for.',
    all_null: 'The measure has no values in this period.',
    single_period: 'Only one complete period, so no pattern to read yet.',
    truncated: 'The result was cut short.',
    null_share: 'Some rows have missing values.',
    duplicate_keys: 'Some rows repeat a key that should be unique.',
    negative_amounts: 'Some amounts are negative.',
    outlier: 'Some periods are unusual.',
    stale_data: 'The data is not up to date.',
    small_sample: 'Small sample: read with care.',
    too_few_cycles: 'Under two full years of data: too little to measure seasonality.',
    observational: 'Groups were not randomly assigned, so this cannot prove cause.',
    segments_folded: 'Smaller segments are combined as "All others".',
    segment_gap: 'A segment has periods with no data.',
    late_segment: 'A segment starts later than the others.',
    mixed_levels: 'Averages members with levels of their own: unlike things.',
    base_zero: 'Some growth rates cannot be computed: the earlier value is zero or missing.',
    suppressed_small_groups: 'Groups too small to show are withheld or combined.',
  };
  return flags[c.code];
}

/** How old the data is, as a person would say it: "12 days ago", "about 5 months ago", "about 16 years ago". */
function ageText(days: unknown): string {
  if (typeof days !== 'number' || !Number.isFinite(days)) return 'some time ago';
  if (days < 60) return countOf(Math.round(days), 'day') + ' ago';
  if (days < 730) return `about ${countOf(Math.round(days / 30.44), 'month')} ago`;
  return `about ${countOf(Math.round(days / 365.25), 'year')} ago`;
}
