// Reads a follow-up that asks for a finished thread to be rerun on a schedule ("every Monday at
// 9", "each weekday at 8am", "monthly on the 1st"), to stop it ("stop the schedule"), or when it
// runs ("when does it run?"). Weekday and ordinal words come from the one vocabulary (lexicon.ts).
// A recurrence inside a data question ("daily revenue", "bookings every Monday") is not a
// schedule: besides the recurrence and a time, the message may hold only filler words unless it
// also says to rerun, send or repeat.
import { capitalise, listJoin } from '../../analysis/captions/grammar.js';
import { ordinal as ordinalWord } from '../../analysis/captions/kpi-words.js';
import { ORDINAL_PATTERN, ordinalNumber, WEEKDAY_PATTERN, WEEKDAYS, weekdayNumber } from './lexicon.js';

/** A recurrence as read: a five-field cron expression (minute hour day-of-month month day-of-week) and its words. */
export interface ScheduleRead {
  cron: string;
  /** How the bot says it back: "every Monday at 09:00". */
  words: string;
  /** What was not said and was filled in ("no time was given: 09:00"). */
  assumed: string[];
}

export type ScheduleRequest = { kind: 'set'; schedule: ScheduleRead } | { kind: 'stop' } | { kind: 'ask' };

/** The time used when a schedule names none (the start of a working day; common practice). */
const DEFAULT_TIME = { hour: 9, minute: 0 };

const B = '(?<![\\p{L}\\d])';
const E = '(?![\\p{L}\\d])';
const re = (s: string) => new RegExp(s, 'iu');

const STOP = re(
  `${B}(?:stop|cancel|end|turn\\s+off|switch\\s+off|pause|disable|unschedule)${E}[^.?!]{0,40}?${B}(?:(?:weekly|daily|monthly|scheduled|regular|recurring)\\s+)?(?:schedule|schedules|re-?runs?|repeats?|updates?)${E}|^\\s*unschedule${E}|${B}no\\s+more\\s+(?:re-?runs|updates|scheduled)${E}`,
);
const ASK = re(
  `^\\s*(?:when|what\\s+time)\\s+(?:does|will|is|do)\\s+(?:it|this|the\\s+(?:schedule|re-?run|report|update))\\s+(?:run|re-?run|due|scheduled|happen|go|post)${E}|${B}when(?:'s|\\s+is)\\s+the\\s+next\\s+(?:run|re-?run|update)${E}|${B}what(?:'s|\\s+is)\\s+the\\s+schedule${E}|^\\s*is\\s+(?:this|it)\\s+scheduled${E}`,
);
const RERUN_VERB = re(`${B}(?:re-?run|run|repeat|refresh|redo|send|post|update|schedule)${E}`);

// Recurrences, longest first. Each sets the day fields of the cron expression.
const DAY_LIST = `(?:${WEEKDAY_PATTERN})s?(?:\\s*(?:,|and|&)\\s*(?:${WEEKDAY_PATTERN})s?)*`;
const DAY_OF_MONTH = `(?:(\\d{1,2})(?:st|nd|rd|th)?|(${ORDINAL_PATTERN}))`;
const RECURRENCES: { pattern: RegExp; read: (m: RegExpExecArray) => Days }[] = [
  { pattern: re(`${B}(?:every|each)\\s+(?:week\\s*day|working\\s+day|business\\s+day)s?${E}|${B}(?:on\\s+)?weekdays${E}`), read: () => ({ dow: '1-5', words: 'every weekday (Monday to Friday)' }) },
  { pattern: re(`${B}(?:every|each)\\s+morning${E}`), read: () => ({ dow: '*', words: 'every day' }) },
  { pattern: re(`${B}(?:every|each)\\s+day${E}|${B}daily${E}`), read: () => ({ dow: '*', words: 'every day', bare: true }) },
  { pattern: re(`${B}(?:(?:every|each)\\s+week|weekly)\\s+on\\s+(${DAY_LIST})${E}|${B}(?:every|each|on)\\s+(${DAY_LIST})${E}`), read: (m) => weekdays(m[1] ?? m[2]!) },
  { pattern: re(`${B}(?:every|each)\\s+week${E}|${B}weekly${E}`), read: () => ({ dow: '1', words: 'every Monday', assumed: 'no day was given: Monday', bare: true }) },
  {
    pattern: re(`${B}(?:(?:every|each)\\s+month|monthly)\\s+on\\s+the\\s+${DAY_OF_MONTH}${E}|${B}(?:on\\s+)?the\\s+${DAY_OF_MONTH}\\s+of\\s+(?:every|each|the)\\s+month${E}`),
    read: (m) => monthDay(m[1] ?? m[3], m[2] ?? m[4]),
  },
  { pattern: re(`${B}(?:every|each)\\s+month${E}|${B}monthly${E}`), read: () => ({ dom: '1', words: 'on the 1st of every month', assumed: 'no day was given: the 1st', bare: true }) },
];

