// A superlative beside a time noun ("the hottest day", "the wettest week", "which month had the
// most flights", "the coldest month on record"): the noun is the grain the extreme is looked for
// at, not a count of days, and the superlative says which end is asked for and, for a quality
// ("hottest", "windiest"), which measure (bot/reading/metric-ranking.ts QUALITY_MEASURES).
// "On record", "ever", "of all time" ask over the whole history: no period, and no term of the data.
import type { Metric } from '../../config/schema.js';
import type { Grain, RankOrder } from '../../analysis/types.js';
import { isRowCount, QUALITY_MEASURES, VOLUME_LOW } from './metric-ranking.js';
import type { RequestText, Span } from './text.js';

export interface PeriodExtreme {
  grain: Grain;
  /** The superlative as written ("hottest", "most"). */
  superlative: string;
  /** The words read ("hottest day", "which month … most"), for evidence. */
  words: string;
  /** The superlative and the time noun: neither is a term of the data. */
  spans: Span[];
  /** Where the extreme's sentence lies, to find the clause it belongs to. */
  at: number;
}

const NOUN_GRAIN: Record<string, Grain> = { day: 'day', days: 'day', week: 'week', weeks: 'week', month: 'month', months: 'month', quarter: 'quarter', quarters: 'quarter', year: 'year', years: 'year' };
const TIME_NOUN = '(day|week|month|quarter|year)s?';
// Superlatives that rank without naming a quality; a quality's own superlatives ("hottest", "driest") come from QUALITY_MEASURES.
const PLAIN_SUPERLATIVE = /^(?:busiest|quietest|slowest|highest|lowest|biggest|largest|smallest|best|worst|strongest|weakest|peak)$/;
const PLAIN_LOW = /^(?:quietest|lowest|smallest|weakest|fewest|least)$/;
// After the noun: a change between periods ("biggest week-on-week rise"), or the days of the week.
const NOT_A_GRAIN_AFTER = /^(?:[- ](?:on|over)[- ](?:(?:the|a)[- ])?(?:prior[- ]|previous[- ]|last[- ])?(?:day|week|month|quarter|year|period)|[- ]of[- ](?:the[- ])?week\b|[- ]to[- ]date\b)/;
// The days of the week asked about: "busiest day of the week", "which day is busiest", "weekdays" (a past "which day was" is one day).
const WEEKDAYS_ASKED = /\bdays?[- ]of[- ](?:the[- ])?week\b|\bweekdays?\b|\bwhich\s+days\s+(?:is|are)\b|\bwhich\s+day\s+is\b|\bweekends?\b/;
/** Words that ask over the whole history: the extreme of all the data. */
export const WHOLE_HISTORY = /(?<![\p{L}])(?:on\s+record|of\s+all\s+time|all[- ]time|ever\s+(?:recorded|seen|measured)|ever)(?![\p{L}])/gu;

function isSuperlative(word: string): boolean {
  if (PLAIN_SUPERLATIVE.test(word)) return true;
  return /(?:est)$/.test(word) && QUALITY_MEASURES.some((q) => q.cue.test(word));
}

/** A superlative of a quality or a plain one ("windiest", "busiest") in the words, with its span: what a weekday question ranks by. */
export function superlativeIn(text: RequestText, within: Span): Span | undefined {
  for (const m of text.matches(/(?<![\p{L}])\p{L}+(?![\p{L}])/gu)) {
    if (m.span.start < within.start || m.span.end > within.end) continue;
    if (isSuperlative(m[0])) return m.span;
  }
  return undefined;
}

