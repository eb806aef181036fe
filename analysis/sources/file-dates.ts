// Dates written as text in CSV and JSON files. The engine's own guess reads an ambiguous
// "03-12-2001" day-first without a word (read_csv's sniffer), or value by value (read_json: "03-12-2001"
// as 3 December and "03-13-2001" as 13 March in one column). So a date column that is not written
// year first is read as text and converted with the one format the shared rule (text-dates.ts:
// try_strptime over a spread sample, both orders tried) finds; the same for both kinds of file.
import { dayMonthSwapped } from '../../config/date-format.js';
import type { DateOrder } from '../../config/schema.js';
import { quoteIdentifier } from '../sql/dialect.js';
import { sampleTextDates, type SampleQuery, type TextDateReading } from './text-dates.js';

/** How a column of date text in a file was read. */
export interface FileDateReading extends TextDateReading {
  type: 'DATE' | 'TIMESTAMP';
  /** Set when the data could not tell day from month and the source's date_order chose. */
  orderFromConfig?: DateOrder;
}

// Rows the format is read from (as init samples a table); values checked for ISO before sampling.
const SAMPLE_ROWS = 100_000;
const FIRST_VALUES = 50;
const ISO = /^\d{4}-\d{2}-\d{2}([ T]\d{2}:\d{2}(:\d{2}(\.\d+)?)?)?$/;

const lit = (s: string) => `'${s.replaceAll("'", "''")}'`;

/** The engine's reader over the files, with the named columns kept as text. */
function readerSql(kind: 'csv' | 'json', list: string, asText: readonly string[]): string {
  if (kind === 'csv') return `read_csv(${list}, auto_detect = true${asText.length ? `, types = {${asText.map((c) => `${lit(c)}: 'VARCHAR'`).join(', ')}}` : ''})`;
  // read_json has no per-column types without naming every column: ISO only keeps every other date as text.
  return asText.length ? `read_json(${list}, dateformat = 'iso', timestampformat = 'iso')` : `read_json(${list})`;
}

/** True when a format puts the day before the month. */
function dayFirst(format: string): boolean {
  return format.indexOf('%d') < format.indexOf('%m');
}

/**
 * The reader a CSV or JSON source's view selects from, and how each date column written as text was
 * read. Columns the engine reads as ISO dates are left to it.
 */
export async function readFileDates(query: SampleQuery, kind: 'csv' | 'json', list: string, order?: DateOrder): Promise<{ reader: string; read: Record<string, FileDateReading> }> {
  const auto = readerSql(kind, list, []);
  const typeOf = async (reader: string) => new Map((await query(`DESCRIBE SELECT * FROM ${reader}`)).map((r) => [String(r.column_name), String(r.column_type).toUpperCase()]));
  const typed = await typeOf(auto);
  const dated = [...typed].filter(([, t]) => t === 'DATE' || t === 'TIMESTAMP').map(([name]) => name);
  if (dated.length === 0) return { reader: auto, read: {} };
  const raw = readerSql(kind, list, dated);
  const rawTypes = await typeOf(raw);
  let asText = dated.filter((c) => rawTypes.get(c) === 'VARCHAR');
  if (asText.length && kind === 'csv') {
    // ISO text the sniffer reads right: left to it (no sampling for the common case).
    const first = await query(`SELECT ${asText.map(quoteIdentifier).join(', ')} FROM ${raw} LIMIT ${FIRST_VALUES}`);
    asText = asText.filter((c) => !first.every((r) => r[c] === null || ISO.test(String(r[c]).trim())));
  }
  if (asText.length === 0) return { reader: auto, read: {} };
  const readings = await sampleTextDates(query, 'duckdb', raw, asText, SAMPLE_ROWS);
  const read: Record<string, FileDateReading> = {};
  const converted: string[] = [];
  for (const column of asText) {
    const type = typed.get(column) as 'DATE' | 'TIMESTAMP';
    const r = readings[column];
    // No common format reads the values: the engine's cast (the JSON reader keeps them as text here).
    if (!r) {
      converted.push(`TRY_CAST(${quoteIdentifier(column)} AS ${type}) AS ${quoteIdentifier(column)}`);
      continue;
    }
    let format = r.format;
    let orderFromConfig: DateOrder | undefined;
    if (r.dayMonthUnsettled && order && (order === 'day_first') !== dayFirst(format)) {
      format = r.dayMonthUnsettled;
      orderFromConfig = order;
    } else if (r.dayMonthUnsettled && order) {
      orderFromConfig = order;
    }
    const swapped = dayMonthSwapped(format);
    read[column] = { ...r, format, type, ...(r.dayMonthUnsettled && swapped ? { dayMonthUnsettled: swapped } : {}), ...(orderFromConfig ? { orderFromConfig } : {}) };
    const parsed = `try_strptime(${quoteIdentifier(column)}, ${lit(format)})`;
    converted.push(`${type === 'DATE' ? `CAST(${parsed} AS DATE)` : parsed} AS ${quoteIdentifier(column)}`);
  }
  return { reader: `(SELECT * REPLACE (${converted.join(', ')}) FROM ${readerSql(kind, list, asText)})`, read };
}
