// Notes that hold for a whole thread, said once in its summary rather than under every answer:
// the data's freshness, repeated keys, negative amounts in rows, and a partial first or last
// period of the data. Under an answer stays only what changes that answer.
import type { Coverage } from '../coverage.js';
import { datesAfterWords, strayTailWords } from '../window-words.js';
import { caveatNote } from '../captions/caveat-text.js';
import { formatPeriod } from '../format.js';
import { addDays, nextPeriod, periodStart } from '../periods.js';
import { countOf } from '../captions/grammar.js';
import type { Caveat, Grain, SubQuestion } from '../types.js';
import type { Workspace } from '../workspace.js';
import { qualityCaveatsFor } from './check-run.js';
import type { QualityReport } from './quality-checks.js';

/**
 * True when the caveat is about the data as a whole, not about this answer. Months with no data in
 * an unfiltered measure are the measure's, the same under each of its answers: said once, in the
 * summary, with the measure named (measureNotes).
 */
export function isThreadWide(c: Caveat, coverage: Coverage, sq?: Pick<SubQuestion, 'filters' | 'comparisonGroup'>): boolean {
  switch (c.code) {
    case 'series_gap':
    case 'thin_period':
    // The same caution under every combined answer of a level (own-level-words.ts): said once.
    case 'mixed_levels':
      return sq !== undefined && sq.filters.length === 0 && !sq.comparisonGroup;
    case 'stale_data':
    case 'duplicate_keys':
      return true;
    case 'negative_amounts':
      // Row counts are the data's; negative totals of periods or segments change the answer.
      return c.data.periods !== true && c.data.segments !== true;
    case 'partial_period':
    case 'partial_period_excluded':
      // Cut by the data's own first or last date, not by the window the answer asked for.
      return (c.data.coveredTo !== undefined && c.data.coveredTo === coverage.lastDate) || (c.data.coveredFrom !== undefined && c.data.coveredFrom === coverage.firstDate);
    default:
      return false;
  }
}

/** The caveats an answer's post carries: those that change that answer, with many unusual periods said as one. */
export function answerCaveats(caveats: readonly Caveat[], coverage: Coverage, sq?: Pick<SubQuestion, 'filters' | 'comparisonGroup'>): Caveat[] {
  return summariseOutliers(caveats.filter((c) => !isThreadWide(c, coverage, sq)));
}

/**
 * The notes about a measure's own data an answer leaves to the summary (months with no data at
 * all, thin periods, a level averaged across members with levels of their own), each with the measure named, since another measure of the thread may have none:
 * "CO2 has no data for 5 months, the first June 1958."
 */
export function measureNotes(caveats: readonly Caveat[], coverage: Coverage, sq: Pick<SubQuestion, 'filters' | 'comparisonGroup'>, labelOf: (metric: string) => string, locale: string): string[] {
  return caveats
    .filter((c) => (c.code === 'series_gap' || c.code === 'thin_period' || c.code === 'mixed_levels') && isThreadWide(c, coverage, sq))
    .map((c) => {
      if (c.code !== 'series_gap') return caveatNote(c, locale);
      const grain = (typeof c.data.grain === 'string' ? c.data.grain : 'month') as Grain;
      const n = Number(c.data.periods);
      const first = typeof c.data.firstGap === 'string' ? formatPeriod(c.data.firstGap, grain, locale, 'long') : null;
      const what = typeof c.data.metric === 'string' ? labelOf(c.data.metric) : 'The measure';
      return `${what} has no data for ${countOf(n, grain)}${n > 1 && first ? `, the first ${first}` : first ? `: ${first}` : ''}; ${n === 1 ? 'it is' : 'they are'} left blank, not counted as zero.`;
    });
}

/** Past this many unusual periods, one note counts them and names the most extreme few. */
const OUTLIERS_NAMED = 5;

/**
 * One `outlier` caveat per metric and grain: a lone period as it is, a few named together ("March 2012 and December
 * 2015 are unusual ..."), many counted ("235 days are unusual; the five most extreme: ..."), never one per row.
 */
