// The verdict: the one sentence that answers the question the requester asked, said first in the
// summary and as the digest's title. A presenter whose finding settles a comparison with a year
// earlier states it as a Verdict; this module words it against the request: "Yes: …" or "No: …"
// when the request asks whether something went one way, the plain statement otherwise.
import { capitalise } from './grammar.js';

/** Which way a metric moved against the comparison it was judged on. */
export type VerdictDirection = 'up' | 'down' | 'level';

export interface Verdict {
  direction: VerdictDirection;
  /** The metric's own direction (catalog metricDirection): whether "better" means up, down, or cannot be said (null). */
  higherIsBetter: boolean | null;
  /** The finding as a clause, lower-case first: "revenue is 2.5% below last year so far (January to 18 June)". */
  statement: string;
  /** What the verdict settles: a comparison of two spans (the default) or the trend over the whole span (a trend test). */
  about?: 'change' | 'trend';
}

// A question that can be answered yes or no starts with an auxiliary verb.
const POLAR = /^(?:so\s+|and\s+|but\s+)?(?:is|are|was|were|did|do|does|has|have|had|will|would|can|could|are we|is our)\b/i;
const UP = /\b(?:up|higher|above|more|grow\w*|grew|grown|ris(?:e|es|ing|en)|rose|increas\w*|gain\w*)\b/i;
const DOWN = /\b(?:down|lower|below|less|fewer|fall\w*|fell|drop\w*|declin\w*|shr[iu]nk\w*)\b/i;
// Words of judgement: which way they point depends on the metric (fewer delays are better).
const BETTER = /\b(?:better|improv\w*|beat\w*|ahead|outperform\w*)\b/i;
const WORSE = /\b(?:worse|worsen\w*|behind|los(?:e|ing|t)|deteriorat\w*)\b/i;

/** What a yes-or-no question asks: a way for the figure to move, or a judgement the metric's direction settles. */
export type AskedWay = 'up' | 'down' | 'better' | 'worse';

/**
 * What a yes-or-no question asks about ("Is revenue up on last year?" → up; "Was March better
 * for average delay?" → better), or null when no sentence of the request is such a question, or
 * it asks both ways ("up or down?"). A plain direction word wins over a judgement word.
 */
export function askedDirection(request: string): AskedWay | null {
  for (const sentence of request.split(/(?<=[?.!])\s+|\n+/)) {
    const s = sentence.trim();
    if (!POLAR.test(s)) continue;
    const up = UP.test(s);
    const down = DOWN.test(s);
    if (up !== down) return up ? 'up' : 'down';
    if (up && down) return null;
    const better = BETTER.test(s);
    const worse = WORSE.test(s);
    if (better !== worse) return better ? 'better' : 'worse';
    return null;
  }
  return null;
}

/**
 * The verdict as the first line: "No: revenue is 2.5% below last year so far (January to 18 June)."
 * "Better" is answered through the metric's direction; a metric with none gets the plain statement
 * and a word on why there is no yes or no.
 */
export function verdictLine(request: string, verdict: Verdict): string {
  const asked = askedDirection(request);
  const sentence = `${verdict.statement.replace(/[.\s]+$/, '')}.`;
  if (asked === null) return capitalise(sentence);
  if (asked === 'better' || asked === 'worse') {
    if (verdict.higherIsBetter === null) return `${capitalise(sentence)} Whether that is better or worse is not set for this measure.`;
    const up = (asked === 'better') === verdict.higherIsBetter;
    return `${(up ? 'up' : 'down') === verdict.direction ? 'Yes' : 'No'}: ${sentence}`;
  }
  return `${asked === verdict.direction ? 'Yes' : 'No'}: ${sentence}`;
}

// A request that names a comparison with a year earlier wants that verdict first, asked as a question or not.
const YEAR_EARLIER = /\b(?:last year|(?:the )?(?:previous|prior) year|year before|a year (?:earlier|ago)|year[- ]on[- ]year|year[- ]over[- ]year|yoy|so far)\b/i;

/** The request asks whether something went one way, or names a comparison with a year earlier. */
export function wantsVerdict(request: string): boolean {
  return askedDirection(request) !== null || YEAR_EARLIER.test(request);
}

// A question about the trend ("Is generation trending up?", "is the rise significant?") is settled
// by the trend test over the whole span, not by one year's change.
const TREND = /\b(?:trend\w*|over time|steadily|long[- ]term|long[- ]run|significan\w*|by chance)\b/i;

/** The request asks about a trend over the whole span rather than a change between two spans. */
export function asksAboutTrend(request: string): boolean {
  return TREND.test(request);
}

/** The verdict the summary leads with: a trend question's from the trend test where one settles it, else the first comparison's in plan order. */
export function verdictFor<T extends { position: number; verdict?: Verdict }>(request: string, takeaways: readonly T[]): T | undefined {
  const ordered = [...takeaways].sort((a, b) => a.position - b.position).filter((t) => t.verdict);
  const trend = ordered.find((t) => t.verdict!.about === 'trend');
  if (trend && asksAboutTrend(request)) return trend;
  return ordered.find((t) => t.verdict!.about !== 'trend');
}
