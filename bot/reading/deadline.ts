// When the requester needs the answer: "by Friday", "before the 15th", "the board meets on
// Thursday", "asap", "end of the month". Counted from the real today, never from the data's
// anchor. A deadline is never in the past, and a phrase naming a period of the data ("for last
// week", "for the last 3 months") is never a deadline.
import { addDays } from '../../analysis/periods.js';
import { daysInMonth, isValidDate, ymd } from './calendar.js';
import { MONTH_PATTERN, monthNumber, NUMBER_WORD_PATTERN, numberFromWord, WEEKDAY_PATTERN, weekdayNumber } from './lexicon.js';
import type { RequestText, Span } from './text.js';

export interface DeadlineMention extends Span {
  /** ISO date, or null when the words name a date already past. */
  date: string | null;
  words: string;
  /** The date named when it is in the past (not taken; the reply says so). */
  past?: string;
  /** "as soon as possible": today, by choice (no warning that it is close follows). */
  asap?: true;
}

const B = `(?<![\\p{L}\\p{N}])`;
/** The words for "as soon as possible": a deadline of today that the requester chose as urgent. */
const ASAP = `(?:asap|a\\.s\\.a\\.p\\.?|as\\s+soon\\s+as\\s+(?:possible|you\\s+can|poss)|urgently|(?:it'?s|is|this\\s+is|bit|quite|very|fairly|pretty|rather)\\s+urgent|urgent(?=\\s*(?:[!.,;:]|$|please|request|ask|one|pls))|right\\s+away|immediately|straight\\s+away)`;
const E = `(?![\\p{L}\\p{N}])`;

const CUE = `(?:by|before|due(?:\\s+(?:by|on))?|until|till|no\\s+later\\s+than|in\\s+time\\s+for|ahead\\s+of|for|need(?:ed)?\\s+(?:it|this|these|them|that|the\\s+\\w+)?\\s*(?:by|for|on)?|deadline(?:\\s+is)?:?|latest)`;
const MEETING = `(?:review|meeting|board|call|session|presentation|offsite|off-site|sync|catch-?up|standup|stand-up|huddle|deadline|committee|update|readout|deck|report|briefing|brief|pack|all-hands|town\\s+hall|debrief|retro|workshop|1:1|one-to-one|check-in)`;
const DAY_OF_MONTH = `(?:the\\s+)?(\\d{1,2})(?:st|nd|rd|th)(?![\\p{L}])`;
const DAY_MONTH = `(\\d{1,2})(?![\\p{N}])(?:st|nd|rd|th)?(?:\\s+of)?\\s+(${MONTH_PATTERN})\\.?(?:,?\\s+((?:19|20)\\d{2}))?`;
// A month before a four-digit year ("for January 2010") is a period of the data, not the 20th:
// the day's digits end the number.
const MONTH_DAY = `(${MONTH_PATTERN})\\.?\\s+(\\d{1,2})(?![\\p{N}])(?:st|nd|rd|th)?(?:,?\\s+((?:19|20)\\d{2}))?`;
const ISO = `((?:19|20)\\d{2})-(\\d{2})-(\\d{2})`;
const NUMERIC = `(\\d{1,2})/(\\d{1,2})(?:/(\\d{4}|\\d{2}))?(?![\\p{N}/])`;
const WEEKDAY = `(?:(this|next|coming|the\\s+coming)\\s+)?(${WEEKDAY_PATTERN})(?:'s)?(?![\\p{L}])`;
const END_OF = `(?:the\\s+)?end\\s+of\\s+(?:the\\s+|this\\s+|next\\s+)?(day|week|month|quarter|year)|eod|cob|close\\s+of\\s+(?:business|play)|eow|eom|eoq|eoy`;
const IN_N = `(?:in|within)\\s+(?:the\\s+next\\s+)?(\\d{1,2}|${NUMBER_WORD_PATTERN}|a|an)\\s+(days?|weeks?|business\\s+days?|working\\s+days?)`;

const re = (s: string) => new RegExp(s, 'gu');