export function findPeriodExtremes(text: RequestText): PeriodExtreme[] {
  const out: PeriodExtreme[] = [];
  const free = (s: Span) => !text.isClaimed(s);
  // "the hottest day", "the 3 wettest weeks", "the busiest single month".
  for (const m of text.matches(new RegExp(`(?<![\\p{L}])(\\p{L}+|most\\s+\\p{L}+)\\s+(?:(?:single|calendar|full|whole|individual)\\s+)?${TIME_NOUN}(?![\\p{L}])`, 'gu'))) {
    const word = m[1]!;
    const superlative = word.startsWith('most ') ? QUALITY_MEASURES.some((q) => q.cue.test(word.slice(5))) : isSuperlative(word);
    if (!superlative) continue;
    const nounStart = m.index + m[0].lastIndexOf(m[2]!);
    const noun: Span = { start: nounStart, end: m.span.end };
    // "the busiest months" asks when in the year (a season); "the 3 hottest days" asks for extremes.
    const plural = /s$/.test(m[0]);
    if (plural && !/(?:^|\s)(?:\d{1,2}|two|three|four|five|six|seven|eight|nine|ten)\s+$/.test(text.lower.slice(Math.max(0, m.index - 8), m.index))) continue;
    if (!free(noun) || NOT_A_GRAIN_AFTER.test(text.lower.slice(m.span.end, m.span.end + 12))) continue;
    if (WEEKDAYS_ASKED.test(sentenceAround(text.lower, m.index))) continue;
    out.push({ grain: NOUN_GRAIN[m[2]!]!, superlative: word, words: text.quote(m.span), spans: [{ start: m.index, end: m.index + word.length }, noun], at: m.index });
  }
  // "which month had the most flights", "what day saw the highest delay", "the week with the fewest".
  for (const m of text.matches(new RegExp(`(?<![\\p{L}])(?:which|what|the)\\s+(?:(?:single|calendar)\\s+)?(day|week|month|quarter|year)(?![\\p{L}])`, 'gu'))) {
    const nounStart = m.index + m[0].lastIndexOf(m[1]!);
    const noun: Span = { start: nounStart, end: m.span.end };
    if (!free(noun) || out.some((o) => o.spans.some((s) => s.start === noun.start))) continue;
    if (NOT_A_GRAIN_AFTER.test(text.lower.slice(m.span.end, m.span.end + 12)) || /^[- ]of[- ]/.test(text.lower.slice(m.span.end, m.span.end + 5))) continue;
    if (WEEKDAYS_ASKED.test(sentenceAround(text.lower, m.index))) continue;
    const rest = /^[^.?!;]{0,60}/.exec(text.lower.slice(m.span.end))![0];
    // The superlative follows within a few words, by a verb ("had", "was", "saw") or "with".
    const sup = new RegExp(`^\\s+(?:(?:had|has|have|was|is|were|saw|see|sees|got|gets|brought|recorded|with|of|in|for)\\s+)?(?:(?:the|its|our|their)\\s+)?(most|least|fewest|\\p{L}+est|${PLAIN_SUPERLATIVE.source.slice(4, -2)})(?![\\p{L}])`, 'u').exec(rest);
    if (!sup || !(sup[1] === 'most' || sup[1] === 'least' || sup[1] === 'fewest' || isSuperlative(sup[1]!))) continue;
    // "the day with the most": only with a word that ties them ("with"), not any "the month ... most".
    if (m[0].startsWith('the') && !/^\s+(?:with|that\s+(?:had|saw))\b/.test(rest)) continue;
    const supStart = m.span.end + sup.index + sup[0].lastIndexOf(sup[1]!);
    const supSpan: Span = { start: supStart, end: supStart + sup[1]!.length };
    // "most" names no measure: its own span is left to the reader ("the most flights").
    out.push({ grain: NOUN_GRAIN[m[1]!]!, superlative: sup[1]!, words: text.quote({ start: m.index, end: supSpan.end }), spans: sup[1] === 'most' ? [noun] : [supSpan, noun], at: m.index });
  }
  return out;
}

/** The whole-history words ("on record", "ever"): claimed, they name no period and no term. */
export function wholeHistorySpans(text: RequestText): Span[] {
  return [...text.matches(WHOLE_HISTORY)].map((m) => m.span).filter((s) => !text.isClaimed(s));
}

/**
 * The end the superlative asks for, once its measure is known: "coldest" the lowest temperature,
 * "driest" the least rain, "quietest" the fewest rows; "slowest" is the highest delay, or for a
 * count the fewest. "best"/"worst" go by the measure's direction.
 */
export function extremeOrder(superlative: string, metric: Metric | undefined): RankOrder {
  const word = superlative.replace(/^most\s+/, '');
  if (word === 'best' || word === 'worst') return word;
  if (metric && isRowCount(metric)) return VOLUME_LOW.test(word) || PLAIN_LOW.test(word) ? 'lowest' : 'highest';
  const quality = QUALITY_MEASURES.find((q) => q.cue.test(word));
  if (quality) return quality.low?.test(word) ? 'lowest' : 'highest';
  return PLAIN_LOW.test(word) ? 'lowest' : 'highest';
}

function sentenceAround(lower: string, at: number): string {
  const start = Math.max(lower.lastIndexOf('.', at), lower.lastIndexOf('?', at), lower.lastIndexOf('!', at), lower.lastIndexOf('\n', at)) + 1;
  const ends = ['.', '?', '!', '\n'].map((c) => lower.indexOf(c, at)).filter((i) => i >= 0);
  return lower.slice(start, ends.length > 0 ? Math.min(...ends) : lower.length);
}
