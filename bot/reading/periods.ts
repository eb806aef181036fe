// Period phrases: every way a request names a stretch of time ("Q3 2024", "since March 2023",
// "the last 6 weeks", "this summer", "year to date", "the storm week"), and the phrases that ask
// for a comparison with another stretch ("vs last year", "a year earlier", "month on month").
// Each recogniser returns what it found and the words it found it in; resolving a phrase that
// needs a year ("in March", "for Q3") uses the anchor: the latest occurrence that has begun.
import { addDays } from '../../analysis/periods.js';
import type { DateWindow } from '../../analysis/types.js';
import {
  addMonthsClamped,
  dayWindow,
  halfWindow,
  type Hemisphere,
  isValidDate,
  isoWeekWindow,
  monthWindow,
  type PeriodUnit,
  periodHolding,
  quarterWindow,
  type Season,
  seasonWindow,
  shiftPeriod,
  yearWindow,
  ymd,
} from './calendar.js';
import type { RequestText, Span } from './text.js';
import { MONTH_PATTERN, monthNumber, NUMBER_WORD_PATTERN, numberFromWord, ORDINAL_PATTERN, ordinalNumber } from './lexicon.js';

/** What relative phrases count from, and what the data covers. */
export interface PeriodContext {
  /** The reference "today": the real today, or the day after the data's last date if that is earlier. */
  anchor: string;
  hemisphere: Hemisphere;
  /** Numeric dates such as 09/01/2023 are read day first (most locales) or month first (en-US). */
  dayFirst: boolean;
  /** Named periods from the config ("the storm week"). */
  events: readonly NamedPeriod[];
  /**
   * The anchor is the day after data that ended before today: "this year", "this month", "year
   * to date" are then the periods holding the data's last day (2015 on data ending 31 December
   * 2015), never the empty one starting at the anchor, as the card says periods count back from
   * the data's end.
   */
  dataEnded?: boolean;
}

export interface NamedPeriod {
  name: string;
  phrases: readonly string[];
  window: DateWindow;
}

/**
 * "a year earlier", "same period last year": the window n units back; "the previous period": the
 * stretch of the window's own length just before it.
 */
export interface Shift {
  /** `same`: one of the window's own unit ("this year against last"). */
  unit: PeriodUnit | 'period' | 'same';
  n: number;
}

export interface PeriodMention extends Span {
  /** The stretch of time, unclipped; absent for a pure comparison shift ("a year earlier"). */
  window?: DateWindow;
  unit: PeriodUnit | 'span';
  /** A relative phrase, resolved against the anchor ("last month", "this summer"). */
  relative: boolean;
  /** Runs to the latest data ("since March", "year to date", "this month"). */
  toLatest?: boolean;
  /** Runs to the latest data but never past its own period's end ("this year", "2024 so far"), where "since 2024" runs on. */
  bounded?: boolean;
  /** Starts at the first data ("until March"). */
  fromEarliest?: boolean;
  /**
   * A stretch named by where it starts ("since 2001", "from March 2023 on", "over the last 10
   * years"): the unit of that start, so a change over the stretch can be measured from its first
   * whole period to its last.
   */
  startUnit?: 'year' | 'quarter' | 'month';
  shift?: Shift;
  /** Preceded by a comparison word ("vs", "against", "compared with", "than", "beat"). */
  compared: boolean;
  /** "last summer": resolved as the one before `this`, when both are named. */
  previousOf?: PeriodUnit;
  /** Set against the window by a comparison word ("vs", "compared with"), not only a shift ("on the year before"). */
  strong?: boolean;
  /** One end of a change said over a range ("grow from January to June"): a period of the data, never an event's date. */
  changeEnd?: true;
  /** A day no calendar has ("30 February 2008"): the window is its month, and the reader says so. */
  notReal?: boolean;
  /** The first day of the period named, before "since", "after" or "before" made a stretch of it: the date an event on it turns on. */
  named?: string;
  words: string;
}

/** A point in the calendar named by the text, possibly without its year (resolved later). */
interface Point extends Span {
  unit: PeriodUnit;
  /** Builds the window for a year; `year` absent when the text gave one. */
  make: (year: number) => DateWindow;
  year?: number;
  /** Which occurrence when no year is given. */
  which: 'latest' | 'last' | 'next';
  /** For range year inheritance: the month the point starts in. */
  month: number;
  /** Qualified by "this", "last" or "next": relative to today, not a name on the calendar. */
  qualified?: boolean;
  /** The year was written in digits (not "last year"): a neighbour without a year may take it. */
  digitsYear?: boolean;
  /** A day no calendar has ("30 February 2008"): read as its month, and said back. */
  notReal?: boolean;
}

const YEAR = `(?:19|20)\\d{2}`;
const SHORT_YEAR = `'\\d{2}`;
const B = `(?<![\\p{L}\\p{N}])`;
const E = `(?![\\p{L}\\p{N}])`;

function re(source: string): RegExp {
  return new RegExp(source, 'gu');
}

function yearFrom(text: string | undefined): number | undefined {
  if (!text) return undefined;
  if (text.startsWith("'")) return 2000 + Number(text.slice(1));
  if (/^\d{2}$/.test(text)) return 2000 + Number(text);
  return Number(text);
}

/** The occurrence of a recurring period that a bare name means, counted from the anchor. */
export function resolveOccurrence(make: (year: number) => DateWindow, which: Point['which'], anchor: string): DateWindow {
  const anchorYear = Number(anchor.slice(0, 4));
  if (which === 'next') {
    for (let y = anchorYear - 1; y <= anchorYear + 2; y++) {
      const w = make(y);
      if (w.start >= anchor) return w;
    }
  }
  for (let y = anchorYear + 1; y >= anchorYear - 3; y--) {
    const w = make(y);
    // The latest that has begun by the anchor; "last" the latest that has ended.
    if (which === 'latest' ? w.start < anchor : w.end <= anchor) return w;
  }
  return make(anchorYear - 1);
}

function relativeYear(word: string, anchor: string): number {
  const y = Number(anchor.slice(0, 4));
  return word === 'last' || word === 'previous' || word === 'prior' ? y - 1 : word === 'next' ? y + 1 : y;
}

