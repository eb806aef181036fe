// Date windows as ranges on the time column itself ("sargable": an index, a partition bound or a
// remote shard can use them), never as a function of the column. A window is half-open local
// calendar dates [start, end) in the dataset's time zone; each end becomes a bound value of the
// column's own type:
//   DATE         the date itself;
//   TIMESTAMP    local midnight of that date (a wall-clock time, as the column holds);
//   TIMESTAMPTZ  the first instant whose local date in the zone is that date.
// The last is exact across daylight-saving changes: where midnight is skipped (the clocks jump
// from 23:59:59 to 01:00) the day starts at the jump, and where midnight happens twice (the
// clocks fall back from 01:00 to 00:00) the day starts at the first of them. Both engines'
// own "wall clock at zone" conversions pick the later of two ambiguous instants, which would drop
// the first hour of such a day; so the instant is found here, from the IANA rules in Node's ICU.
import type { DateWindow } from '../types.js';
import type { TimeColumnType } from './dialect.js';
import type { QueryBuilder } from './query-builder.js';

const HOUR_MS = 3_600_000;
// UTC offsets in the tz database lie within -15:56 and +15:13 (historic local mean times
// included), so a local date's first instant lies within 16 hours of its UTC midnight.
const SEARCH_MS = 16 * HOUR_MS;

const dateFormats = new Map<string, Intl.DateTimeFormat>();

/** The local calendar date (YYYY-MM-DD) of an instant in an IANA zone. */
export function localDateOf(epochMs: number, timeZone: string): string {
  let f = dateFormats.get(timeZone);
  if (!f) {
    // en-CA writes dates as YYYY-MM-DD.
    f = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' });
    dateFormats.set(timeZone, f);
  }
  return f.format(epochMs);
}

const firstInstants = new Map<string, string>();

/**
 * The first instant (ISO 8601, UTC) whose local date in `timeZone` is `date` or later: a binary
 * search to the millisecond between 16 hours either side of the date's UTC midnight. Local dates
 * never go backwards as time goes on (every transition in the tz database moves the clock by less
 * than a day and none crosses midnight backwards past a whole date), which the search relies on.
 */
export function firstInstantOfLocalDate(date: string, timeZone: string): string {
  const key = `${timeZone}\u0000${date}`;
  const known = firstInstants.get(key);
  if (known) return known;
  const midnightUtc = Date.parse(`${date}T00:00:00Z`);
  if (!Number.isFinite(midnightUtc)) throw new RangeError(`not a calendar date: ${date}`);
  let before = midnightUtc - SEARCH_MS; // local date < date here
  let atOrAfter = midnightUtc + SEARCH_MS; // local date >= date here
  while (atOrAfter - before > 1) {
    const mid = Math.floor((before + atOrAfter) / 2);
    if (localDateOf(mid, timeZone) >= date) atOrAfter = mid;
    else before = mid;
  }
  const iso = new Date(atOrAfter).toISOString();
  firstInstants.set(key, iso);
  return iso;
}

/** The value a window end is bound as, for a time column of this type. */
export function boundValue(date: string, type: TimeColumnType, timeZone: string): string {
  return type === 'timestamptz' ? firstInstantOfLocalDate(date, timeZone) : date;
}

/** Merges overlapping and touching windows, in date order (so adjacent periods read as one range). */
export function mergeWindows(windows: DateWindow[]): DateWindow[] {
  const sorted = windows.filter((w) => w.start < w.end).sort((a, b) => (a.start < b.start ? -1 : a.start > b.start ? 1 : 0));
  const out: DateWindow[] = [];
  for (const w of sorted) {
    const last = out[out.length - 1];
    if (last && w.start <= last.end) last.end = w.end > last.end ? w.end : last.end;
    else out.push({ ...w });
  }
  return out;
}

/** `column >= start AND column < end`, each end a bound value of the column's type (see above). */
export function rangeCondition(q: QueryBuilder, column: string, type: TimeColumnType, timeZone: string, window: DateWindow): string {
  const bound = (date: string) => q.dialect.timeParam(q.bind(boundValue(date, type, timeZone)), type);
  return `${column} >= ${bound(window.start)} AND ${column} < ${bound(window.end)}`;
}
