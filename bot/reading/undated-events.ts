// Events named as a time ("in the recession", "during the strike", "since the merger", "after the
// outage"): the data holds no dates for them, so the reader cannot turn one into a window. Each is
// found here so it is never dropped silently (nor taken for a value the data lacks): with no other
// period named it is asked about (bot/prompts.ts windowPrompt, which takes dates in reply); beside
// a period that was named, the card says the event was not dated and which period runs instead.
// Events the config dates (its `events`, "the storm week") are periods (periods.ts), found first.
import type { RequestText, Span } from './text.js';

/**
 * Nouns of business and public events that last a while, as managers name them. Our own list; a
 * noun the config's catalog holds (a "campaign" breakdown) is claimed first and never read here.
 */
const EVENT_NOUNS = [
  'recession', 'downturn', 'crisis', 'crash', 'slump', 'boom', 'bubble', 'depression',
  'strike', 'strikes', 'walkout', 'lockout', 'outage', 'outages', 'blackout', 'downtime', 'incident',
  'promo', 'promotion', 'campaign', 'sale', 'giveaway', 'pandemic', 'epidemic', 'lockdown', 'lockdowns', 'covid',
  'merger', 'acquisition', 'takeover', 'rebrand', 'rebranding', 'relaunch', 'redesign', 'migration', 'reorg',
  'restructuring', 'shutdown', 'recall', 'boycott', 'heatwave', 'heat wave', 'cold snap', 'drought', 'flood', 'floods',
  'war', 'election', 'shortage', 'price hike', 'price rise', 'price increase', 'price cut', 'hiring freeze', 'freeze',
  'rollout', 'roll-out', 'pilot', 'trial period', 'disruption', 'roadworks', 'renovation', 'refurb', 'refurbishment',
];

/** Words that make the event a time: "in the recession", "before the promo", "vs the strike". */
const TIME_WORDS = `(?:in|during|through|throughout|over|before|after|since|around|amid|across|until|till|vs\\.?|versus|against|than|compared\\s+(?:to|with)|pre|post)`;
const NOUN = `(?:${EVENT_NOUNS.map((n) => n.replace(/[-\s]/g, '[-\\s]')).join('|')})`;
const OWNER = `(?:the|our|their|that|this|last|recent|a)`;
/** Up to two words naming which one ("the 2008 recession", "the spring promo", "the big Black Friday sale"). */
const EVENT = new RegExp(`(?<![\\p{L}\\p{N}])${TIME_WORDS}[-\\s]+(${OWNER}\\s+(?:[\\p{L}\\p{N}'’-]+\\s+){0,2}?${NOUN})(?![\\p{L}\\p{N}])`, 'gu');

export interface UndatedEvent extends Span {
  /** As written, from the article on ("the recession", "the spring promo"). */
  words: string;
  /** Set after a comparison word ("vs the strike"): the event is the base, not the window. */
  compared: boolean;
}

/** The events named as a time in the text's unclaimed words. */
export function findUndatedEvents(text: RequestText): UndatedEvent[] {
  const found: UndatedEvent[] = [];
  for (const m of text.matches(EVENT)) {
    const start = m.index + m[0].length - m[1]!.length;
    const span = { start, end: m.index + m[0].length };
    if (text.isClaimed(span)) continue;
    const lead = m[0].slice(0, m[0].length - m[1]!.length).trim();
    found.push({ ...span, words: text.quote(span).replace(/^(?:our|their|that|this|last|recent|a)\s+/i, 'the '), compared: /^(?:vs|versus|against|than|compared)/.test(lead) });
  }
  return found;
}