const QUARTER_WORD = `(?:first|second|third|fourth|last|1st|2nd|3rd|4th)`;
const HALF_WORD = `(?:first|second|1st|2nd)`;

function quarterIndex(word: string): number {
  return word === 'last' ? 4 : ordinalNumber(word) ?? Number(word);
}

/** Finds calendar points: days, months, quarters, halves, seasons, ISO weeks and years. */
function findPoints(text: RequestText, ctx: PeriodContext): Point[] {
  const found: Point[] = [];
  const add = (span: Span, p: Omit<Point, 'start' | 'end'>) => found.push({ ...span, ...p });
  const month = (m: string) => monthNumber(m)!;
  const whichOf = (w: string | undefined): Point['which'] => (w === 'last' || w === 'previous' ? 'last' : w === 'next' ? 'next' : 'latest');

  // Day ranges inside one month: "between 16 and 31 December 2024", "from 1 to 14 June", "1-7 Jan".
  for (const m of text.matches(re(`${B}(?:between\\s+|from\\s+)?(?:the\\s+)?(\\d{1,2})(?:st|nd|rd|th)?\\s*(?:-|–|to|and|until|till|through|thru)\\s*(?:the\\s+)?(\\d{1,2})(?:st|nd|rd|th)?(?:\\s+of)?\\s+(${MONTH_PATTERN})(?:\\.(?=\\s*(?:\\d|'\\d)))?(?:,?\\s+(${YEAR}|${SHORT_YEAR}))?${E}`))) {
    const [d1, d2, mo, y] = [Number(m[1]), Number(m[2]), month(m[3]!), yearFrom(m[4])];
    if (d1 < 1 || d2 > 31 || d1 > d2) continue;
    add(m.span, { unit: 'day', ...(y ? { year: y } : {}), make: (yy) => ({ start: ymd(yy, mo, d1), end: addDays(ymd(yy, mo, d2), 1) }), which: 'latest', month: mo });
  }
  // Week ranges: "weeks 30 to 36 of 2025".
  for (const m of text.matches(re(`${B}(?:iso\\s+)?weeks\\s+(\\d{1,2})\\s*(?:-|–|to|and|through)\\s*(\\d{1,2})(?:\\s*(?:of\\s+|,\\s*)?(${YEAR}))?${E}`))) {
    const [w1, w2] = [Number(m[1]), Number(m[2])];
    const y = m[3] ? Number(m[3]) : undefined;
    if (w1 < 1 || w2 > 53 || w1 > w2) continue;
    add(m.span, { unit: 'week', ...(y ? { year: y } : {}), make: (yy) => ({ start: isoWeekWindow(yy, w1).start, end: isoWeekWindow(yy, w2).end }), which: 'latest', month: 1 });
  }
  // 2023-01-09
  for (const m of text.matches(re(`${B}(${YEAR})-(\\d{1,2})-(\\d{1,2})${E}`))) {
    const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
    if (isValidDate(y, mo, d)) add(m.span, { unit: 'day', year: y, make: () => dayWindow(ymd(y, mo, d)), which: 'latest', month: mo });
  }
  // 09/01/2023, 9.1.23: day first or month first as the locale writes them, unless a part over 12 settles it
  for (const m of text.matches(re(`${B}(\\d{1,2})[/.](\\d{1,2})[/.](\\d{4}|\\d{2})${E}`))) {
    const [p1, p2] = [Number(m[1]), Number(m[2])];
    const y = yearFrom(m[3])!;
    const [d, mo] = p1 > 12 ? [p1, p2] : p2 > 12 ? [p2, p1] : ctx.dayFirst ? [p1, p2] : [p2, p1];
    if (isValidDate(y, mo, d)) add(m.span, { unit: 'day', year: y, make: () => dayWindow(ymd(y, mo, d)), which: 'latest', month: mo });
  }
  // 9 January 2023, 9th of Jan '23, 9 Jan (no year)
  for (const m of text.matches(re(`${B}(\\d{1,2})(?:st|nd|rd|th)?(?:\\s+of)?\\s+(${MONTH_PATTERN})(?:\\.(?=\\s*(?:\\d|'\\d)))?(?:,?\\s+(${YEAR}|${SHORT_YEAR}))?${E}`))) {
    const [d, mo, y] = [Number(m[1]), month(m[2]!), yearFrom(m[3])];
    if (d < 1 || d > 31) continue;
    if (!isValidDate(y ?? 2000, mo, d)) add(m.span, { unit: 'month', ...(y ? { year: y } : {}), make: (yy) => monthWindow(yy, mo), which: 'latest', month: mo, notReal: true });
    else add(m.span, { unit: 'day', ...(y ? { year: y } : {}), make: (yy) => dayWindow(ymd(yy, mo, d)), which: 'latest', month: mo });
  }
  // January 9, 2023; Jan 9th
  for (const m of text.matches(re(`${B}(${MONTH_PATTERN})(?:\\.(?=\\s*(?:\\d|'\\d)))?\\s+(\\d{1,2})(?:st|nd|rd|th)?(?:,?\\s+(${YEAR}|${SHORT_YEAR}))?${E}`))) {
    const [mo, d, y] = [month(m[1]!), Number(m[2]), yearFrom(m[3])];
    if (d < 1 || d > 31) continue;
    if (!isValidDate(y ?? 2000, mo, d)) add(m.span, { unit: 'month', ...(y ? { year: y } : {}), make: (yy) => monthWindow(yy, mo), which: 'latest', month: mo, notReal: true });
    else add(m.span, { unit: 'day', ...(y ? { year: y } : {}), make: (yy) => dayWindow(ymd(yy, mo, d)), which: 'latest', month: mo });
  }
  // January 2023, Jan '23, January of last year, last January, 2023-01, 01/2023
  for (const m of text.matches(re(`${B}(?:(last|this|next|previous)\\s+)?(${MONTH_PATTERN})(?:\\.(?=\\s*(?:\\d|'\\d)))?(?:,?\\s+(?:of\\s+)?(?:(${YEAR}|${SHORT_YEAR})|(last|this|next)\\s+year))?${E}`))) {
    const mo = month(m[2]!);
    if (m[2] === 'may' && !monthContext(text, m.span, m[1] ?? m[3] ?? m[4])) continue;
    if (m[2] === 'march' && !m[1] && !m[3] && !m[4] && !monthContext(text, m.span, undefined)) continue;
    const y = m[3] ? yearFrom(m[3]) : m[4] ? relativeYear(m[4], ctx.anchor) : undefined;
    add(m.span, { unit: 'month', ...(y ? { year: y } : {}), make: (yy) => monthWindow(yy, mo), which: whichOf(m[1]), month: mo, qualified: !!(m[1] || m[4]), digitsYear: !!m[3] });
  }
  for (const m of text.matches(re(`${B}(${YEAR})-(0[1-9]|1[0-2])${E}(?!-\\d)`))) {
    const [y, mo] = [Number(m[1]), Number(m[2])];
    add(m.span, { unit: 'month', year: y, make: () => monthWindow(y, mo), which: 'latest', month: mo });
  }
  for (const m of text.matches(re(`${B}(0?[1-9]|1[0-2])/(${YEAR})${E}`))) {
    const [mo, y] = [Number(m[1]), Number(m[2])];
    add(m.span, { unit: 'month', year: y, make: () => monthWindow(y, mo), which: 'latest', month: mo });
  }
  // Quarters: Q3 2024, 2024 Q3, Q3 '24, 3Q24, Q3 FY? (calendar only), the third quarter of 2024, last year's Q3
  const quarter = (span: Span, q: number, y: number | undefined, which: Point['which'] = 'latest', qualified = false, digitsYear = false) =>
    q >= 1 && q <= 4 && add(span, { unit: 'quarter', ...(y ? { year: y } : {}), make: (yy) => quarterWindow(yy, q), which, month: (q - 1) * 3 + 1, qualified, digitsYear });
  for (const m of text.matches(re(`${B}(?:(last|this|next)\\s+)?q([1-4])(?:\\s*(?:of\\s+)?[-/ ]?\\s*(${YEAR}|${SHORT_YEAR}|\\d{2}(?=$|[^\\p{N}]))|\\s+(?:of\\s+)?(last|this|next)\\s+year)?${E}`))) {
    quarter(m.span, Number(m[2]), m[3] ? yearFrom(m[3]) : m[4] ? relativeYear(m[4], ctx.anchor) : undefined, whichOf(m[1]), !!(m[1] || m[4]), !!m[3]);
  }
  for (const m of text.matches(re(`${B}(${YEAR})\\s*[-/ ]?\\s*q([1-4])${E}`))) quarter(m.span, Number(m[2]), Number(m[1]), 'latest', false, true);
  for (const m of text.matches(re(`${B}([1-4])q\\s*(${YEAR}|\\d{2})${E}`))) quarter(m.span, Number(m[1]), yearFrom(m[2]), 'latest', false, true);
  for (const m of text.matches(re(`${B}(last|this)\\s+year'?s\\s+q([1-4])${E}`))) quarter(m.span, Number(m[2]), relativeYear(m[1]!, ctx.anchor), 'latest', true);
  for (const m of text.matches(re(`${B}(?:the\\s+)?(${QUARTER_WORD})\\s+quarter(?:\\s+(?:of\\s+)?(?:(${YEAR})|(last|this|next)\\s+year|the\\s+year))?${E}`))) {
    const q = quarterIndex(m[1]!);
    quarter(m.span, q, m[2] ? Number(m[2]) : m[3] ? relativeYear(m[3], ctx.anchor) : undefined, 'latest', !!m[3], !!m[2]);
  }
  // Halves: H1 2024, 2024 H1, the first half of 2024, H2 last year
  const half = (span: Span, h: number, y: number | undefined, which: Point['which'] = 'latest', qualified = false, digitsYear = false) =>
    add(span, { unit: 'half', ...(y ? { year: y } : {}), make: (yy) => halfWindow(yy, h), which, month: h === 1 ? 1 : 7, qualified, digitsYear });
  for (const m of text.matches(re(`${B}(?:(last|this|next)\\s+)?h([12])(?:\\s*(?:of\\s+)?[-/ ]?\\s*(${YEAR}|${SHORT_YEAR})|\\s+(?:of\\s+)?(last|this|next)\\s+year)?${E}`))) {
    half(m.span, Number(m[2]), m[3] ? yearFrom(m[3]) : m[4] ? relativeYear(m[4], ctx.anchor) : undefined, whichOf(m[1]), !!(m[1] || m[4]), !!m[3]);
  }
  for (const m of text.matches(re(`${B}(${YEAR})\\s*[-/ ]?\\s*h([12])${E}`))) half(m.span, Number(m[2]), Number(m[1]), 'latest', false, true);
  for (const m of text.matches(re(`${B}(?:the\\s+)?(${HALF_WORD})\\s+half(?:\\s+(?:of\\s+)?(?:(${YEAR})|(last|this|next)\\s+year|the\\s+year))?${E}`))) {
    half(m.span, ordinalNumber(m[1]!)!, m[2] ? Number(m[2]) : m[3] ? relativeYear(m[3], ctx.anchor) : undefined, 'latest', !!m[3], !!m[2]);
  }
  // Seasons: summer 2024, the summer of 2024, this summer, last winter, winter 2023/24, 2024 summer
  const season = (span: Span, s: Season, y: number | undefined, which: Point['which'], qualified = false) =>
    add(span, { unit: 'season', ...(y ? { year: y, digitsYear: true } : {}), make: (yy) => seasonWindow(s, yy, ctx.hemisphere), which, month: Number(seasonWindow(s, 2001, ctx.hemisphere).start.slice(5, 7)), qualified });
  const SEASON = `(spring|summer|autumn|fall|winter)`;
  const seasonName = (w: string): Season => (w === 'fall' ? 'autumn' : (w as Season));
  for (const m of text.matches(re(`${B}(?:(this|last|past|previous|next)\\s+)?${SEASON}(?:\\s+(?:of\\s+)?(${YEAR}|${SHORT_YEAR})(?:\\s*[/-]\\s*(\\d{2}|${YEAR}))?)?${E}`))) {
    const s = seasonName(m[2]!);
    if (m[2] === 'fall' && !m[1] && !m[3] && fallIsVerb(text, m.index, m.index + m[0].length)) continue;
    // "winter 2023/24" is the winter that starts in 2023: labelled by its January's year.
    const y = m[4] ? yearFrom(m[4].length === 2 ? `'${m[4]}` : m[4]) : m[3] ? yearFrom(m[3]) : undefined;
    const label = m[4] && s !== 'winter' ? yearFrom(m[3]) : y;
    season(m.span, s, label, m[1] === 'last' || m[1] === 'past' || m[1] === 'previous' ? 'last' : m[1] === 'next' ? 'next' : 'latest', !!m[1]);
  }
  for (const m of text.matches(re(`${B}(${YEAR})\\s+${SEASON}${E}`))) season(m.span, seasonName(m[2]!), Number(m[1]), 'latest');
  // ISO weeks: 2024-W12, W12 2024, week 12 of 2024, wk 12
  for (const m of text.matches(re(`${B}(${YEAR})-?w(\\d{1,2})${E}`))) {
    const [y, w] = [Number(m[1]), Number(m[2])];
    if (w >= 1 && w <= 53) add(m.span, { unit: 'week', year: y, make: () => isoWeekWindow(y, w), which: 'latest', month: 1 });
  }
  for (const m of text.matches(re(`${B}(?:iso\\s+)?(?:week|wk|w)\\s*(\\d{1,2})(?:\\s*(?:of\\s+|,\\s*)?(${YEAR}))?${E}`))) {
    const w = Number(m[1]);
    const y = m[2] ? Number(m[2]) : undefined;
    if (w >= 1 && w <= 53) add(m.span, { unit: 'week', ...(y ? { year: y, digitsYear: true } : {}), make: (yy) => isoWeekWindow(yy, w), which: 'latest', month: 1 });
  }
  // Decades: "the 1990s", "in 2000s", "the '90s": the ten calendar years from the one ending in 0.
  for (const m of text.matches(re(`${B}(?:the\\s+)?(?:((?:19|20)\\d)0|'(\\d)0)s${E}`))) {
    const start = m[1] !== undefined ? Number(m[1]) * 10 : (Number(m[2]) >= 3 ? 1900 : 2000) + Number(m[2]) * 10;
    add(m.span, { unit: 'year', year: start, make: () => ({ start: ymd(start, 1), end: ymd(start + 10, 1) }), which: 'latest', month: 1, digitsYear: true });
  }
  // Years: 2024, the year 2024, calendar 2024, FY2024 (read as the calendar year)
  for (const m of text.matches(re(`${B}(?:(?:the\\s+)?(?:calendar\\s+|full\\s+)?year\\s+|fy\\s?|cy\\s?)?(${YEAR})${E}(?![.,]\\d)`))) {
    const y = Number(m[1]);
    const before = text.lower.slice(Math.max(0, m.index - 2), m.index);
    if (/[$€£¥]\s*$|\d[.,]$/.test(before)) continue;
    const anchorYear = Number(ctx.anchor.slice(0, 4));
    // A number that could be a count ("2500 tickets") is a year only near the data's years, or
    // after a word that dates it ("in 2031", "for 2031"): a year outside the data is still a year, asked about.
    const lead = text.lower.slice(Math.max(0, m.index - 30), m.index);
    const dated = /\b(?:in|for|during|since|from|until|till|through|by|of|year|fy|cy)\s+(?:the\s+)?(?:calendar\s+|full\s+)?(?:year\s+)?$/.test(lead);
    // Far back (more than 30 years before the anchor: "deaths since 1950" on a table from 1900) a
    // year needs a word that can only date it; "of" and "by" also take counts ("a total of 1950").
    // The second end of a range joined to a year ("from 1950 to 1970", "1960 vs 1990") is dated by it.
    const datedFarBack = /\b(?:in|during|since|from|between|until|till|through|before|after|year|fy|cy)\s+(?:the\s+)?(?:calendar\s+|full\s+)?(?:year\s+)?$/.test(lead) || /\b(?:19|20)\d{2}\s*(?:-|–|to|and|until|till|through|vs\.?|versus|against|compared\s+(?:to|with))\s*(?:the\s+)?(?:year\s+)?$/.test(lead);
    if ((y < anchorYear - 30 && !datedFarBack) || y > anchorYear + (dated ? 30 : 5)) continue;
    add(m.span, { unit: 'year', year: y, make: () => yearWindow(y), which: 'latest', month: 1, digitsYear: true });
  }
  return longestFirst(found);
}

