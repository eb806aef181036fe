// A season named as a guess to test, not as the period to look at: "I suspect winter is our worst
// season", "my guess is autumn has the strongest wind", "is it true we get the most rain in
// winter?", "is winter the wettest season?". Read as the period, the answer would look at one
// winter alone and could never say whether it is the worst. The season is instead the one to set
// against the others over all the data (the month-of-year pattern, plan.ts trend_seasonality).
// "how was winter?", "rainfall in winter 2014", "this winter" stay the period asked.
import type { PeriodMention } from './periods.js';

/** A guess or a claim put up to be checked, in the words managers use. */
const HYPOTHESIS = /\b(?:i|we)\s+(?:(?:really|kind of|sort of|strongly)\s+)?(?:suspect|think|believe|reckon|guess|bet|feel|assume|expect|suppose|imagine|figure)\b|\bi'?d\s+(?:guess|say|bet)\b|\bmy\s+(?:guess|hunch|feeling|gut feeling|sense|bet|theory|impression|assumption)\b|\b(?:is|was)\s+it\s+(?:true|the case|right|correct)\s+that\b|\bam\s+i\s+right\b|\b(?:confirm|check|test|verify|prove|disprove)\s+(?:that|whether|if|my)\b|\b(?:hunch|hypothesis|presumably|apparently|rumou?r)\b|\b(?:everyone|people)\s+(?:says?|thinks?|believes?)\b/;

/** A bare season, no year and no "this"/"last": a season of every year. */
const BARE_SEASON = /^(?:the\s+)?(winter|spring|summer|autumn|fall)s?$/;

/** A season put up as the candidate for a superlative: "is winter the wettest season", "winter is our worst season", "winter has the most rain". */
function candidateOf(sentence: string, season: string): boolean {
  const s = `(?:${season})s?`;
  const top = `(?:\\w+est|worst|best|most|least|peak|busiest|quietest|slowest|highest|lowest|biggest|smallest)`;
  const between = `(?:(?:the|our|my|always|usually|typically|really|generally|by far|actually)\\s+)*`;
  return new RegExp(`\\b${s}\\s+(?:is|was|are|has|have|gets?|sees?|brings?|tends? to (?:be|have|see))\\s+${between}${top}\\b`).test(sentence) || new RegExp(`\\b(?:is|was|are)\\s+${s}\\s+${between}${top}\\b`).test(sentence);
}

/**
 * A season asked about with a comparative in a present-tense question: "do studios release more
 * films in summer?", "are sales higher in winter?", "is it busier in the summer?". It asks how that
 * season compares with the rest of the year, not what one summer held.
 */
function comparedIn(sentence: string, season: string): boolean {
  const more = '(?:more|less|fewer|higher|lower|busier|quieter|bigger|smaller|larger|better|worse|hotter|colder|warmer|cooler|wetter|drier|longer|shorter|greater|stronger|weaker|slower|faster)';
  return new RegExp(`^\\s*(?:so\\s+|and\\s+|but\\s+)?(?:do|does|is|are)\\b[^?.!]*\\b${more}\\b[^?.!]*\\b(?:in|during|over)\\s+(?:the\\s+)?${season}s?\\b`).test(sentence);
}

export interface TestedSeason {
  mention: PeriodMention;
  season: string;
}

/** The bare seasons put up as a guess in the request (lower-cased text), with the mention that named each. */
export function hypothesisSeasons(lower: string, periods: readonly PeriodMention[]): TestedSeason[] {
  const found: TestedSeason[] = [];
  for (const p of periods) {
    if (p.unit !== 'season' || !p.window || p.compared || p.shift) continue;
    const bare = BARE_SEASON.exec(p.words.toLowerCase().trim());
    if (!bare) continue;
    const season = bare[1] === 'fall' ? 'autumn' : bare[1]!;
    // The sentence the season is in.
    const from = Math.max(lower.lastIndexOf('.', p.start), lower.lastIndexOf('?', p.start), lower.lastIndexOf('!', p.start)) + 1;
    const ends = ['.', '?', '!'].map((c) => lower.indexOf(c, p.end)).filter((i) => i >= 0);
    const sentence = lower.slice(from, ends.length > 0 ? Math.min(...ends) : lower.length);
    if (HYPOTHESIS.test(sentence) || candidateOf(sentence, bare[1]!) || comparedIn(sentence, bare[1]!)) found.push({ mention: p, season });
  }
  return found;
}
