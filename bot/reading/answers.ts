// Short replies read with the same recognisers as a request: an answer to a question the bot
// asked ("bookings", "weekly", "since March 2024", "by Friday"), a correction to the brief card,
// a plan edit. A phrase that works in a request works here, and the other way round.
import { type Coverage, dataEnd } from '../../analysis/coverage.js';
import { addDays } from '../../analysis/periods.js';
import type { DateWindow } from '../../analysis/types.js';
import { isValidDate } from './calendar.js';
import { findDeadlines } from './deadline.js';
import { type DatasetFacts, isOutsideDataNote, readRequest } from './read-request.js';
import { RequestText } from './text.js';
import { isoDateIn } from './time-zone.js';

export type Reading<T> = { ok: true; value: T } | { ok: false; message: string };

/** All the data there is: its first day to the end of its last stamp (the day after a daily stamp, the month after a monthly one). */
export function fullWindow(coverage: Coverage): DateWindow | null {
  if (!coverage.firstDate || !coverage.lastDate) return null;
  return { start: coverage.firstDate, end: dataEnd({ lastDate: coverage.lastDate, ...(coverage.stamps ? { stamps: coverage.stamps } : {}) }) };
}

const ALL = /^\s*(?:all|all data|all (?:the )?history|everything|all available data|the whole (?:history|period)|all time|full history|no limit)\s*[.!]?\s*$/i;

/**
 * A period answer or edit: "all", "2024", "2023-04 to 2024-03", "since March 2024", "the last 12
 * months", "compare 2025 so far with the same months of 2024". Impossible dates and periods
 * outside the data are explained, never guessed around.
 */
export function readWindowAnswer(text: string, facts: DatasetFacts, now: Date): Reading<{ window: DateWindow; compareWindow?: DateWindow }> {
  const full = fullWindow(facts.coverage);
  if (!full) return { ok: false, message: 'The dataset has no rows, so there is no period to choose.' };
  if (ALL.test(text)) return { ok: true, value: { window: full } };
  const impossible = impossibleDate(text);
  if (impossible) return { ok: false, message: impossible };
  const brief = readRequest(text, facts, { now });
  const window = brief.window;
  if (!window) {
    // A period read but outside the data ("last year" on data that ended years ago): said as such.
    const outside = (brief.saidBack ?? []).filter(isOutsideDataNote);
    if (outside.length > 0) return { ok: false, message: `${outside.join(' ')} Pick a period inside it.` };
    return { ok: false, message: `I couldn't read "${clip(text)}" as a period. Try "all", "2024", "Q3 2024", "2023-04 to 2024-03", "since March 2023", "the last 12 months" or "this year vs last".` };
  }
  if (window.start >= window.end) return { ok: false, message: `The period ${window.start} to ${addDays(window.end, -1)} ends before it starts.` };
  if (window.end <= full.start || window.start >= full.end) {
    return { ok: false, message: `The data covers ${full.start} to ${addDays(full.end, -1)}; the period you asked for (${window.start} to ${addDays(window.end, -1)}) has no data. Pick a period inside it.` };
  }
  return { ok: true, value: brief.compareWindow ? { window, compareWindow: brief.compareWindow } : { window } };
}

/** A date written with an impossible month or day ("2024-13", "31 February 2024"), said back. */
export function impossibleDate(text: string): string | null {
  for (const m of text.matchAll(/\b((?:19|20)\d{2})-(\d{1,2})(?:-(\d{1,2}))?\b/g)) {
    const [y, mo, d] = [Number(m[1]), Number(m[2]), m[3] ? Number(m[3]) : 1];
    if (mo < 1 || mo > 12) return `${m[0]} is not a real date: there is no month ${mo}.`;
    if (!isValidDate(y, mo, d)) return `${m[0]} is not a real date.`;
  }
  for (const m of text.matchAll(/\b(\d{1,2})(?:st|nd|rd|th)?\s+(?:of\s+)?(feb(?:ruary)?|apr(?:il)?|june?|sep(?:t(?:ember)?)?|nov(?:ember)?)\s+((?:19|20)\d{2})\b/gi)) {
    const months: Record<string, number> = { feb: 2, apr: 4, jun: 6, sep: 9, nov: 11 };
    const mo = months[m[2]!.slice(0, 3).toLowerCase()]!;
    if (!isValidDate(Number(m[3]), mo, Number(m[1]))) return `${m[1]} ${m[2]} ${m[3]} is not a real date.`;
  }
  return null;
}

/** A deadline answer: a date, "Friday", "asap", "end of the month" or "none". Never a past date. */
export function readDeadlineAnswer(text: string, now: Date, timeZone: string): Reading<string> {
  const today = isoDateIn(now, timeZone);
  const t = text.trim();
  if (/^(?:none|no deadline|no rush|whenever|n\/a|no|not urgent|any ?time)\s*[.!]?$/i.test(t)) return { ok: true, value: 'none' };
  const impossible = impossibleDate(t);
  if (impossible) return { ok: false, message: `${impossible} Try a date like ${today}, "Friday", "asap" or "none".` };
  // Read as if it followed "by": "Friday" is "by Friday".
  for (const candidate of [t, `by ${t}`]) {
    const found = findDeadlines(new RequestText(candidate), today)[0];
    if (found?.date) return { ok: true, value: found.date };
    if (found?.past) return { ok: false, message: `${found.past} has already passed. Give a date from today (${today}) on, "asap" or "none".` };
  }
  return { ok: false, message: `I couldn't read "${clip(t)}" as a date. Try a date like ${today}, "next Friday", "asap" or "none".` };
}

export function clip(s: string): string {
  return s.length > 60 ? `${s.slice(0, 57)}...` : s;
}