/**
 * A bare "fall" (no "this"/"last", no year) is the verb, not the season, when the words around it
 * make it one: a degree or a direction after it ("fall faster", "fall by 3%", "fall from 7m to 6m",
 * "fall sharply", "fall?"), or an auxiliary or "to" before it with no article or preposition
 * between ("did construction employment fall", "expected to fall"). "in the fall", "during fall",
 * "fall and spring", "fall bookings" stay the season.
 */
function fallIsVerb(text: RequestText, start: number, end: number): boolean {
  const before = text.lower.slice(Math.max(0, start - 60), start);
  if (/\b(?:the|in|during|since|from|until|till|through|over|each|every|of|for|this|that|last|next|between|vs\.?|versus|and|or|by|before|after|until)\s+$/.test(before)) return false;
  const after = text.lower.slice(end, end + 30);
  if (/^\s*(?:$|[?!.;,)]|(?:faster|slower|further|farther|more|less|most|least|much|sharply|steeply|quickly|slowly|sharpest|back|off|behind|below|under|short|again|by|from|to|as|than|away|apart|flat)\b)/.test(after)) return true;
  return /\b(?:did|does|do|didn't|doesn't|don't|will|would|could|can|might|may|should|shall|to|not|never|also|still|always)\s+(?:[\p{L}'-]+\s+){0,4}$/u.test(before) && !/\b(?:the|a|an|in|during|of)\s+$/.test(before);
}

