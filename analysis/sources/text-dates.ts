// Which text columns hold dates, and in which format: the engine itself reads a sample of each
// column's distinct values with every common format (config/date-format.ts) and counts the values
// each one reads. On DuckDB that is try_strptime, the function a config's strptime(...) runs as; on
// PostgreSQL the config's strptime is a pattern guard before to_timestamp, so the same pattern is
// tried here on the sampled values. The values are read as they are stored (untrimmed), as the
// config's expression will read them.
import { dayMonthSwapped, fitsTextDateFormat, TEXT_DATE_FORMATS } from '../../config/date-format.js';
import { quoteIdentifier } from '../sql/dialect.js';
import type { DataSource } from './data-source.js';

/** Distinct values read per column: enough to meet days above 12 in day-first or month-first data. */
const SAMPLE_VALUES = 1000;
// A format is taken when it reads at least this share of the sampled values: a few stray entries
// ("unknown", "n/a") must not hide a date column; the rest read as no date and the note says how many.
const MIN_SHARE_READ = 0.95;
// Years outside this span are a misreading (DuckDB's %Y reads "01" as the year 1).
const YEARS = [1000, 2999] as const;

export interface TextDateReading {
  /** The format that reads the most sampled values (the first in TEXT_DATE_FORMATS on a tie). */
  format: string;
  /** Other formats that read as many values. */
  others: string[];
  /** Set when the day-first and month-first readings both fit every value: the one not taken. */
  dayMonthUnsettled?: string;
  read: number;
  sampled: number;
}

/** Text that could be a date: short, with digits or a month's name (skips free text and names). */
export function mayBeDates(examples: readonly string[]): boolean {
  const looks = examples.filter((v) => v.length <= 40 && /\d/.test(v) && /^[\p{L}\d\s/.,:T-]+$/u.test(v.trim()));
  return examples.length > 0 && looks.length >= examples.length / 2;
}

/** Runs one query of the sampling and returns its rows (a source's run, or a bare connection while a source opens). */
export type SampleQuery = (sql: string) => Promise<Record<string, unknown>[]>;

/** For each named text column that reads as dates, its format; others are left out. */
export async function readTextDates(source: DataSource, table: string, columns: readonly string[], sampleRows: number): Promise<Record<string, TextDateReading>> {
  const run = { maxRows: SAMPLE_VALUES + 1, timeoutMs: 120_000 };
  const query: SampleQuery = async (sql) => (await source.run({ sql, params: [] }, run)).rows;
  return sampleTextDates(query, source.dialect.name === 'postgres' ? 'postgres' : 'duckdb', quoteIdentifier(table), columns, sampleRows);
}

/**
 * The same reading over any relation (`from`: a quoted table or a file reader such as
 * read_json(...)): the one rule for which format a column of date text is written in, used by init
 * and by the embedded engine when it reads CSV and JSON files (analysis/sources/file-dates.ts).
 */
export async function sampleTextDates(query: SampleQuery, engine: 'duckdb' | 'postgres', from: string, columns: readonly string[], sampleRows: number): Promise<Record<string, TextDateReading>> {
  const found: Record<string, TextDateReading> = {};
  const q = quoteIdentifier;
  const text = engine === 'postgres' ? 'TEXT' : 'VARCHAR';
  for (const column of columns) {
    // Distinct values in an order of their hashes: spread over the whole sample, not the first
    // days of sorted data (a thousand minutes of 1-12 January would never settle day against month).
    const spread = engine === 'postgres' ? 'md5(v)' : 'hash(v)';
    const values = `SELECT v FROM (SELECT DISTINCT CAST(${q(column)} AS ${text}) AS v FROM (SELECT ${q(column)} FROM ${from} LIMIT ${sampleRows}) AS tc_sample WHERE ${q(column)} IS NOT NULL AND TRIM(CAST(${q(column)} AS ${text})) <> '') AS tc_distinct ORDER BY ${spread} LIMIT ${SAMPLE_VALUES}`;
    let counts: number[];
    let sampled: number;
    if (engine === 'duckdb') {
      const lit = (f: string) => `'${f.replace(/'/g, "''")}'`;
      const fits = TEXT_DATE_FORMATS.map((f, i) => `COUNT(*) FILTER (WHERE year(try_strptime(v, ${lit(f)})) BETWEEN ${YEARS[0]} AND ${YEARS[1]}) AS f${i}`);
      const row = (await query(`SELECT COUNT(*) AS tc_values, ${fits.join(', ')} FROM (${values}) AS tc_values`))[0] ?? {};
      sampled = Number(row.tc_values ?? 0);
      counts = TEXT_DATE_FORMATS.map((_, i) => Number(row[`f${i}`] ?? 0));
    } else {
      const rows = (await query(values)).map((r) => String(r.v));
      sampled = rows.length;
      counts = TEXT_DATE_FORMATS.map((f) => rows.filter((v) => fitsTextDateFormat(v, f)).length);
    }
    const best = Math.max(0, ...counts);
    if (sampled === 0 || best < sampled * MIN_SHARE_READ) continue;
    const tied = TEXT_DATE_FORMATS.filter((_, i) => counts[i] === best);
    const format = tied[0]!;
    const swapped = dayMonthSwapped(format);
    found[column] = {
      format,
      others: tied.slice(1),
      ...(swapped && tied.includes(swapped) ? { dayMonthUnsettled: swapped } : {}),
      read: best,
      sampled,
    };
  }
  return found;
}
