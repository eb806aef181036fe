// Days of the week named as a restriction: "on Fridays", "weekend orders", "rainfall on Mondays",
// "business days", "Mon-Fri", "sat and sun", "excluding weekends", and two day sets set against
// each other ("weekends vs weekdays"). Read after periods and deadlines have claimed their words
// ("last Friday", "by Friday" are dates, not day sets) and after the catalog (a dataset with its
// own day-of-week column keeps its words). A breakdown by day ("by weekday", "which day of the
// week") is not a filter and is left alone. See analysis/day-of-week.ts for the concept.
import { DAY_OF_WEEK, WEEKEND, WORKING_WEEK, dayFilter, daySetWords, isDayFilter } from '../../analysis/day-of-week.js';
import type { Question } from '../brief.js';
import type { RequestText, Span } from './text.js';

export interface DaySetMention {
  days: number[];
  span: Span;
  words: string;
  /** How the words were read, said back when it is an assumption ("midweek read as Tuesdays to Thursdays"). */
  saidBack?: string;
}

export interface DayReading {
  /** Each day set named, in order. */
  mentions: DaySetMention[];
  /** Two day sets set against each other ("weekends vs weekdays"): the two mentions. */
  contrast?: [DaySetMention, DaySetMention];
}

// Full names, with an optional plural; short forms only where the words around make them days.
const FULL = 'monday|tuesday|wednesday|thursday|friday|saturday|sunday';
const SHORT = 'mon|tue|tues|wed|thu|thur|thurs|fri|sat|sun';
const NAME = `(?:${FULL})s?|(?:${SHORT})s?`;
const SET_WORDS = String.raw`week-?ends?|week-?days?|week\s+days|business\s+days?|working\s+days?|work-?days?|work\s+days|mid-?week|weekday-only`;
const ONE = `(?:${SET_WORDS}|${NAME})`;
// A range or a list of days: "Monday to Friday", "mon-fri", "Sat and Sun", "Saturdays/Sundays".
const GROUP = String.raw`(?<![\p{L}\d])(?:${ONE})(?:\s*(?:-|–|to|through|thru|until|till)\s*(?:${NAME})|(?:\s*(?:,|\/|&|\band\b|\bor\b|\bplus\b)\s*(?:${NAME}))+)?(?![\p{L}\d])`;
const AGAINST = String.raw`^\s*(?:vs\.?|versus|v\.?|compared\s+(?:to|with)|against|or|and|than|relative\s+to)\s+(?:on\s+|at\s+|the\s+|during\s+)?`;
const OTHER_DAYS = String.raw`^\s*(?:vs\.?|versus|compared\s+(?:to|with)|against)\s+(?:on\s+)?(?:the\s+)?(?:other|rest\s+of\s+the|remaining)\s+(?:days?|week)(?![\p{L}])`;

/**
 * Words that put a day in the pleasantries (see isDaySet): a person on the day ("you on a Friday"; not
 * "show me a weekend split", which asks for the data's days), a greeting word, or "it is" just before it.
 */
const PLEASANTRY_BEFORE = /(?:\b(?:you|u|me|us|we|i)\s+on\s+(?:(?:a|an|this|the)\s+)?|\b(?:your|my|ur)\s+(?:\w+\s+)?|\b(?:happy|good|great|nice|lovely|wonderful|relaxing|restful|enjoy(?:\s+(?:the|your))?|(?:the\s+)?rest\s+of\s+(?:the|your))\s+|\b(?:it'?s|it\s+is|it\s+being|today\s+is|today'?s)\s+(?:(?:a|the)\s+)?)$/;

function dayOf(word: string): number | undefined {
  const w = word.replace(/s$/, '');
  const order = ['mon', 'tue', 'wed', 'thu', 'fri', 'sat', 'sun'];
  const i = order.indexOf(w.slice(0, 3));
  return i >= 0 ? i + 1 : undefined;
}

function range(a: number, b: number): number[] {
  const out: number[] = [];
  for (let d = a; ; d = (d % 7) + 1) {
    out.push(d);
    if (d === b || out.length > 7) break;
  }
  return out;
}

/** The days one matched group names, and what to say back when the words were read by assumption. */
function daysOf(words: string): { days: number[]; saidBack?: string } | undefined {
  const w = words.toLowerCase();
  if (/^week-?ends?$/.test(w)) return { days: [...WEEKEND] };
  if (/^(?:week-?days?|week\s+days|business\s+days?|working\s+days?|work-?days?|work\s+days|weekday-only)$/.test(w)) return { days: [...WORKING_WEEK] };
  if (/^mid-?week$/.test(w)) return { days: [2, 3, 4], saidBack: `"${words}" read as ${daySetWords([2, 3, 4])}` };
  const parts = w.split(/\s*(?:-|–|\bto\b|\bthrough\b|\bthru\b|\buntil\b|\btill\b)\s*/);
  if (parts.length === 2) {
    const a = dayOf(parts[0]!);
    const b = dayOf(parts[1]!);
    if (a !== undefined && b !== undefined) return { days: range(a, b) };
  }
  const listed = w.split(/\s*(?:,|\/|&|\band\b|\bor\b|\bplus\b)\s*/).filter((x) => x.length > 0);
  const days: number[] = [];
  for (const x of listed) {
    if (/^week-?ends?$/.test(x)) days.push(...WEEKEND);
    else {
      const d = dayOf(x);
      if (d === undefined) return undefined;
      days.push(d);
    }
  }
  return days.length > 0 ? { days: [...new Set(days)].sort((a, b) => a - b) } : undefined;
}

/**
 * Whether the words around a match make it a day set: not a date ("last Friday", "Friday 3
 * March", "by Friday", "3 business days"), not a breakdown ("by weekday", "which weekday"), not a
 * short form that is another word ("sat on", "the sun").
 */