/** "may" and "march" name a month only where the words around them say so. */
function monthContext(text: RequestText, span: Span, qualifier: string | undefined): boolean {
  if (qualifier) return true;
  const raw = text.original.slice(span.start, span.end);
  const before = text.lower.slice(Math.max(0, span.start - 30), span.start);
  const after = text.lower.slice(span.end, span.end + 20);
  if (/\b(in|since|from|during|until|till|through|of|for|vs|versus|and|to|between|before|after|by|over|on|than|against|with|end of|start of|beginning of|mid|late|early)\s*$/.test(before)) return true;
  if (/^\s*(\d|vs|versus|and|to|-|compared|against|,\s*(\w+\s*,\s*)?(and|or)?\s*(jan|feb|apr|jun|jul|aug|sep|oct|nov|dec))/.test(after)) return true;
  return /^\p{Lu}/u.test(raw) && !/(^|[.!?]\s*)$/.test(text.original.slice(0, span.start).trimEnd().slice(-1));
}

function longestFirst<T extends Span>(xs: T[]): T[] {
  const sorted = [...xs].sort((a, b) => b.end - b.start - (a.end - a.start) || a.start - b.start);
  const kept: T[] = [];
  for (const x of sorted) if (!kept.some((k) => x.start < k.end && k.start < x.end)) kept.push(x);
  return kept.sort((a, b) => a.start - b.start);
}

