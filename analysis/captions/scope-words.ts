// How a sub-question's filters are said: in chart subtitles ("Channel: phone, web"), after a
// title ("(channel: phone or web)") and at the head of a caption ("Filtered to channel: phone or
// web."), so an answer about one segment never reads as an answer about all of them.
import type { DatasetConfig } from '../../config/schema.js';
import type { SegmentFilter } from '../types.js';
import { capitalise, inSentence, listJoin } from './grammar.js';
import { dayScopeWords, isDayFilter } from '../day-of-week.js';

function dimensionLabel(f: SegmentFilter, ds: DatasetConfig): string {
  return ds.dimensions.find((d) => d.name === f.dimension)?.label ?? f.dimension;
}

function valueText(v: string | number | boolean): string {
  return typeof v === 'string' ? (v.length > 0 ? v : '(blank)') : String(v);
}

/** One subtitle part per filter: "Channel: phone, web", "Customer tier: all but free". */
export function filterSubtitleParts(filters: readonly SegmentFilter[], ds: DatasetConfig): string[] {
  // Days of the week (analysis/day-of-week.ts): "Fridays only", "Weekends only".
  return filters.map((f) => isDayFilter(f) ? capitalise(dayScopeWords(f)) : `${dimensionLabel(f, ds)}: ${f.exclude ? `all but ${listJoin(f.values.map(valueText), 'and')}` : f.values.map(valueText).join(', ')}`);
}

/** "channel: phone or web; route: Mainland–Saltreach; customer tier: all but free" ('' without filters). */
export function scopeText(filters: readonly SegmentFilter[], ds: DatasetConfig): string {
  // A filter that leaves values out says so: "customer tier: free" would read as the opposite.
  return filters.map((f) => isDayFilter(f) ? dayScopeWords(f) : `${inSentence(dimensionLabel(f, ds))}: ${f.exclude ? `all but ${listJoin(f.values.map(valueText), 'and')}` : listJoin(f.values.map(valueText), 'or')}`).join('; ');
}

/** A title with its scope after it; unchanged without filters. */
export function scopedTitle(title: string, filters: readonly SegmentFilter[], ds: DatasetConfig): string {
  const scope = scopeText(filters, ds);
  return scope ? `${title} (${scope})` : title;
}

/** A caption led by its scope; unchanged without filters. */
export function scopedCaption(caption: string, filters: readonly SegmentFilter[], ds: DatasetConfig): string {
  const scope = scopeText(filters, ds);
  if (!scope) return caption;
  // Days of the week alone lead as themselves ("Fridays only."), other filters as "Filtered to …".
  return filters.every(isDayFilter) ? `${capitalise(scope)}. ${caption}` : `Filtered to ${scope}. ${caption}`;
}