interface Days {
  dow?: string;
  dom?: string;
  words: string;
  assumed?: string;
  /** Only "daily", "weekly", "monthly" (or "every day/week/month"): without a time, that is a grain, not a schedule. */
  bare?: boolean;
  /** Why the phrase cannot be a schedule (a day of the month that does not exist). */
  problem?: string;
}

const TIME = re(`${B}(?:at\\s+)?(?:(noon|midday|midnight)|(\\d{1,2})(?:[:.](\\d{2}))?\\s*(am|pm|a\\.m\\.|p\\.m\\.)?(?:\\s*o'?clock)?)${E}`);

// Words that may sit around a schedule without making the message a data question.
const FILLER = new Set(
  'please can could would you will i we me us it this that the thread request report analysis same again also and then with fresh new data latest numbers figures up set start make keep going have do at on in from now onwards on ok okay thanks thank just utc time zone a an'.split(' '),
);

/** The schedule a message asks for, to stop or to tell; undefined when it asks none of these. */
export function readSchedule(text: string): ScheduleRequest | undefined {
  if (STOP.test(text)) return { kind: 'stop' };
  if (ASK.test(text)) return { kind: 'ask' };
  const set = readRecurrence(text);
  return set ? { kind: 'set', schedule: set } : undefined;
}

function readRecurrence(text: string): ScheduleRead | undefined {
  for (const { pattern, read } of RECURRENCES) {
    const m = pattern.exec(text);
    if (!m) continue;
    const days = read(m);
    let rest = text.slice(0, m.index) + ' ' + text.slice(m.index + m[0].length);
    const t = TIME.exec(rest.replace(/\b\d{4}\b/g, ' '));
    const time = t ? timeOf(t) : undefined;
    if (t && time) rest = rest.replace(t[0], ' ');
    const hasVerb = RERUN_VERB.test(rest);
    const leftover = rest
      .toLowerCase()
      .replace(RERUN_VERB, ' ')
      .split(/[^\p{L}\d']+/u)
      .filter((w) => w !== '' && !FILLER.has(w));
    // A recurrence with other words and no verb asking for a rerun is part of a data question.
    if (leftover.length > 0 && !hasVerb) return undefined;
    if (t && !time) return undefined;
    // "weekly" without a time ("rerun it weekly") asks for a weekly grain (README); with one it is a schedule.
    if (days.bare && !time) return undefined;
    if (days.problem) return undefined;
    const at = time ?? DEFAULT_TIME;
    const assumed = [...(days.assumed ? [days.assumed] : []), ...(time ? [] : [`no time was given: ${clock(at)}`])];
    return { cron: `${at.minute} ${at.hour} ${days.dom ?? '*'} * ${days.dow ?? '*'}`, words: `${days.words} at ${clock(at)}`, assumed };
  }
  return undefined;
}

function weekdays(list: string): Days {
  const days = [...list.matchAll(new RegExp(`${B}(${WEEKDAY_PATTERN})s?${E}`, 'giu'))].map((d) => weekdayNumber(d[1]!)!);
  const unique = [...new Set(days)].sort((a, b) => a - b);
  const words = `every ${listJoin(unique.map((d) => capitalise(WEEKDAYS[d - 1]!)))}`;
  // Cron counts Sunday as 0; the lexicon, as ISO does, as 7.
  return { dow: unique.map((d) => d % 7).join(','), words };
}

function monthDay(digits: string | undefined, ordinal: string | undefined): Days {
  const day = digits !== undefined ? Number(digits) : ordinalNumber(ordinal!)!;
  if (day < 1 || day > 31) return { words: '', problem: `there is no day ${day} in a month` };
  // Not every month has a 29th to 31st: those run on the month's last day instead.
  if (day > 28) return { dom: 'L', words: 'on the last day of every month', assumed: `not every month has a ${ordinalWord(day)}: the last day of the month` };
  return { dom: String(day), words: `on the ${ordinalWord(day)} of every month` };
}

function timeOf(m: RegExpExecArray): { hour: number; minute: number } | undefined {
  const [, named, h, min, half] = m;
  if (named) return named.toLowerCase() === 'midnight' ? { hour: 0, minute: 0 } : { hour: 12, minute: 0 };
  let hour = Number(h);
  const minute = min !== undefined ? Number(min) : 0;
  if (minute > 59) return undefined;
  if (half) {
    if (hour < 1 || hour > 12) return undefined;
    const pm = half.toLowerCase().startsWith('p');
    hour = (hour % 12) + (pm ? 12 : 0);
  } else if (hour > 23) return undefined;
  return { hour, minute };
}

/** "09:00". */
export function clock(t: { hour: number; minute: number }): string {
  return `${String(t.hour).padStart(2, '0')}:${String(t.minute).padStart(2, '0')}`;
}