function resolvePoint(p: Point, ctx: PeriodContext): DateWindow {
  return p.year !== undefined ? p.make(p.year) : resolveOccurrence(p.make, p.which, ctx.anchor);
}

const UNIT_WORD: Record<string, PeriodUnit> = {
  day: 'day',
  days: 'day',
  week: 'week',
  weeks: 'week',
  wk: 'week',
  wks: 'week',
  month: 'month',
  months: 'month',
  mo: 'month',
  mos: 'month',
  quarter: 'quarter',
  quarters: 'quarter',
  qtr: 'quarter',
  qtrs: 'quarter',
  year: 'year',
  years: 'year',
  yr: 'year',
  yrs: 'year',
  half: 'half',
  season: 'season',
};
const UNIT = `(days?|weeks?|wks?|months?|mos?|quarters?|qtrs?|years?|yrs?)`;
const COUNT = `(\\d{1,3}|${NUMBER_WORD_PATTERN})`;

/** Relative phrases: today, this month, last quarter, the last 6 weeks, year to date, the past 12 months. */
function findRelative(text: RequestText, ctx: PeriodContext): PeriodMention[] {
  const out: PeriodMention[] = [];
  const A = ctx.anchor;
  const add = (span: Span, m: Omit<PeriodMention, 'start' | 'end' | 'compared' | 'words' | 'relative'>) =>
    out.push({ ...span, relative: true, compared: false, words: text.quote(span), ...m });
  const holding = (unit: PeriodUnit) => periodHolding(A, unit, ctx.hemisphere);
  // "this month", "year to date": the period the data's last day is in when periods count back from the data's end.
  const current = (unit: PeriodUnit) => periodHolding(ctx.dataEnded ? addDays(A, -1) : A, unit, ctx.hemisphere);

  for (const m of text.matches(re(`${B}(?:the\\s+)?(?:day\\s+before\\s+yesterday)${E}`))) add(m.span, { window: dayWindow(addDays(A, -2)), unit: 'day' });
  for (const m of text.matches(re(`${B}yesterday'?s?${E}`))) add(m.span, { window: dayWindow(addDays(A, -1)), unit: 'day' });
  for (const m of text.matches(re(`${B}(?:so\\s+far\\s+)?today(?:\\s+so\\s+far)?${E}`))) add(m.span, { window: dayWindow(A), unit: 'day', toLatest: true, bounded: true });
  // this week / month / quarter / year (/ half): from its start to the latest data
  for (const m of text.matches(re(`${B}(?:(?:so\\s+far\\s+)?(?:this|the\\s+current|current)\\s+(week|month|quarter|qtr|year|half)(?:\\s+so\\s+far|\\s+to\\s+date)?)${E}`))) {
    const unit = UNIT_WORD[m[1]!]!;
    add(m.span, { window: current(unit), unit, toLatest: true, bounded: true });
  }
  // "since the start of the year": this year to date.
  for (const m of text.matches(re(`${B}since\\s+the\\s+(?:start|beginning)\\s+of\\s+(?:the|this)\\s+(year|month|quarter|week)${E}`))) {
    const unit = UNIT_WORD[m[1]!]!;
    add(m.span, { window: current(unit), unit, toLatest: true, bounded: true });
  }
  // year / month / quarter / week to date
  for (const m of text.matches(re(`${B}(?:(ytd|mtd|qtd|wtd)|(year|month|quarter|week)[-\\s]to[-\\s]date|(?:so\\s+far\\s+)?(?:in\\s+)?(?:the\\s+)?(year|month|quarter|week)\\s+so\\s+far|so\\s+far\\s+this\\s+(year|month|quarter|week))${E}`))) {
    const short: Record<string, PeriodUnit> = { ytd: 'year', mtd: 'month', qtd: 'quarter', wtd: 'week' };
    const unit = m[1] ? short[m[1]]! : UNIT_WORD[(m[2] ?? m[3] ?? m[4])!]!;
    add(m.span, { window: current(unit), unit, toLatest: true, bounded: true });
  }
  // last / previous week, month, quarter, year, half (whole); last full month
  for (const m of text.matches(re(`${B}(?:the\\s+)?(last|previous|prior|past|latest)\\s+(?:full\\s+|complete\\s+|whole\\s+|calendar\\s+)?(week|month|quarter|qtr|year|half|weekend)${E}(?!\\s+(?:to\\s+date|so\\s+far))`))) {
    const word = m[2]!;
    if (word === 'weekend') {
      const monday = holding('week').start;
      add(m.span, { window: { start: addDays(monday, -2), end: monday }, unit: 'span' });
      continue;
    }
    const unit = UNIT_WORD[word]!;
    if (m[1] === 'latest' && unit !== 'week') {
      // "the latest full month": the latest whole one the data has, which is last month's.
      add(m.span, { window: shiftPeriod(holding(unit), unit, 1), unit });
      continue;
    }
    add(m.span, { window: shiftPeriod(holding(unit), unit, 1), unit, previousOf: unit });
  }
  // the last N days / weeks / months / quarters / years
  for (const m of text.matches(re(`${B}(?:(?:over|in|for|during)\\s+)?(?:the\\s+)?(?:last|past|previous|prior|trailing|recent|latest|rolling)\\s+(?:${COUNT}\\s+)?(?:full\\s+|complete\\s+|whole\\s+)?${UNIT}${E}`))) {
    const n = m[1] ? (numberFromWord(m[1]) ?? Number(m[1])) : undefined;
    const unit = UNIT_WORD[m[2]!]!;
    if (n === undefined && !/s$/.test(m[2]!)) continue; // "last month" is handled above
    const count = n ?? 1;
    if (count < 1 || count > 400) continue;
    if (unit === 'day') {
      add(m.span, { window: { start: addDays(A, -count), end: A }, unit: 'span' });
    } else {
      const end = holding(unit).start;
      // "over the last 10 years": a stretch of whole years, whose change runs from its first to its last.
      const startUnit = unit === 'year' && count >= 2 ? { startUnit: 'year' as const } : {};
      add(m.span, { window: { start: shiftPeriod({ start: end, end }, unit, count).start, end }, unit: 'span', ...startUnit });
    }
  }
  // trailing twelve months
  for (const m of text.matches(re(`${B}(?:ttm|ltm|l12m|trailing\\s+(?:twelve|12)(?:\\s+months)?|rolling\\s+(?:twelve|12)\\s+months|rolling\\s+year|moving\\s+annual\\s+total|mat)${E}`))) {
    const end = holding('month').start;
    add(m.span, { window: { start: addMonthsClamped(end, -12), end }, unit: 'span' });
  }
  // Named periods from the config's events: fixed dates, not relative to the anchor.
  for (const ev of ctx.events) {
    for (const phrase of [ev.name, ...ev.phrases]) {
      const escaped = phrase.toLowerCase().replace(/[.*+?^${}()|[\]\\]/g, '\\$&').replace(/\s+/g, '\\s+');
      for (const m of text.matches(re(`${B}(?:the\\s+)?${escaped}${E}`))) out.push({ ...m.span, window: ev.window, unit: 'span', relative: false, compared: false, words: text.quote(m.span) });
    }
  }
  return out;
}