export function summariseOutliers(caveats: readonly Caveat[]): Caveat[] {
  const outliers = caveats.filter((c) => c.code === 'outlier' && c.data.count === undefined && c.data.periods === undefined);
  // One answer may screen the same series twice (its summary and its series): a period is said once.
  // Grouped by metric and grain, so each note names its periods at their own grain.
  const byMetric = new Map<string, Caveat[]>();
  const seen = new Set<string>();
  for (const c of outliers) {
    const id = `${String(c.data.metric ?? '')}|${String(c.data.grain ?? 'month')}|${String(c.data.period)}`;
    if (seen.has(id)) continue;
    seen.add(id);
    const key = `${String(c.data.metric ?? '')}|${String(c.data.grain ?? 'month')}`;
    byMetric.set(key, [...(byMetric.get(key) ?? []), c]);
  }
  const summaries: Caveat[] = [];
  for (const [key, group] of byMetric) {
    const metric = key.slice(0, key.lastIndexOf('|'));
    if (group.length === 1) {
      summaries.push(...group);
      continue;
    }
    const common = {
      ...(metric ? { metric } : {}),
      grain: group[0]!.data.grain ?? 'month',
      // How they were judged, so the note says "even for their day of the week" (one screen per series).
      ...(group[0]!.data.rule !== undefined ? { rule: group[0]!.data.rule } : {}),
      ...(group[0]!.data.cycle !== undefined ? { cycle: group[0]!.data.cycle } : {}),
      ...(group[0]!.data.fallback !== undefined ? { fallback: group[0]!.data.fallback } : {}),
      // Every period with its score ("2015-05-01:12.4,..."), for the rings on the chart (present/header.ts unusualOnChart).
      flagged: group.map((c) => `${String(c.data.period)}:${Number(c.data.score ?? 0)}`).join(','),
    };
    // A few: one note naming each in time order ("March 2012 and December 2015 are unusual ..."), not one note apiece.
    if (group.length <= OUTLIERS_NAMED) {
      summaries.push({ code: 'outlier', data: { ...common, periods: group.map((c) => String(c.data.period)).sort().join(',') } });
      continue;
    }
    const extreme = [...group].sort((a, b) => Math.abs(Number(b.data.score ?? 0)) - Math.abs(Number(a.data.score ?? 0)) || String(a.data.period).localeCompare(String(b.data.period)));
    summaries.push({ code: 'outlier', data: { ...common, count: group.length, examples: extreme.slice(0, OUTLIERS_NAMED).map((c) => String(c.data.period)).join(',') } });
  }
  return [...caveats.filter((c) => !outliers.includes(c)), ...summaries];
}

/** The thread's data notes in plain words, each once: quality findings for the columns the plan used, and a partial month at either end. */
export function threadNotes(items: readonly SubQuestion[], quality: QualityReport | undefined, ws: Workspace, now: Date, locale: string): string[] {
  const notes: string[] = [];
  if (quality) {
    for (const sq of items) {
      for (const c of qualityCaveatsFor(sq, quality, ws, now)) if (isThreadWide(c, ws.coverage)) notes.push(caveatNote(c, locale));
    }
  }
  notes.push(...partialEnds(ws.coverage, locale));
  if (ws.coverage.afterToday) notes.push(datesAfterWords(ws.coverage.afterToday, locale));
  if (ws.coverage.strayTail && ws.coverage.lastDate) notes.push(strayTailWords(ws.coverage.strayTail, ws.coverage.lastDate, locale));
  return [...new Set(notes)];
}

/** "The data ends on 18 June 2025, so June 2025 is partial: ..." for daily data cut inside a month. */
function partialEnds(coverage: Coverage, locale: string): string[] {
  const { firstDate, lastDate } = coverage;
  // Data stamped once a month (or coarser) is whole for every month it has.
  if (firstDate === null || lastDate === null || (coverage.stamps !== undefined && coverage.stamps !== 'daily' && coverage.stamps !== 'irregular')) return [];
  const out: string[] = [];
  const day = (iso: string) => formatPeriod(iso, 'day', locale, 'long');
  const month = (iso: string) => formatPeriod(iso, 'month', locale, 'long');
  if (periodStart(firstDate, 'month') !== firstDate) out.push(`The data starts on ${day(firstDate)}, so ${month(firstDate)} is partial.`);
  if (addDays(nextPeriod(periodStart(lastDate, 'month'), 'month'), -1) !== lastDate) {
    out.push(`The data ends on ${day(lastDate)}, so ${month(lastDate)} is partial: charts draw it dashed, and highs, lows and growth rates leave it out.`);
  }
  return out;
}
