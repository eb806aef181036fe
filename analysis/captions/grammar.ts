// The small grammar every caption, title and note uses, in one place: plurals, counts with
// their noun, possessives, lists, and labels inside a sentence. English only, as the captions are.
import { formatValue } from '../format.js';

/** Upper-cases the first letter. */
export function capitalise(text: string): string {
  return text.length === 0 ? text : text[0]!.toUpperCase() + text.slice(1);
}

/** A label in mid-sentence: "Revenue" → "revenue", but "SkerryPass holders" or "KPI" keep their capitals. */
export function inSentence(label: string): string {
  const firstWord = label.split(' ')[0] ?? '';
  if (label.length === 0 || /[A-Z]/.test(firstWord.slice(1))) return label;
  return label[0]!.toLowerCase() + label.slice(1);
}

/** A plain English plural: "route" → "routes", "fare class" → "fare classes", "category" → "categories". */
export function pluralNoun(noun: string): string {
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

/**
 * Whether a metric's label reads as plural by its head noun (before any "per …"): "Bookings",
 * "Weekday visits per site" are; "Revenue", "Average fare per booking" are not.
 */
export function isPluralLabel(label: string): boolean {
  const head = label.trim().replace(/\s+per\s.*$/i, '').split(/\s+/).pop() ?? '';
  return /[^s]s$/i.test(head);
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

/** "Route A's", but "Bookings'" (a name ending in s takes the apostrophe alone). */
export function possessive(name: string): string {
  return /s$/i.test(name) ? `${name}'` : `${name}'s`;
}

/** A caption's first sentence, for a summary line: a full stop followed by a space ends it (never a decimal point). */
export function firstSentence(text: string): string {
  const end = /\.\s/.exec(text);
  return end ? text.slice(0, end.index + 1) : text;
}

/** "a", "a and b", "a, b and c". */
export function listJoin(items: readonly string[], conjunction = 'and'): string {
  if (items.length <= 1) return items[0] ?? '';
  return `${items.slice(0, -1).join(', ')} ${conjunction} ${items[items.length - 1]}`;
}