/** Phrases that shift the window for a comparison: "a year earlier", "same period last year", "month on month". */
function findShifts(text: RequestText): PeriodMention[] {
  const out: PeriodMention[] = [];
  const add = (span: Span, unit: PeriodUnit, n = 1): number =>
    out.push({ ...span, unit, relative: true, compared: true, shift: { unit, n }, words: text.quote(span) });
  const sameAsLastYear = [
    `(?:the\\s+)?(?:same|equivalent|corresponding|comparable)\\s+(?:period|time|months?|weeks?|days?|dates|quarter|stretch|point)\\s+(?:of\\s+|in\\s+)?(?:last|a|the\\s+previous|the\\s+prior|the\\s+year\\s+before|one)\\s*(?:year)?`,
    `(?:this|the\\s+same)\\s+time\\s+last\\s+year`,
    `(?:a|one)\\s+year\\s+(?:earlier|ago|before|back|prior)`,
    `(?:12|twelve)\\s+months\\s+(?:earlier|ago|before)`,
    `(?:the\\s+)?(?:previous|prior)\\s+year'?s?(?:\\s+(?:same\\s+)?(?:period|figures?|numbers?|levels?))?`,
    `(?:the\\s+)?year\\s+before`,
    `last\\s+year'?s\\s+(?:figures?|numbers?|levels?|period|equivalent)`,
  ];
  for (const m of text.matches(re(`${B}(?:${sameAsLastYear.join('|')})${E}`))) add(m.span, 'year');
  // "year on year", "yoy": a year earlier; with no window of its own, the year to date against the same dates.
  for (const m of text.matches(re(`${B}(?:year\\s*(?:-|\\s)\\s*(?:on|over)\\s*(?:-|\\s)\\s*year|yoy|y\\/y|y-o-y)${E}`))) add(m.span, 'year');
  // "the December before", "the summer before", "the one before"
  for (const m of text.matches(re(`${B}the\\s+(?:${MONTH_PATTERN}|spring|summer|autumn|fall|winter|q[1-4]|one|same\\s+\\w+)\\s+(?:before|a\\s+year\\s+(?:before|earlier))${E}`))) add(m.span, 'year');
  for (const m of text.matches(re(`${B}(?:(?:the\\s+)?(month|week|quarter)\\s*(?:-|\\s)\\s*(?:on|over)\\s*(?:-|\\s)\\s*(?:month|week|quarter)|(mom|wow|qoq))${E}`))) {
    const unit: PeriodUnit = m[1] ? UNIT_WORD[m[1]]! : ({ mom: 'month', wow: 'week', qoq: 'quarter' } as const)[m[2] as 'mom' | 'wow' | 'qoq'];
    add(m.span, unit);
  }
  for (const m of text.matches(re(`${B}(?:the\\s+)?(?:previous|prior|preceding)\\s+(month|week|quarter|period|day)${E}`))) {
    const unit = m[1] === 'period' ? 'period' : UNIT_WORD[m[1]!]!;
    out.push({ ...m.span, unit: unit === 'period' ? 'span' : unit, relative: true, compared: true, shift: { unit, n: 1 }, words: text.quote(m.span) });
  }
  for (const m of text.matches(re(`${B}(?:the\\s+)?(month|week|quarter|day)\\s+before${E}`))) add(m.span, UNIT_WORD[m[1]!]!);
  // "last 28 days vs prior 28", "vs the previous 4 weeks": the stretch of the same length just before.
  for (const m of text.matches(re(`${B}(?:vs\\.?|versus|against|compared\\s+(?:to|with))\\s+(?:the\\s+)?(?:prior|previous|preceding)\\s+\\d{1,3}(?:\\s+(?:days?|weeks?|months?))?${E}`))) {
    out.push({ ...m.span, unit: 'span', relative: true, compared: true, strong: true, shift: { unit: 'period', n: 1 }, words: text.quote(m.span) });
  }
  // "this year against last", "vs the previous": the period before, of the window's own unit.
  for (const m of text.matches(re(`${B}(?:against|vs\\.?|versus|than|compared\\s+(?:to|with))\\s+(?:the\\s+)?(?:last|previous|prior|preceding)${E}(?!\\s+(?:\\d|${NUMBER_WORD_PATTERN}|day|week|month|quarter|year|half|season|spring|summer|autumn|fall|winter|${MONTH_PATTERN}|q[1-4]|h[12])\\b)`))) {
    out.push({ ...m.span, unit: 'span', relative: true, compared: true, shift: { unit: 'same', n: 1 }, words: text.quote(m.span) });
  }
  return out;
}

