// A statistic named in the request ("median delay", "90th percentile delay", "p90 delay", "the
// typical delay", "a normal delay", "the usual day's rainfall"): read after the catalog has
// claimed its words (a metric whose own label says "median" keeps it), claimed so it is never an
// unknown word, and given to the questions that hold it. What it does is analysis/statistic.ts's.
// "typical", "normal" and "usual" before a measure ask for its robust centre, the median (common
// practice: the mean is pulled by a few extreme values): an assumption, said back. Without a measure
// after them ("busier than usual", "is that normal?") they are no statistic.
import type { DatasetConfig, Metric } from '../../config/schema.js';
import { statisticWords, takesStatistic } from '../../analysis/statistic.js';
import type { Question } from '../brief.js';
import type { CatalogHit } from './catalog-match.js';
import type { RequestText, Span } from './text.js';

export interface StatisticMention {
  quantile: number;
  span: Span;
  words: string;
  saidBack?: string;
}

const PATTERN = /(?<![\p{L}\d])(?:(median)|p(\d{1,2})|(\d{1,2})(?:st|nd|rd|th)?[\s-]*(?:percentile|pctl|centile)|(upper|lower|top|bottom|first|third)\s+quartile)(?![\p{L}\d])/gu;

// "typical delay", "the normal day's rainfall", "a usual week's flights": the centre word, then an
// optional time noun whose typical member is meant (claimed with it, so "day" is no count of days).
const CENTRE = /(?<![\p{L}\d])(typical|normal|usual)(?:\s+(?:day|week|month|year|hour)(?:'s|’s|s)?)?(?![\p{L}\d])/gu;

/**
 * The statistics named. `hits` are the catalog's: a centre word counts only right before a
 * measure's words (at most one word between: "the typical daily rainfall") or inside them when the
 * catalog read it as an other name of "average" ("typical delay" as "Average delay"), never where a
 * measure's own name holds the word ("Normal days").
 */
export function readStatistics(text: RequestText, hits: readonly CatalogHit[] = [], ds?: DatasetConfig): StatisticMention[] {
  const out: StatisticMention[] = [];
  for (const m of text.matches(PATTERN)) {
    if (text.isClaimed(m.span)) continue;
    const words = text.quote(m.span);
    let quantile: number | undefined;
    if (m[1] === 'median') quantile = 0.5;
    else if (m[2] !== undefined || m[3] !== undefined) {
      const n = Number(m[2] ?? m[3]);
      if (n >= 1 && n <= 99) quantile = n / 100;
    } else if (m[4] !== undefined) quantile = /upper|top|third/.test(m[4]) ? 0.75 : 0.25;
    if (quantile === undefined) continue;
    out.push({ quantile, span: m.span, words });
  }
  const metricHits = hits.filter((h) => h.entries.some((e) => e.kind === 'metric'));
  const ownNames = (ds?.metrics ?? []).flatMap((x) => [x.name, x.label, ...x.synonyms]).join(' ').toLowerCase();
  for (const m of text.matches(CENTRE)) {
    const word = m[1]!.toLowerCase();
    if (new RegExp(`\\b${word}\\b`).test(ownNames)) continue;
    const centre = { start: m.span.start, end: m.span.start + m[1]!.length };
    const inside = metricHits.some((h) => h.start <= centre.start && h.end >= centre.end);
    if (!inside && text.isClaimed(centre)) continue;
    // The measure follows: its hit starts within one word after (or the word is inside it). With a
    // time noun ("on a typical day"), a measure earlier in the same sentence is the one meant.
    // The word between describes the measure ("daily"); a function word ("a normal year for rain") parts them.
    const next = metricHits.find((h) => h.start >= m.span.end && /^\s*(?:[\p{L}’'-]+\s+)?$/u.test(text.lower.slice(m.span.end, h.start)) && !/^\s*(?:for|of|in|on|at|to|by|with|than|and|or|but|as|is|was|are|were)\s/.test(text.lower.slice(m.span.end, h.start)));
    const timed = m.span.end > centre.end;
    const before = timed && metricHits.some((h) => h.end <= m.span.start && !/[.?!;]/.test(text.lower.slice(h.end, m.span.start)));
    if (!inside && !next && !before) continue;
    const span = inside ? centre : m.span;
    const said = text.quote(span);
    out.push({ quantile: 0.5, span, words: said, saidBack: `"${said}" read as the median (the robust centre: a few extreme values do not pull it as they pull the mean)` });
  }
  return out;
}

/** Each statistic goes to the questions whose words hold it (every question when none does). */
export function applyStatistics(questions: Question[], mentions: readonly StatisticMention[], notes: string[], ds: DatasetConfig): void {
  for (const m of mentions) {
    const own = questions.filter((q) => q.text.toLowerCase().includes(m.words.toLowerCase()));
    // The assumption is said where a measure takes it; a measure that cannot is said below.
    const takers = (own.length > 0 ? own : questions).some((q) => q.metrics.some((n) => ds.metrics.some((x) => x.name === n && takesStatistic(x))));
    if (m.saidBack && takers) notes.push(m.saidBack);
    for (const q of own.length > 0 ? own : questions) {
      if (q.statistic) continue;
      q.statistic = { quantile: m.quantile, words: m.words };
      // A measure that is no average of a column has no such statistic: said, and answered as it stands.
      for (const name of q.metrics) {
        const metric = ds.metrics.find((x) => x.name === name);
        if (metric && !takesStatistic(metric)) notes.push(`"${m.words}" of ${metric.label.toLowerCase()}: ${cannotTake(metric)}, so it has no ${statisticWords(m)}; it is answered as it stands`);
      }
    }
  }
}

function cannotTake(metric: Metric): string {
  switch (metric.definition.type) {
    case 'count':
      return 'it is a count of rows';
    case 'sum':
      return 'it is a total';
    case 'distinct_count':
      return 'it is a count of distinct values';
    default:
      return 'it is a ratio of totals, not an average of one column';
  }
}
