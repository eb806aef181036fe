// A statistic named in the request ("median delay", "90th percentile delay", "p90 delay", "the
// typical delay"): read after the catalog has claimed its words (a metric whose own label says
// "median" keeps it), claimed so it is never an unknown word, and given to the questions that
// hold it. What it does is analysis/statistic.ts's; "typical" is an assumption and said back.
import type { DatasetConfig, Metric } from '../../config/schema.js';
import { statisticWords, takesStatistic } from '../../analysis/statistic.js';
import type { Question } from '../brief.js';
import type { RequestText, Span } from './text.js';

export interface StatisticMention {
  quantile: number;
  span: Span;
  words: string;
  saidBack?: string;
}

const PATTERN = /(?<![\p{L}\d])(?:(median|typical)|p(\d{1,2})|(\d{1,2})(?:st|nd|rd|th)?[\s-]*(?:percentile|pctl|centile)|(upper|lower|top|bottom|first|third)\s+quartile)(?![\p{L}\d])/gu;

export function readStatistics(text: RequestText): StatisticMention[] {
  const out: StatisticMention[] = [];
  for (const m of text.matches(PATTERN)) {
    if (text.isClaimed(m.span)) continue;
    const words = text.quote(m.span);
    let quantile: number | undefined;
    let saidBack: string | undefined;
    if (m[1] === 'median') quantile = 0.5;
    else if (m[1] === 'typical') {
      // "typical delay" says which value is usual; the median is the usual reading (common practice), and said back.
      if (!/^\s+(?:[\p{L}-]+\s+){0,2}/u.test(text.lower.slice(m.span.end, m.span.end + 40))) continue;
      quantile = 0.5;
      saidBack = `"${words}" read as the median`;
    } else if (m[2] !== undefined || m[3] !== undefined) {
      const n = Number(m[2] ?? m[3]);
      if (n >= 1 && n <= 99) quantile = n / 100;
    } else if (m[4] !== undefined) quantile = /upper|top|third/.test(m[4]) ? 0.75 : 0.25;
    if (quantile === undefined) continue;
    out.push({ quantile, span: m.span, words, ...(saidBack ? { saidBack } : {}) });
  }
  return out;
}

/** Each statistic goes to the questions whose words hold it (every question when none does). */
export function applyStatistics(questions: Question[], mentions: readonly StatisticMention[], notes: string[], ds: DatasetConfig): void {
  for (const m of mentions) {
    if (m.saidBack) notes.push(m.saidBack);
    const own = questions.filter((q) => q.text.toLowerCase().includes(m.words.toLowerCase()));
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
