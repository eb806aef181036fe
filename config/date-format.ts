// Text dates in a config expression: `strptime(date, '%b %d %Y')` reads "Jan 1 2000". The format is
// a string literal made of a few C strptime codes that both engines can read; each engine's SQL is
// built from the parsed codes, never from the text (analysis/sql/expression-sql.ts). A text that
// does not fit the format gives no date on both engines (DuckDB try_strptime; on PostgreSQL a
// pattern guard before to_timestamp, which would otherwise stop the query).

export interface DateFormatCode {
  /** How PostgreSQL's to_timestamp spells it. */
  postgres: string;
  /** A regular expression (POSIX, for PostgreSQL's ~) a text matching the code fits. */
  pattern: string;
  meaning: string;
}

export const DATE_FORMAT_CODES: Record<string, DateFormatCode> = {
  Y: { postgres: 'YYYY', pattern: '[0-9]{4}', meaning: 'a four-digit year' },
  y: { postgres: 'YY', pattern: '[0-9]{2}', meaning: 'a two-digit year' },
  m: { postgres: 'MM', pattern: '[0-9]{1,2}', meaning: 'a month number' },
  d: { postgres: 'DD', pattern: '[0-9]{1,2}', meaning: 'a day of the month' },
  b: { postgres: 'Mon', pattern: '[A-Za-z]{3}', meaning: 'a month\'s short name (Jan)' },
  B: { postgres: 'FMMonth', pattern: '[A-Za-z]{3,9}', meaning: 'a month\'s name (January)' },
  H: { postgres: 'HH24', pattern: '[0-9]{1,2}', meaning: 'an hour (0-23)' },
  M: { postgres: 'MI', pattern: '[0-9]{2}', meaning: 'minutes' },
  S: { postgres: 'SS', pattern: '[0-9]{2}', meaning: 'seconds' },
};

export type DateFormatPart = { code: string } | { text: string };

/** The parts of a format, or an error message naming what is not allowed. */
export function parseDateFormat(format: string): DateFormatPart[] | string {
  if (format.length === 0 || format.length > 64) return 'a date format must be 1 to 64 characters';
  const parts: DateFormatPart[] = [];
  for (let i = 0; i < format.length; i++) {
    const c = format[i]!;
    if (c === '%') {
      const code = format[i + 1];
      if (!code || !DATE_FORMAT_CODES[code]) {
        return `the date format ${JSON.stringify(format)} uses %${code ?? ''}, which is not one of ${Object.keys(DATE_FORMAT_CODES).map((k) => `%${k}`).join(' ')}`;
      }
      parts.push({ code });
      i++;
      continue;
    }
    // Separators only: a letter outside a code would read differently on the two engines.
    if (!/[\s\-/.,:T]/.test(c)) return `the date format ${JSON.stringify(format)} has ${JSON.stringify(c)} outside a % code (only spaces and - / . , : T may separate the codes)`;
    const last = parts[parts.length - 1];
    if (last && 'text' in last) last.text += c;
    else parts.push({ text: c });
  }
  if (!parts.some((p) => 'code' in p && (p.code === 'Y' || p.code === 'y'))) return `the date format ${JSON.stringify(format)} has no year (%Y or %y)`;
  return parts;
}

/** PostgreSQL's to_timestamp format for the parts, with literal text quoted. */
export function postgresDateFormat(parts: DateFormatPart[]): string {
  return parts.map((p) => ('code' in p ? DATE_FORMAT_CODES[p.code]!.postgres : p.text === 'T' ? '"T"' : p.text)).join('');
}

/** A whole-text POSIX pattern the parts fit. */
export function dateFormatPattern(parts: DateFormatPart[]): string {
  return `^${parts.map((p) => ('code' in p ? DATE_FORMAT_CODES[p.code]!.pattern : p.text.replace(/[.\\/\-\s,:]/g, (ch) => (/\s/.test(ch) ? '\\s+' : `\\${ch}`)))).join('')}$`;
}

const MONTH_NAMES = ['january', 'february', 'march', 'april', 'may', 'june', 'july', 'august', 'september', 'october', 'november', 'december'];

/** True when the text reads as a date in the format: it fits, and its month, day and time are in range. */
export function fitsDateFormat(text: string, parts: DateFormatPart[]): boolean {
  const groups = parts.map((p) => ('code' in p ? `(${DATE_FORMAT_CODES[p.code]!.pattern})` : p.text.replace(/[.\\/\-,:]/g, (ch) => `\\${ch}`).replace(/\s+/g, '\\s+')));
  const m = new RegExp(`^${groups.join('')}$`).exec(text.trim());
  if (!m) return false;
  let g = 1;
  for (const p of parts) {
    if (!('code' in p)) continue;
    const v = m[g++]!;
    const n = Number(v);
    const ok =
      p.code === 'b' ? MONTH_NAMES.some((x) => x.slice(0, 3) === v.toLowerCase())
      : p.code === 'B' ? MONTH_NAMES.includes(v.toLowerCase())
      : p.code === 'm' ? n >= 1 && n <= 12
      : p.code === 'd' ? n >= 1 && n <= 31
      : p.code === 'H' ? n <= 23
      : p.code === 'M' || p.code === 'S' ? n <= 59
      : true;
    if (!ok) return false;
  }
  return true;
}

// Common ways dates and times are written as text, tried by `init` over a sample of a text column's
// values (analysis/sources/text-dates.ts). The order settles ties: year first, then day first, then
// month first (when a day-first and a month-first reading both fit every value, init takes the
// day-first one and says so), four-digit years before two-digit ones, then month names.
const SEPARATORS = ['/', '-', '.'];
const TIMES = ['', ' %H:%M', ' %H:%M:%S'];
const YEAR_FIRST = SEPARATORS.flatMap((s) => [...TIMES, 'T%H:%M', 'T%H:%M:%S'].map((t) => `%Y${s}%m${s}%d${t}`));
const dayMonth = (first: string, second: string, year: string) => SEPARATORS.flatMap((s) => TIMES.map((t) => `%${first}${s}%${second}${s}%${year}${t}`));
const MONTH_NAMED = ['%b %d %Y', '%b %d, %Y', '%B %d %Y', '%B %d, %Y', '%d %b %Y', '%d %B %Y', '%d-%b-%Y', '%d %b %Y %H:%M', '%b %d %Y %H:%M', '%b %Y', '%B %Y'];

export const TEXT_DATE_FORMATS: readonly string[] = [
  ...YEAR_FIRST,
  ...dayMonth('d', 'm', 'Y'),
  ...dayMonth('m', 'd', 'Y'),
  ...dayMonth('d', 'm', 'y'),
  ...dayMonth('m', 'd', 'y'),
  ...MONTH_NAMED,
];

/** The same format read the other way round, day for month (for saying when the data cannot tell them apart). */
export function dayMonthSwapped(format: string): string | undefined {
  if (!format.includes('%d') || !format.includes('%m')) return undefined;
  return format.replace('%d', '\u0000').replace('%m', '%d').replace('\u0000', '%m');
}

/** True when the text fits the format as PostgreSQL's pattern guard reads it (the engine-side check for DuckDB is try_strptime). */
export function fitsTextDateFormat(text: string, format: string): boolean {
  const parts = parseDateFormat(format);
  return typeof parts !== 'string' && fitsDateFormat(text, parts);
}