export function findDeadlines(text: RequestText, today: string, dayFirst = true): DeadlineMention[] {
  const found: DeadlineMention[] = [];
  const add = (span: Span, date: string | null, past?: string, asap?: true) => {
    if (found.some((f) => f.start < span.end && span.start < f.end)) return;
    found.push({ ...span, date, words: text.quote(span), ...(past ? { past } : {}), ...(asap ? { asap } : {}) });
  };
  const dateOrPast = (span: Span, iso: string | null) => {
    if (!iso) return;
    if (iso < today) add(span, null, iso);
    else add(span, iso);
  };

  // As soon as possible.
  // "end of day tomorrow", "tomorrow EOD", "by tomorrow": tomorrow.
  for (const m of text.matches(re(`${B}(?:(?:by\\s+)?(?:eod|cob|end\\s+of\\s+(?:the\\s+)?day|close\\s+of\\s+(?:business|play)|first\\s+thing|lunchtime|noon)\\s+tomorrow|tomorrow\\s+(?:eod|cob|morning|afternoon|first\\s+thing|at\\s+the\\s+latest))${E}`))) {
    add(m.span, addDays(today, 1));
  }
  for (const m of text.matches(re(`${B}${ASAP}${E}`))) add(m.span, today, undefined, true);
  for (const m of text.matches(re(`${B}(?:by\\s+today|today\\s+(?:please|if\\s+(?:possible|you\\s+can)|really|ideally|at\\s+the\\s+latest)|so\\s+today|(?:need(?:ed)?|want(?:ed)?)\\s+(?:it|this|these|them|that)?\\s*(?:for\\s+)?today|(?:by\\s+)?(?:eod|cob|end\\s+of\\s+(?:the\\s+)?day|close\\s+of\\s+(?:business|play))(?:\\s+today)?|today'?s\\s+(?:\\w+\\s+){0,2}${MEETING})${E}`))) {
    add(m.span, today);
  }
  // "by Friday", "before the 15th", "for Thursday's board", "due 15 Dec", "deadline: 2026-12-15"
  const cued = `${B}(?:${CUE})\\s+(?:(?:our|the|my|next|this)\\s+\\w+\\s+(?:on|is)\\s+)?(?:${WEEKDAY}|${DAY_OF_MONTH}|${DAY_MONTH}|${MONTH_DAY}|${ISO}|${NUMERIC}|tomorrow|(${END_OF})|${IN_N})`;
  for (const m of text.matches(re(cued))) {
    const iso = dateOf(m, 1, today, dayFirst);
    // A past date after "for", "before" or "until" names a period of the data, not a deadline.
    if (iso && iso < today && !/^(?:by|due|deadline|need)/.test(m[0].toLowerCase())) continue;
    dateOrPast(m.span, iso);
  }
  // "review is on the 15th", "the board meets on Thursday", "meeting on 15 Dec"
  const meeting = `${B}${MEETING}s?\\s+(?:is|are|will\\s+be|meets?|happens|takes\\s+place|closes|opens|starts|runs|goes\\s+out|is\\s+due)?\\s*(?:on|this|next|at|by)?\\s*(?:the\\s+)?(?:${WEEKDAY}|${DAY_OF_MONTH}|${DAY_MONTH}|${MONTH_DAY}|${ISO}|${NUMERIC}|tomorrow)${E}`;
  for (const m of text.matches(re(meeting))) {
    const iso = dateOf(m, 1, today, dayFirst);
    if (iso && iso >= today) add(m.span, iso);
  }
  // "Thursday's board meeting", "tomorrow's review"
  for (const m of text.matches(re(`${B}(?:(this|next)\\s+)?(${WEEKDAY_PATTERN}|tomorrow)(?:'?s)?\\s+(?:[\\p{L}']+\\s+){0,2}${MEETING}${E}`))) {
    dateOrPast(m.span, m[2] === 'tomorrow' ? addDays(today, 1) : weekdayDate(m[2]!, m[1], today));
  }
  // "end of the week would be great", "No rush, end of the month is fine": on their own too.
  for (const m of text.matches(re(`${B}(?:${END_OF})${E}(?!\\s+(?:figures?|numbers?|totals?|balance|position|stock|snapshot))`))) {
    if (/\bof\s+(?:the\s+)?(?:month|quarter|year)\s*$/.test(text.lower.slice(Math.max(0, m.index - 12), m.index))) continue;
    dateOrPast(m.span, endOfPeriod(m[0].toLowerCase(), today));
  }
  // "in two weeks", "within 3 days", on their own
  for (const m of text.matches(re(`${B}(?:need(?:ed)?\\s+(?:it|this)?\\s*)?${IN_N}${E}`))) dateOrPast(m.span, inN(m[1]!, m[2]!, today));
  return found.sort((a, b) => a.start - b.start);
}