/** Words that put the period after them in the comparison's place. */
const COMPARED_BEFORE = /(?:\bvs\.?|\bv\.?|\bversus|\bagainst|\bcompared\s+(?:to|with)|\bcompare\w*(?:\s+\S+){0,6}\s+(?:to|with|against)|\brelative\s+to|\bthan|\bbeat(?:s|en)?|\bbeating|\boutperform\w*|\bover|\bon|\bfrom|\bwith|\bagainst|\bto)\s+(?:the\s+|that\s+of\s+|those\s+of\s+|in\s+|for\s+|of\s+)?$/;
const STRONG_COMPARED_BEFORE = /(?:\bvs\.?|\bv\.?|\bversus|\bagainst|\bcompared\s+(?:to|with)|\bcompare\w*(?:\s+\S+){0,6}\s+(?:to|with|against)|\brelative\s+to|\bthan|\bthan\s+(?:it|they|that|this|we|there)\s+(?:was|were|did|had)|\bbeat(?:s|en)?|\bbeating|\boutperform\w*)\s+(?:the\s+|that\s+of\s+|those\s+of\s+|in\s+|for\s+|during\s+|of\s+|back\s+in\s+)?$/;

/** A word of comparison a few words before "between" ("compared between", "how does Finance compare between"). */
const COMPARED_BETWEEN = /\b(?:compar(?:e|ed|es|ing)|differ(?:s|ed|ing)?|difference|contrast(?:s|ed|ing)?)\s+(?:[\p{L}\p{N}'’-]+\s+){0,6}between\s+(?:the\s+)?$/u;

/**
 * A change said over a range ("did flights grow from January to June", "the rise from Q1 to Q3"):
 * the two ends are set against each other, as "compared between" sets two periods, not read as one
 * stretch whose growth would be taken against a year earlier.
 */
const CHANGED_FROM = /\b(?:grow(?:s|n|ing|th)?|grew|ris(?:e|es|en|ing)|rose|increas(?:e|es|ed|ing)|decreas(?:e|es|ed|ing)|fall(?:s|en|ing)?|fell|drop(?:s|ped|ping)?|declin(?:e|es|ed|ing)|climb(?:s|ed|ing)?|jump(?:s|ed)?|chang(?:e|es|ed|ing)|(?:go(?:es)?|gone|went|going)\s+(?:up|down))\s+(?:[\p{L}\p{N}'’-]+\s+){0,5}from\s+$/u;

/** Every period mention in the text, ranges and "since" folded in, each marked when it is compared against. */
export function findPeriods(text: RequestText, ctx: PeriodContext): PeriodMention[] {
  const relative = findRelative(text, ctx);
  const shifts = findShifts(text);
  const points = findPoints(text, ctx).filter((p) => ![...relative, ...shifts].some((r) => p.start < r.end && r.start < p.end && r.end - r.start >= p.end - p.start));
  // "week 3 of 2024 with week 2": a point with no year takes the year of its neighbour of the same kind.
  for (const p of points) {
    if (p.year !== undefined) continue;
    const near = points.find((o) => o !== p && o.unit === p.unit && o.year !== undefined && o.digitsYear && Math.abs(o.start - p.start) < 60 && !/[.!?;]/.test(text.lower.slice(Math.min(o.end, p.end), Math.max(o.start, p.start))));
    if (near) p.year = near.year;
  }
  const mentions: PeriodMention[] = [];
  // Ranges: "from X to Y", "between X and Y", "X to Y", "Jan-Mar 2024".
  const used = new Set<Point>();
  // "how X compared between 2008 and 2009": two periods set against each other, not one stretch.
  const comparedEarlier = new Set<Point>();
  const setAgainst = new Set<PeriodMention>();
  const changeEnds = new Set<Point>();
  for (let i = 0; i + 1 < points.length; i++) {
    const a = points[i]!;
    const b = points[i + 1]!;
    const gap = text.lower.slice(a.end, b.start);
    const before = text.lower.slice(Math.max(0, a.start - 12), a.start);
    const between = /\bbetween\s+$/.test(before);
    if (between && /^\s*and\s*$/.test(gap) && COMPARED_BETWEEN.test(text.lower.slice(Math.max(0, a.start - 80), a.start))) {
      const [wa, wb] = rangeEnds(a, b, ctx);
      // The earlier of the two is the base; each keeps its own year ("between May and June 2024").
      if (a.year === undefined) a.year = Number(wa.start.slice(0, 4));
      if (b.year === undefined) b.year = Number(wb.start.slice(0, 4));
      comparedEarlier.add(wa.start <= wb.start ? a : b);
      i++;
      continue;
    }
    const from = /\bfrom\s+$/.test(before);
    // "grow from January to June": two whole months (or quarters) set against each other, the
    // earlier the base; a stretch of years ("fall from 2007 to 2010") stays the period a change is asked over.
    if (from && a.unit === b.unit && /^(?:month|quarter)$/.test(a.unit) && /^\s*(?:-|to|until|till|through|thru)\s*$/.test(gap) && CHANGED_FROM.test(text.lower.slice(Math.max(0, a.start - 60), a.start))) {
      const [wa, wb] = rangeEnds(a, b, ctx);
      if (a.year === undefined) a.year = Number(wa.start.slice(0, 4));
      if (b.year === undefined) b.year = Number(wb.start.slice(0, 4));
      comparedEarlier.add(wa.start <= wb.start ? a : b);
      changeEnds.add(a).add(b);
      i++;
      continue;
    }
    if (!(/^\s*(?:-|to|until|till|through|thru)\s*$/.test(gap) || (between && /^\s*and\s*$/.test(gap)) || (from && /^\s*(?:-|to|until|till|through|thru)\s*$/.test(gap)))) continue;
    const [wa, wb] = rangeEnds(a, b, ctx);
    const start = (from || between) ? before.search(/\b(?:from|between)\s+$/) + Math.max(0, a.start - 12) : a.start;
    // "between 2005 and 2009", "from January to June": a change over the range runs from its first
    // named period to its last, as "since 2005" does (never the last year against the one before).
    const sameUnit = a.unit === b.unit && (a.unit === 'year' || a.unit === 'quarter' || a.unit === 'month') && wa.start < wb.start;
    mentions.push({ start, end: b.end, window: { start: wa.start, end: wb.end }, unit: 'span', relative: false, compared: false, words: text.quote({ start, end: b.end }), ...(sameUnit ? { startUnit: a.unit as 'year' | 'quarter' | 'month' } : {}) });
    used.add(a);
    used.add(b);
    i++;
  }
  // "last summer vs this summer": alone, "last summer" is the latest that has ended, which on the
  // anchor's own season or month is the same one "this summer" names; named beside it, it is the
  // one a year before it, so the two are never the same span.
  const thisOnes = points.filter((p) => !used.has(p) && p.qualified && p.which === 'latest' && p.year === undefined);
  const windowOf = (p: Point): DateWindow => {
    const w = resolvePoint(p, ctx);
    if (!(p.qualified && p.which === 'last' && p.year === undefined)) return w;
    const same = thisOnes.find((t) => t.unit === p.unit && resolvePoint(t, ctx).start === w.start);
    return same ? shiftPeriod(w, 'year', 1) : w;
  };
  for (const p of points) {
    if (used.has(p)) continue;
    const mention: PeriodMention = { start: p.start, end: p.end, window: windowOf(p), unit: p.unit, relative: p.qualified === true, compared: comparedEarlier.has(p), ...(p.notReal ? { notReal: true } : {}), ...(changeEnds.has(p) ? { changeEnd: true as const } : {}), words: text.quote(p) };
    if (comparedEarlier.has(p)) setAgainst.add(mention);
    mentions.push(mention);
  }
  // "last year vs this year", "this quarter against last quarter": named together, the last is the
  // one before this, whatever the anchor makes of each alone (on data ending with a year, both
  // alone would be that year).
  for (const last of relative) {
    const now = last.previousOf && relative.find((r) => r.bounded && r.unit === last.previousOf && r.window && r.window.start === last.window?.start);
    if (now && now.window) last.window = shiftPeriod(now.window, last.previousOf!, 1);
  }
  // The longest reading of any stretch of words wins ("the same month last year" over "last year").
  mentions.push(...relative, ...shifts);
  // Words read as a deadline ("by 15 Dec") are not a period of the data.
  const chosen = longestFirst(mentions.filter((m) => !text.isClaimed(m)));
  // "since X", "from X on", "starting X": to the latest data. "until X", "up to X": from the first.
  for (const m of chosen) {
    const before = text.lower.slice(Math.max(0, m.start - 24), m.start);
    const after = text.lower.slice(m.end, m.end + 16);
    const since = /\b(?:since|from|starting(?:\s+(?:in|from|with))?|beginning(?:\s+(?:in|from|with))?|after|post)\s+(?:the\s+(?:start|beginning)\s+of\s+)?(?:the\s+)?$/.exec(before);
    if (since && m.window && !m.shift && (/^since|^starting|^beginning|^post|^after/.test(since[0]) || /^\s*(?:on(?:wards?)?|onward)\b/.test(after) || !/^\s*(?:to|until|till|through|-)/.test(after))) {
      const isAfter = /^after|^post/.test(since[0]);
      m.named = m.window.start;
      if (m.unit === 'year' || m.unit === 'quarter' || m.unit === 'month') m.startUnit = m.unit;
      m.window = { start: isAfter ? m.window.end : m.window.start, end: m.window.end };
      m.toLatest = true;
      m.unit = 'span';
      m.start -= since[0].length;
      m.words = text.quote(m);
    }
    // "2024 so far", "Q2 to date": to the latest data.
    const soFar = /^\s*(?:so\s+far|to\s+date)\b/.exec(after);
    if (soFar && m.window && !m.shift && !m.toLatest) {
      m.toLatest = true;
      m.bounded = true;
      m.relative = true;
      m.end += soFar[0].length;
      m.words = text.quote(m);
    }
    const until = /\b(?:until|till|up\s+to|through|thru|before|prior\s+to)\s+(?:the\s+end\s+of\s+)?$/.exec(before);
    if (until && m.window && !m.shift && !since) {
      m.named = m.window.start;
      if (/^(?:before|prior)/.test(until[0])) m.window = { start: m.window.start, end: m.window.start };
      m.fromEarliest = true;
      m.unit = 'span';
      m.start -= until[0].length;
      m.words = text.quote(m);
    }
    const preceding = text.lower.slice(Math.max(0, m.start - 60), m.start);
    // Weak comparison words ("on", "over", "from") count only before a relative phrase ("up on last year").
    m.strong = setAgainst.has(m) || STRONG_COMPARED_BEFORE.test(preceding) || /^(?:vs|versus|against|compared|than)/.test(m.words.toLowerCase());
    m.compared = m.compared || setAgainst.has(m) || STRONG_COMPARED_BEFORE.test(preceding) || (m.relative && !m.toLatest && COMPARED_BEFORE.test(preceding) && /^(?:last|previous|prior|a\s+year|the\s+(?:previous|prior))/.test(m.words.toLowerCase()));
  }
  return chosen;
}

/** Both ends of a range, a missing year taken from the other end ("Dec to Feb 2024": December 2023). */
function rangeEnds(a: Point, b: Point, ctx: PeriodContext): [DateWindow, DateWindow] {
  if (a.year === undefined && b.year !== undefined) {
    const y = a.month > b.month ? b.year - 1 : b.year;
    return [a.make(y), b.make(b.year)];
  }
  if (b.year === undefined && a.year !== undefined) {
    const y = b.month < a.month ? a.year + 1 : a.year;
    return [a.make(a.year), b.make(y)];
  }
  if (a.year === undefined && b.year === undefined) {
    const wb = resolveOccurrence(b.make, 'latest', ctx.anchor);
    const yb = Number(wb.start.slice(0, 4));
    return [a.make(a.month > b.month ? yb - 1 : yb), wb];
  }
  return [a.make(a.year!), b.make(b.year!)];
}

export { ORDINAL_PATTERN };
