// The small grammar every caption, title and note uses, in one place: plurals, counts with
// their noun, possessives, lists, and labels inside a sentence. English only, as the captions are.
import { formatPeriod, formatValue } from '../format.js';
import type { Grain } from '../types.js';

/**
 * A sentence's first letter in upper case: "revenue rose" → "Revenue rose". A first word with a
 * capital inside it ("pH", "iPhone", "eBay") is a name and keeps its case even here.
 */
export function capitalise(text: string): string {
  if (text.length === 0 || /^\p{Ll}+\p{Lu}/u.test(text)) return text;
  return text[0]!.toUpperCase() + text.slice(1);
}

/**
 * A label's word mid-sentence: an ordinary capitalised word ("Gross", "Genre", "Net") goes lower
 * case; an acronym, a single capital or a mixed token ("US", "IMDB", "CO2", "A", "pH", "iPhone",
 * "SkerryPass") is a name or an abbreviation and keeps its case.
 */
function wordInSentence(word: string): string {
  return /^\p{Lu}\p{Ll}+(?:['’]\p{Ll}+)?$/u.test(word) ? word.toLowerCase() : word;
}

/**
 * A label as it reads inside a sentence, the one rule every caption, title, summary and card uses:
 * "Worldwide Gross" → "worldwide gross", "Major Genre" → "major genre", "US Gross" → "US gross",
 * "IMDB Rating" → "IMDB rating", "SkerryPass holders" as it is. At a sentence's start, capitalise
 * it: `capitalise(inSentence(label))` → "Worldwide gross", "IMDB rating".
 */
export function inSentence(label: string): string {
  return label.replace(/[\p{L}\p{N}'’]+/gu, wordInSentence);
}

/** The same label starting a sentence or a title: "Worldwide Gross" → "Worldwide gross", "IMDB Rating" → "IMDB rating". */
export function labelAtStart(label: string): string {
  return capitalise(inSentence(label));
}

// Nouns whose plural is the same word ("species", "aircraft"), and ones already plural.
const SAME_PLURAL = /(?:^|\s)(?:species|series|aircraft|sheep|deer|fish|data|news|means|staff|equipment|information|people|children)$/i;

/**
 * A plain English plural: "route" → "routes", "fare class" → "fare classes", "category" →
 * "categories", "phase of flight" → "phases of flight", "species" → "species".
 */
export function pluralNoun(noun: string): string {
  const of = /^(.+?)(\s+(?:of|per|in|for|by)\s+.+)$/i.exec(noun);
  if (of) return `${pluralNoun(of[1]!)}${of[2]}`;
  if (SAME_PLURAL.test(noun)) return noun;
  if (/(s|x|z|ch|sh)$/i.test(noun)) return `${noun}es`;
  if (/[^aeiou]y$/i.test(noun)) return `${noun.slice(0, -1)}ies`;
  return `${noun}s`;
}

/** The noun for n of it: 1 → "route", 2 → "routes". `plural` overrides the regular form. */
export function nounFor(n: number, noun: string, plural?: string): string {
  return Math.abs(n) === 1 ? noun : (plural ?? pluralNoun(noun));
}

/** A count with its noun: "1 route", "1,204 bookings". */
export function countOf(n: number, noun: string, locale = 'en', plural?: string): string {
  return `${formatValue(n, { unit: 'count', locale })} ${nounFor(n, noun, plural)}`;
}

// Past participles that may follow a label's head noun: "Films released", "Tickets sold".
const PARTICIPLE = /^(?:\p{L}+ed|sold|made|paid|held|kept|lost|won|seen|given|taken|sent|built|bought|flown|run|done|left)$/iu;

/** The index of a label's head noun among its words: the last before any "per …" and any trailing participle. */
function headIndex(words: readonly string[]): number {
  const per = words.findIndex((w, i) => i > 0 && /^per$/i.test(w));
  let i = (per === -1 ? words.length : per) - 1;
  while (i > 0 && PARTICIPLE.test(words[i]!)) i--;
  return Math.max(i, 0);
}

/**
 * Whether a metric's label reads as plural by its head noun (before any "per …" or participle):
 * "Bookings", "Weekday visits per site", "Films released" are; "Revenue", "Average fare per booking" are not.
 */
export function isPluralLabel(label: string): boolean {
  const words = label.trim().split(/\s+/);
  const head = words[headIndex(words)] ?? '';
  return /[^s]s$/i.test(head) && !/us$/i.test(head);
}

/** One of a plural label's things: "films released" → "film released", "fare classes" → "fare class"; a singular label as it is. */
export function singularNoun(label: string): string {
  if (!isPluralLabel(label) || SAME_PLURAL.test(label)) return label;
  const words = label.split(' ');
  const i = headIndex(words);
  const w = words[i]!;
  words[i] = /[^aeiou]ies$/i.test(w) ? `${w.slice(0, -3)}y` : /(?:ss|x|z|ch|sh)es$/i.test(w) ? w.slice(0, -2) : w.slice(0, -1);
  return words.join(' ');
}

/** "is" or "are" for n things. */
export function isAre(n: number): string {
  return Math.abs(n) === 1 ? 'is' : 'are';
}

/**
 * The verb agreeing with a metric label, by its head noun (before any "per …"): "Revenue is",
 * "Bookings are", "Weekday visits per site per day are"; `was` gives "was" or "were".
 */
export function verbFor(label: string, verb: 'is' | 'was' = 'is'): string {
  const plural = isPluralLabel(label);
  return verb === 'is' ? (plural ? 'are' : 'is') : plural ? 'were' : 'was';
}

/** "a route", "an origin airport", "an hour", "a unit": the indefinite article by the word's sound (common English rules, with the usual exceptions). */
export function withArticle(phrase: string): string {
  const w = phrase.trim().toLowerCase();
  const an = /^(?:hour|honest|honou?r|heir)/.test(w) || (/^[aeiou]/.test(w) && !/^(?:uni(?!n)|use|usu|uti|eu|one\b|once\b|ure)/.test(w));
  return `${an ? 'an' : 'a'} ${phrase}`;
}

/** "Route A's", but "Bookings'" (a name ending in s takes the apostrophe alone). */
export function possessive(name: string): string {
  return /s$/i.test(name) ? `${name}'` : `${name}'s`;
}

/** A caption's first sentence, for a summary line: a full stop followed by a space ends it (never a decimal point). */
export function firstSentence(text: string): string {
  const end = /\.\s/.exec(text);
  return end ? text.slice(0, end.index + 1) : text;
}

/** A period with the preposition it takes: "on 25 February 2001", "in the week commencing 5 March 2001", "in March 2001". */
export function inPeriod(iso: string, grain: Grain, locale: string): string {
  return `${grain === 'day' ? 'on' : grain === 'week' ? 'in the' : 'in'} ${formatPeriod(iso, grain, locale, 'long')}`;
}

/** A sentence's first clause, up to a semicolon outside brackets: a headline, not a paragraph. */
export function firstClause(text: string): string {
  let depth = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!;
    if (c === '(') depth++;
    else if (c === ')') depth = Math.max(0, depth - 1);
    else if (c === ';' && depth === 0) return text.slice(0, i);
  }
  return text;
}

/** "a", "a and b", "a, b and c". */
export function listJoin(items: readonly string[], conjunction = 'and'): string {
  if (items.length <= 1) return items[0] ?? '';
  return `${items.slice(0, -1).join(', ')} ${conjunction} ${items[items.length - 1]}`;
}