/** Reads the date groups of a cued match (weekday, day of month, day month, month day, ISO, tomorrow, end of, next week, in N). */
function dateOf(m: RegExpExecArray, g: number, today: string, dayFirst: boolean): string | null {
  const [which, weekday, dom, dmDay, dmMonth, dmYear, mdMonth, mdDay, mdYear, isoY, isoM, isoD, numA, numB, numYear, endOf, _endUnit, inCount, inUnit] = m.slice(g, g + 19);
  const whole = m[0].toLowerCase();
  if (weekday) return weekdayDate(weekday, which, today);
  if (dom) return nextDayOfMonth(Number(dom), today);
  if (dmDay && dmMonth) return dayMonth(Number(dmDay), monthNumber(dmMonth)!, dmYear, today);
  if (mdMonth && mdDay) return dayMonth(Number(mdDay), monthNumber(mdMonth)!, mdYear, today);
  if (isoY && isoM && isoD) return isValidDate(Number(isoY), Number(isoM), Number(isoD)) ? ymd(Number(isoY), Number(isoM), Number(isoD)) : null;
  if (numA && numB) {
    // 12/13 is read month first (en-US) or day first as the locale writes dates, unless a part over 12 settles it.
    const [a, b] = [Number(numA), Number(numB)];
    const [day, month] = a > 12 ? [a, b] : b > 12 ? [b, a] : dayFirst ? [a, b] : [b, a];
    if (month < 1 || month > 12) return null;
    return dayMonth(day, month, numYear ? String(numYear.length === 2 ? 2000 + Number(numYear) : Number(numYear)) : undefined, today);
  }
  if (endOf !== undefined || /\b(?:eod|cob|eow|eom|eoq|eoy)\b/.test(whole)) return endOfPeriod(whole, today);
  if (inCount && inUnit) return inN(inCount, inUnit, today);
  if (/\btomorrow\b/.test(whole)) return addDays(today, 1);
  return null;
}

function isoWeekday(iso: string): number {
  return ((new Date(`${iso}T00:00:00Z`).getUTCDay() + 6) % 7) + 1;
}

/**
 * "Friday": the coming Friday, today if it is Friday. "next Friday": the Friday of next week
 * when this week's is still to come, else the coming one.
 */
export function weekdayDate(word: string, which: string | undefined, today: string): string {
  const target = weekdayNumber(word)!;
  const now = isoWeekday(today);
  let ahead = (target - now + 7) % 7;
  if (which === 'next' && ahead > 0 && target > now) ahead += 7;
  if (which === 'next' && ahead === 0) ahead = 7;
  return addDays(today, ahead);
}

function nextDayOfMonth(day: number, today: string): string | null {
  if (day < 1 || day > 31) return null;
  const [y, m] = [Number(today.slice(0, 4)), Number(today.slice(5, 7))];
  for (let ahead = 0; ahead < 3; ahead++) {
    const yy = y + Math.floor((m - 1 + ahead) / 12);
    const mm = ((m - 1 + ahead) % 12) + 1;
    if (day > daysInMonth(yy, mm)) continue;
    const iso = ymd(yy, mm, day);
    if (iso >= today) return iso;
  }
  return null;
}

function dayMonth(day: number, month: number, year: string | undefined, today: string): string | null {
  if (year) return isValidDate(Number(year), month, day) ? ymd(Number(year), month, day) : null;
  const y = Number(today.slice(0, 4));
  for (const yy of [y, y + 1]) {
    if (!isValidDate(yy, month, day)) continue;
    const iso = ymd(yy, month, day);
    if (iso >= today) return iso;
  }
  return null;
}

function endOfPeriod(words: string, today: string): string {
  const [y, m] = [Number(today.slice(0, 4)), Number(today.slice(5, 7))];
  const next = /\bnext\b/.test(words);
  if (/\b(?:day|eod|cob|close of)\b/.test(words)) return today;
  if (/\b(?:week|eow)\b/.test(words)) {
    const friday = addDays(today, (5 - isoWeekday(today) + 7) % 7);
    return next ? addDays(friday, 7) : friday;
  }
  if (/\b(?:month|eom)\b/.test(words)) {
    const mm = next ? m + 1 : m;
    const yy = y + Math.floor((mm - 1) / 12);
    const m2 = ((mm - 1) % 12) + 1;
    return ymd(yy, m2, daysInMonth(yy, m2));
  }
  if (/\b(?:quarter|eoq)\b/.test(words)) {
    const q = Math.ceil(m / 3) + (next ? 1 : 0);
    const yy = y + Math.floor((q - 1) / 4);
    const lastMonth = (((q - 1) % 4) + 1) * 3;
    return ymd(yy, lastMonth, daysInMonth(yy, lastMonth));
  }
  return ymd(next ? y + 1 : y, 12, 31);
}

function inN(count: string, unit: string, today: string): string {
  const n = /^\d+$/.test(count) ? Number(count) : (numberFromWord(count) ?? 1);
  if (/week/.test(unit)) return addDays(today, 7 * n);
  if (/business|working/.test(unit)) {
    let d = today;
    for (let left = n; left > 0; ) {
      d = addDays(d, 1);
      if (isoWeekday(d) <= 5) left--;
    }
    return d;
  }
  return addDays(today, n);
}

/** Whether the words ask for the answer as soon as possible ("asap", "urgently"). */
export function saysAsap(words: string): boolean {
  return new RegExp(`${B}${ASAP}${E}`, 'iu').test(words);
}
