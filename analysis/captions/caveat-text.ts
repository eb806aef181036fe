// Plain-words notes for caveats, and the short flags a chart footer carries.
import type { Grain } from '../types.js';
import { formatPeriod, formatValue } from '../format.js';
import { countOf, isAre, listJoin } from './grammar.js';
import type { Caveat } from '../types.js';

/** A caveat field as text; a missing field never prints as "undefined". */
function show(v: unknown): string {
  if (typeof v === 'number') return Number.isFinite(v) ? v.toLocaleString('en') : 'n/a';
  return typeof v === 'string' && v.length > 0 ? v : typeof v === 'boolean' ? String(v) : 'n/a';
}

export function caveatNote(c: Caveat, locale: string): string {
  const d = c.data;
  const day = (iso: unknown) => (typeof iso === 'string' ? formatPeriod(iso, 'day', locale, 'long') : 'n/a');
  const period = (iso: unknown, grain: unknown) =>
    typeof iso === 'string' ? formatPeriod(iso, (grain as Grain) ?? 'month', locale, 'long') : 'n/a';
  switch (c.code) {
    case 'partial_period':
      return `${period(d.period, d.grain)} is partial (data from ${day(d.coveredFrom)} to ${day(d.coveredTo)}); it is drawn dashed and left out of the highs and lows.`;
    case 'partial_period_excluded':
      return `${period(d.period, d.grain)} is partial and was left out.`;
    case 'series_gap':
      return `${periodsText(d.periods, d.grain)} ${d.periods === 1 ? 'has' : 'have'} no data at all${d.periods === 1 ? ':' : ', the first in'} ${period(d.firstGap, d.grain ?? 'month')}.`;
    case 'empty_period': {
      const grain = (typeof d.grain === 'string' ? d.grain : 'month') as Grain;
      const n = typeof d.periods === 'number' ? d.periods : 0;
      if (d.leading === true) return `No rows match the filter before ${period(d.firstMatch, grain)} (the ${countOf(n, grain)} from ${period(d.firstEmpty, grain)}), so the series starts there.`;
      return `${countOf(n, grain)} ${n === 1 ? 'has' : 'have'} no rows that match the filter (the first is ${period(d.firstEmpty, grain)}): there is nothing to average, so ${n === 1 ? 'it is' : 'they are'} left blank rather than drawn as 0.`;
    }
    case 'no_data':
      return 'There is no data in the period asked for.';
    case 'all_null':
      return 'The metric has no values in this period (all missing).';
    case 'single_period':
      return 'Only one complete period is available, so there is no pattern to read yet.';
    case 'truncated':
      return `The result was cut at ${show(d.rows)} rows.`;
    case 'null_share':
      return `${show(d.column)} is missing in ${typeof d.share === 'number' && Number.isFinite(d.share) ? `${(d.share * 100).toFixed(d.share < 0.01 ? 2 : 1)}%` : 'some'} of rows (${show(d.count)}).`;
    case 'duplicate_keys':
      if (typeof d.sampledOneIn === 'number') {
        return `About ${show(d.count)} rows repeat a ${show(d.column)} that should be unique (estimated from 1 ${show(d.column)} in ${show(d.sampledOneIn)}); they are counted as they are.`;
      }
      return `${show(d.count)} rows repeat a ${show(d.column)} that should be unique; they are counted as they are.`;
    case 'negative_amounts':
      if (d.periods === true) return `Some periods have a negative total of ${show(d.column)}, so they are left out.`;
      if (d.segments === true) return `Some segments have a negative total, so shares are not meaningful for them.`;
      return `${show(d.count)} rows have a negative ${show(d.column)}.`;
    case 'outlier': {
      if (typeof d.count !== 'number') return `${period(d.period, d.grain)} is an outlier.`;
      const grain = (typeof d.grain === 'string' ? d.grain : 'month') as Grain;
      const names = String(d.examples ?? '').split(',').filter(Boolean).map((p) => formatPeriod(p, grain, locale, 'long'));
      return `${countOf(d.count, grain, 'en', grain === 'day' ? 'days' : undefined)} are unusual (modified z-score above 3.5); the ${names.length} most extreme: ${listJoin(names)}.`;
    }
    case 'stale_data':
      return typeof d.grain === 'string' ? `The latest data is for ${period(d.lastDate, d.grain)}, ${ageText(d.days)}.` : `The latest data is from ${day(d.lastDate)}, ${ageText(d.days)}.`;
    case 'small_sample':
      return `Small sample (n = ${show(d.n)}): read with care.`;
    case 'too_few_cycles':
      return 'Fewer than two full years of data: too little to measure seasonality.';
    case 'observational':
      return 'This compares groups that were not randomly assigned, so it cannot prove cause.';
    case 'segments_folded':
      if (typeof d.count === 'number' && typeof d.minRows === 'number') return `${countOf(d.count, 'segment')} with fewer than ${formatValue(d.minRows, { unit: 'count', locale: 'en' })} rows ${isAre(d.count)} not ranked and ${isAre(d.count)} combined as "All others".`;
      // Folded by value: an average's or a lowest-first ranking's fold holds lower or higher values, not smaller segments.
      if (typeof d.count === 'number' && d.folded === 'change') return `${countOf(d.count, 'more segment')} with smaller changes than those named ${isAre(d.count)} combined as "All others".`;
      if (typeof d.count === 'number' && (d.folded === 'lower' || d.folded === 'higher')) return `${countOf(d.count, 'more segment')} with ${d.folded} values than those named ${isAre(d.count)} combined as "All others".`;
      return typeof d.count === 'number' ? `${countOf(d.count, 'smaller segment')} ${isAre(d.count)} combined as "All others".` : 'Smaller segments are combined as "All others".';
    case 'segment_gap':
      return `${show(d.segment)} has no data for ${periodsText(d.periods, d.grain)}, from ${period(d.firstGap, d.grain ?? 'month')}.`;
    case 'late_segment':
      return `${show(d.segment)} only has data from ${period(d.firstPeriod, d.grain ?? 'month')}.`;
    case 'base_zero':
      return 'Some growth rates cannot be computed because the earlier value is zero or missing.';
    case 'suppressed_small_groups': {
      const under = typeof d.minimum === 'number' ? `fewer than ${show(d.minimum)} rows (the minimum group size)` : 'fewer rows than the minimum group size';
      const n = typeof d.count === 'number' ? d.count : 0;
      // Periods or cells of comparison groups; whole comparison groups; or segments folded into "All others".
      if (typeof d.groups === 'string' && d.periods === true) return `${show(n)} ${n === 1 ? 'period' : 'periods'} of ${show(d.groups)} had ${under}: too few to show, so they are left blank.`;
      if (typeof d.groups === 'string' && d.cells === true) {
        const more = typeof d.complementary === 'number' && d.complementary > 0 ? d.complementary : 0;
        const also = more > 0 ? `; ${show(more)} more ${more === 1 ? 'is' : 'are'} withheld so that ${n === 1 ? 'it' : 'they'} cannot be worked out from the totals` : '';
        return `${show(n)} ${n === 1 ? 'value' : 'values'} of ${show(d.groups)} within a segment had ${under}: too few to show, so they are withheld${also}.`;
      }
      if (typeof d.groups === 'string') return `Too few to show: ${show(d.groups)} had ${under}, so their figures are withheld.`;
      const extra = typeof d.complementary === 'number' && d.complementary > 0 ? d.complementary : 0;
      // Complementary suppression: the segments folded beside the small ones are said, so the count stays true.
      const beside = extra > 0 ? `, with ${show(extra)} more ${extra === 1 ? 'segment' : 'segments'} so that ${n === 1 ? 'it' : 'they'} cannot be worked out from the total` : '';
      return `${show(n)} ${n === 1 ? 'segment' : 'segments'} with ${under} ${n === 1 ? 'is' : 'are'} combined as "All others"${beside}.`;
    }
  }
}