function isDaySet(text: RequestText, span: Span, words: string): boolean {
  const before = text.lower.slice(Math.max(0, span.start - 40), span.start);
  const after = text.lower.slice(span.end, span.end + 30);
  const w = words.toLowerCase();
  // A date or a deadline: "last Friday", "this weekend", "Friday 3 March", "by Friday", "within 3 business days".
  // "from Tuesday to Thursday" is a range of days; "from Friday" alone a date.
  const ranged = /\s(?:to|through|thru)\s|-|–/.test(w);
  if (/(?:\b(?:last|this|next|coming|past|previous|that|same|following|by|before|until|till|due|since)\s+(?:the\s+)?$)|\d\s*$/.test(before) || (!ranged && /\bfrom\s+$/.test(before))) return false;
  if (/^\s*(?:the\s+)?\d/.test(after) || /^\s*(?:of\s+)?(?:the\s+)?(?:\d|jan|feb|mar|apr|may|jun|jul|aug|sep|oct|nov|dec)/.test(after) && !/s$/.test(w)) return false;
  // The writer's own time, not the data's: a greeting ("Happy Monday!", "have a good weekend"), the
  // day it is ("I know it's Friday"), someone's day ("hope your Tuesday is going well"), or the
  // day of the asking ("sorry to bother you on a Friday"): the day follows a person, a greeting
  // word or "it is", never a measure, so it restricts nothing.
  if (PLEASANTRY_BEFORE.test(before)) return false;
  // A breakdown by day of week is no filter.
  if (/\b(?:by|per|each|every\s+single|which|what|across|split\s+by)\s+(?:the\s+)?$/.test(before) && /^(?:week-?days?|days?)$/.test(w)) return false;
  // A single short form stands for a day only after "on" or beside another day ("sat and sun").
  const single = !/[\s,/&–-]/.test(w.trim());
  if (single && new RegExp(`^(?:${SHORT})$`).test(w) && !/\b(?:on|every|each)\s+$/.test(before)) return false;
  return true;
}

export function readDaySets(text: RequestText): DayReading {
  const mentions: DaySetMention[] = [];
  const re = new RegExp(GROUP, 'giu');
  for (const m of text.matches(re)) {
    if (text.isClaimed(m.span)) continue;
    const words = text.quote(m.span);
    if (!isDaySet(text, m.span, words)) continue;
    const read = daysOf(words.replace(/\s+/g, ' '));
    if (!read) continue;
    // "between Tuesday and Thursday": the days from one to the other, as "Tuesday to Thursday".
    const pair = /^(\p{L}+)\s+and\s+(\p{L}+)$/u.exec(words.toLowerCase());
    if (pair && /\bbetween\s+$/.test(text.lower.slice(Math.max(0, m.span.start - 10), m.span.start))) {
      const a = dayOf(pair[1]!);
      const b = dayOf(pair[2]!);
      if (a !== undefined && b !== undefined) read.days = range(a, b);
    }
    mentions.push({ days: read.days, span: m.span, words, ...(read.saidBack ? { saidBack: read.saidBack } : {}) });
  }
  // "excluding weekends", "except Fridays", "not on weekends": every other day.
  for (const m of mentions) {
    const before = text.lower.slice(Math.max(0, m.span.start - 30), m.span.start);
    const cue = /\b(?:excluding|except(?:\s+for)?|other\s+than|not\s+(?:on|during)|without|outside(?:\s+of)?|apart\s+from|but\s+not(?:\s+on)?)\s+(?:the\s+)?(?:on\s+)?$/.exec(before);
    if (!cue) continue;
    m.days = [1, 2, 3, 4, 5, 6, 7].filter((d) => !m.days.includes(d));
    m.span = { start: m.span.start - cue[0].length, end: m.span.end };
    m.words = text.quote(m.span);
  }
  const reading: DayReading = { mentions };
  // Two day sets with "vs" between: set against each other. "Fridays vs other days": the rest.
  for (let i = 0; i + 1 < mentions.length; i++) {
    const a = mentions[i]!;
    const b = mentions[i + 1]!;
    const between = text.lower.slice(a.span.end, b.span.start);
    // "weekends and weekdays" sets two apart as "weekends vs weekdays" does; overlapping sets are not set against each other.
    if (new RegExp(`${AGAINST}$`, 'u').test(between) && a.days.every((d) => !b.days.includes(d))) {
      reading.contrast = [a, b];
      break;
    }
  }
  if (!reading.contrast && mentions.length === 1) {
    const a = mentions[0]!;
    const other = new RegExp(OTHER_DAYS, 'u').exec(text.lower.slice(a.span.end));
    if (other) {
      const rest = [1, 2, 3, 4, 5, 6, 7].filter((d) => !a.days.includes(d));
      const span = { start: a.span.end, end: a.span.end + other[0].length };
      const b: DaySetMention = { days: rest, span, words: text.quote(span) };
      mentions.push(b);
      reading.contrast = [a, b];
    }
  }
  return reading;
}

/**
 * A question that sets two day sets against each other ("weekends vs weekdays") as one question per
 * day set, each with its day filter: a day set is no value of a column, so it goes where every
 * other restriction goes (the filters each statement, title, caption and subtitle read) rather
 * than through the templates that group by a column's values. Other questions are unchanged.
 */
export function daySides(q: Question): Question[] {
  if (q.contrast?.dimension !== DAY_OF_WEEK) return [q];
  const { contrast, ...rest } = q;
  return contrast.values.map((v) => ({ ...rest, filters: [...q.filters.filter((f) => !isDayFilter(f)), dayFilter(v.split(',').map(Number))] }));
}