/** "1 month", "12 weeks": a count of periods named by their grain (a period when the grain is not known). */
function periodsText(n: unknown, grain: unknown): string {
  const noun = typeof grain === 'string' && ['day', 'week', 'month', 'quarter', 'year'].includes(grain) ? grain : 'period';
  return typeof n === 'number' ? countOf(n, noun) : `some ${noun}s`;
}

export function caveatFlag(c: Caveat): string {
  // A filtered series that starts at its first matching period is not empty anywhere it is drawn.
  if (c.code === 'empty_period' && c.data.leading === true) return 'starts at the first match';
  // A fold by value holds lower (or higher) values, not a long tail of small segments.
  if (c.code === 'segments_folded' && (c.data.folded === 'lower' || c.data.folded === 'higher')) return `${c.data.folded} values combined`;
  const flags: Record<Caveat['code'], string> = {
    partial_period: 'partial period (dashed)',
    partial_period_excluded: 'partial period excluded',
    series_gap: 'gap in the series',
    empty_period: 'empty after the filter',
    no_data: 'no data',
    all_null: 'no values',
    single_period: 'single period',
    truncated: 'result truncated',
    null_share: 'missing values',
    duplicate_keys: 'duplicate keys',
    negative_amounts: 'negative amounts',
    outlier: 'outlier',
    stale_data: 'stale data',
    small_sample: 'small sample',
    too_few_cycles: 'too few cycles',
    observational: 'observational comparison',
    segments_folded: 'long tail combined',
    segment_gap: 'gap in a segment',
    late_segment: 'segment starts late',
    base_zero: 'undefined growth',
    suppressed_small_groups: 'small groups combined',
  };
  return flags[c.code];
}

/** How old the data is, as a person would say it: "12 days ago", "about 5 months ago", "about 16 years ago". */
function ageText(days: unknown): string {
  if (typeof days !== 'number' || !Number.isFinite(days)) return `${String(days)} days ago`;
  if (days < 60) return countOf(Math.round(days), 'day') + ' ago';
  if (days < 730) return `about ${countOf(Math.round(days / 30.44), 'month')} ago`;
  return `about ${countOf(Math.round(days / 365.25), 'year')} ago`;
}
