// `threadcount init`: a first config drafted from the data itself, so a new user starts from
// something that loads and checks. It reads the table's columns and a sample of rows, then
// guesses: the time column (a date column, or year/month/day parts), a count of rows, a sum or an
// average per numeric column with its kind of quantity, a rate per true/false column, dimensions
// for low-cardinality text, and personal data (emails, phone numbers, names) marked so. Every
// guess is written where the user reviews it; `also_called` is left for them to fill in.
import { textDateFormatsOf } from '../../config/date-format.js';
import type { SourceConfig } from '../../config/schema.js';
import { quoteIdentifier } from '../sql/dialect.js';
import type { DataSource, TableColumn } from './data-source.js';
import { typeFamily } from './dataset-check.js';

const SAMPLE_ROWS = 100_000;
// Text with at most this many values in the sample is a dimension (common practice: a breakdown
// reads at a glance with a few dozen segments at most).
const DIMENSION_MAX_VALUES = 60;

export interface ColumnProfile {
  name: string;
  type: string;
  family: ReturnType<typeof typeFamily>;
  values: number;
  nonNull: number;
  /** A few non-empty values as text (for spotting emails and phone numbers). */
  examples: string[];
}

/** How many distinct (date, breakdown value) pairs the sampled rows hold. */
export interface DateBreakdownCount {
  time: string;
  dimension: string;
  distinct: number;
}

export interface DraftInput {
  datasetName: string;
  label: string;
  source: SourceConfig;
  table?: string;
  rows: number;
  columns: ColumnProfile[];
  /** Distinct (date, breakdown value) pairs: one row per pair makes the numbers readings (levels). */
  readings?: DateBreakdownCount[];
}

/** Reads each column's type, distinct and non-empty counts and a few values, over a sample of rows. */
export async function profileColumns(source: DataSource, table: string): Promise<{ rows: number; columns: ColumnProfile[]; readings: DateBreakdownCount[] }> {
  const described: TableColumn[] = await source.describe(table);
  const q = quoteIdentifier;
  const text = source.dialect.name === 'postgres' ? 'TEXT' : 'VARCHAR';
  const sample = `(SELECT * FROM ${q(table)} LIMIT ${SAMPLE_ROWS}) AS tc_sample`;
  const parts = described.flatMap((c, i) => [`COUNT(DISTINCT ${q(c.name)}) AS d${i}`, `COUNT(${q(c.name)}) AS n${i}`]);
  const run = { maxRows: 1000, timeoutMs: 120_000 };
  const stats = (await source.run({ sql: `SELECT COUNT(*) AS tc_rows, ${parts.join(', ')} FROM ${sample}`, params: [] }, run)).rows[0] ?? {};
  const examples = described.length
    ? (await source.run({ sql: `SELECT ${described.map((c, i) => `CAST(${q(c.name)} AS ${text}) AS e${i}`).join(', ')} FROM ${q(table)} LIMIT 200`, params: [] }, run)).rows
    : [];
  const columns: ColumnProfile[] = described.map((c, i) => ({
    name: c.name,
    type: c.type,
    family: typeFamily(c.type),
    values: Number(stats[`d${i}`] ?? 0),
    nonNull: Number(stats[`n${i}`] ?? 0),
    examples: examples.map((r) => r[`e${i}`]).filter((v): v is string => typeof v === 'string' && v !== '').slice(0, 200),
  }));
  // Rows per date and breakdown value: one row each (a reading per industry per month) says the
  // numbers beside them are readings of a level, not amounts that add up over time.
  const times = columns.filter((c) => c.family === 'time' || (c.family === 'text' && textDateFormatsOf(c.examples).length > 0));
  const breakdowns = columns.filter((c) => c.family === 'text' && c.values > 1 && c.values <= DIMENSION_MAX_VALUES && !times.includes(c));
  const pairs = times.flatMap((t) => breakdowns.map((d) => ({ time: t.name, dimension: d.name })));
  const pairCounts = pairs.length
    ? (await source.run({ sql: `SELECT ${pairs.map((p, i) => `COUNT(DISTINCT CAST(${q(p.time)} AS ${text}) || '|' || CAST(${q(p.dimension)} AS ${text})) AS p${i}`).join(', ')} FROM ${sample}`, params: [] }, run)).rows[0] ?? {}
    : {};
  return { rows: Number(stats.tc_rows ?? 0), columns, readings: pairs.map((p, i) => ({ ...p, distinct: Number(pairCounts[`p${i}`] ?? 0) })) };
}

const EMAIL = /^[^\s@]+@[^\s@]+\.[^\s@]+$/;
const PHONE = /^\+?[\d\s().-]{7,20}$/;
const PERSONAL_NAME = /(^|_)(e_?mail|phone|mobile|telephone|tel|first_?name|last_?name|surname|full_?name|given_?name|family_?name|address|street|postcode|zip_?code|birth_?date|date_?of_?birth|dob|passport|ssn|national_?id)($|_)/;
const PERSON_COLUMN = /(^|_)(name)$/;
// Readings averaged over time rather than added up (a level, not a flow).
const LEVEL_WORDS = /(^|_)(temp|temperature|level|balance|concentration|co2|ppm|price|index|rate|ratio|pct|percent|share|avg|mean|average|headcount|stock|inventory|population|pressure|humidity|speed|wind|latitude|longitude|lat|lon|lng|score|age|height|weight)($|_|\d)/;
// Amounts that add up over time whatever the data's shape (a flow).
const FLOW_WORDS = /(^|_)(revenue|sales|amount|spend|spent|cost|costs|paid|income|sold|orders|bookings|visits|trips|births|deaths|arrivals|departures|volume|quantity|qty|units|takings|fares|tickets|calls|clicks|views|downloads)($|_|\d)/;
// Names that say which way is good. Anything else is left without a direction: its changes are told
// as rises and falls, never as better or worse (a count of unemployed, a price).
const GOOD_WHEN_HIGHER = /(^|_)(revenue|sales|profit|income|margin|satisfaction|satisfied|retention|conversion|uptime|on_?time)($|_|\d)/;
const GOOD_WHEN_LOWER = /(^|_)(unemploy\w*|jobless|error|errors|failure|failures|failed|defect|defects|complaint|complaints|churn|cancel\w*|delay|delays|delayed|late|loss|losses|cost|costs|latency|downtime|refund|refunds)($|_|\d)/;

/** `higher_is_better` when the column's name settles it; nothing otherwise. */
function directionOf(name: string): { higher_is_better?: boolean } {
  if (GOOD_WHEN_LOWER.test(name)) return { higher_is_better: false };
  if (GOOD_WHEN_HIGHER.test(name)) return { higher_is_better: true };
  return {};
}

const PERCENT_WORDS = /(^|_)(rate|pct|percent|percentage|share)($|_)/;
const ID_WORDS = /(^|_)(id|key|uuid|code)$/;
const YEAR = /^(year|yr|yyyy)$/;
const MONTH = /^(month|mon|mm)$/;
const DAY = /^(day|dd|date_of_month|day_of_month|dom|mday)$/;
const TIME_WORDS = /(^|_)(date|day|time|timestamp|month|week|period|when)($|_)/;

/** A catalog name (lower_snake_case) for a column name. */
export function catalogNameOf(column: string): string {
  const s = column
    .replace(/([a-z0-9])([A-Z])/g, '$1_$2')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '_')
    .replace(/^_+|_+$/g, '');
  return /^[a-z]/.test(s) ? s : `c_${s || 'column'}`;
}

/** An expression naming the column: bare when it is a plain name, double-quoted otherwise. */
function columnExpr(name: string): string {
  return /^[a-z_][a-z0-9_]*$/.test(name) ? name : quoteIdentifier(name);
}

function labelOf(column: string): string {
  const words = column.replace(/([a-z0-9])([A-Z])/g, '$1 $2').replace(/[_\s]+/g, ' ').trim();
  return words.charAt(0).toUpperCase() + words.slice(1);
}

/** A text column whose examples all read as dates in one common format (preferring a name that says so). */
function textDateColumn(columns: ColumnProfile[]): { column: ColumnProfile; format: string; others: string[] } | undefined {
  const found = columns
    .filter((c) => c.family === 'text' && c.examples.length > 0 && c.nonNull > 0)
    .map((c) => ({ column: c, formats: textDateFormatsOf(c.examples) }))
    .filter((x) => x.formats.length > 0);
  const pick = found.find((x) => TIME_WORDS.test(catalogNameOf(x.column.name))) ?? found[0];
  return pick ? { column: pick.column, format: pick.formats[0]!, others: pick.formats.slice(1) } : undefined;
}

export interface Draft {
  config: Record<string, unknown>;
  /** What was guessed, for the person running init. */
  notes: string[];
  /** By metric name: what init guessed about it, written as a comment above it in the file. */
  comments: Record<string, string>;
}

export function draftConfig(input: DraftInput): Draft {
  const notes: string[] = [];
  const used = new Set<string>();
  const unique = (base: string) => {
    let name = base;
    for (let i = 2; used.has(name); i++) name = `${base}_${i}`;
    used.add(name);
    return name;
  };
  const personal = (c: ColumnProfile) =>
    PERSONAL_NAME.test(catalogNameOf(c.name)) ||
    (c.family === 'text' && PERSON_COLUMN.test(catalogNameOf(c.name)) && c.values > DIMENSION_MAX_VALUES) ||
    (c.examples.length > 0 && c.examples.filter((v) => EMAIL.test(v)).length / c.examples.length > 0.5) ||
    (c.family === 'text' && c.examples.length > 0 && c.examples.filter((v) => PHONE.test(v) && /\d{3}/.test(v)).length / c.examples.length > 0.8);

  // The time column: a date or timestamp (preferring a name that says so), else year/month/day parts.
  const times = input.columns.filter((c) => c.family === 'time');
  const time = times.find((c) => TIME_WORDS.test(catalogNameOf(c.name))) ?? times[0];
  const byRole = (re: RegExp) => input.columns.find((c) => c.family === 'number' && re.test(catalogNameOf(c.name)));
  const year = byRole(YEAR);
  const month = byRole(MONTH);
  const day = byRole(DAY);
  // Failing those, text that reads as dates in one of the common formats ("Jan 1 2000", "31/12/2024").
  const textDate = time || year ? undefined : textDateColumn(input.columns);
  let timeColumn: unknown;
  const timeParts = new Set<string>();
  if (textDate) {
    timeColumn = { expr: `strptime(${columnExpr(textDate.column.name)}, '${textDate.format}')` };
    timeParts.add(textDate.column.name);
    notes.push(`time column: ${textDate.column.name}, text dates read as ${textDate.format}${textDate.others.length ? ` (they also fit ${textDate.others.join(', ')}: check which the data means)` : ''}`);
  } else if (time) {
    timeColumn = time.name;
    notes.push(`time column: ${time.name}`);
  } else if (year) {
    timeColumn = { year: year.name, ...(month ? { month: month.name } : {}), ...(month && day ? { day: day.name } : {}) };
    for (const c of [year, month, day]) if (c) timeParts.add(c.name);
    notes.push(`time column: built from ${[year, month, day].filter(Boolean).map((c) => c!.name).join(', ')}`);
  } else {
    timeColumn = 'FILL_IN';
    notes.push('time column: none found; write time_column (a date column, {year, month, day} or {expr: ...}) before check');
  }

  // One row per date and breakdown value, several per date: the numbers are readings of each value
  // at each date (unemployed per industry per month, a price per company per month).
  const timeName = textDate?.column.name ?? time?.name;
  const dateValues = input.columns.find((c) => c.name === timeName)?.values ?? 0;
  const panel = input.readings?.find((r) => r.time === timeName && r.distinct === input.rows && dateValues > 0 && dateValues < input.rows);
  // Said above each metric in the file, where the person reviews it (never in a description, which
  // requesters read in charts and in "what can you measure?").
  const comments: Record<string, string> = {};
  const rowsName = unique('rows');
  comments[rowsName] = ' drafted by init: the number of rows';
  const metrics: Record<string, unknown>[] = [{ name: rowsName, label: 'Rows', also_called: [], count: 'rows', unit: 'count', kind: 'flow' }];
  const dimensions: Record<string, unknown>[] = [];
  let keyColumn: string | undefined;
  // With a date column, its year, month and day columns repeat it: never amounts to add up.
  const repeatsDate = (c: ColumnProfile) => !!time && c.family === 'number' && [YEAR, MONTH, DAY].some((re) => re.test(catalogNameOf(c.name)));
  const leftOut = input.columns.filter(repeatsDate).map((c) => c.name);
  if (leftOut.length) notes.push(`left out (parts of the date in ${time!.name}): ${leftOut.join(', ')}`);
  for (const c of input.columns) {
    if (c.name === time?.name || timeParts.has(c.name) || repeatsDate(c)) continue;
    const name = catalogNameOf(c.name);
    if (personal(c)) {
      dimensions.push({ name: unique(name), label: labelOf(c.name), also_called: [], column: c.name, personal_data: true });
      notes.push(`personal data (never shown or added up): ${c.name}`);
      continue;
    }
    const idLike = ID_WORDS.test(name) || (c.values === input.rows && input.rows > 100 && c.family !== 'number');
    if (idLike) {
      if (!keyColumn && c.values === c.nonNull && c.values === input.rows) keyColumn = c.name;
      else metrics.push({ name: unique(`distinct_${name}`), label: `Distinct ${labelOf(c.name).toLowerCase()}`, also_called: [], count_distinct: columnExpr(c.name), unit: 'count', kind: 'flow' });
      continue;
    }
    if (c.family === 'boolean') {
      metrics.push({ name: unique(`${name}_rate`), label: `${labelOf(c.name)} rate`, also_called: [], rate: { when: { column: c.name, is: true } }, unit: 'percent', ...directionOf(name), kind: 'ratio' });
      continue;
    }
    if (c.family === 'number') {
      // Whole numbers with a handful of values (a weekday, a category code) are a breakdown, not an amount.
      if (c.values > 0 && c.values <= 7 && input.rows > 50) {
        dimensions.push({ name: unique(name), label: labelOf(c.name), also_called: [], column: c.name });
        continue;
      }
      const named = LEVEL_WORDS.test(name);
      // A reading per breakdown value per date adds up across values on one date, never over time:
      // drafted as its average (a year is the mean of its readings), unless its name says amount.
      const reading = !named && !!panel && !FLOW_WORDS.test(name);
      const metricName = unique(name);
      if (named) comments[metricName] = ` drafted by init: a level (its name reads as a reading), averaged over time`;
      else if (reading) comments[metricName] = ` drafted by init: a level, averaged over time: the data has one row per ${panel!.dimension} per ${panel!.time}, so ${c.name} reads as a reading, not an amount (make it sum and kind: flow if it adds up over time)`;
      else comments[metricName] = ` drafted by init: a flow, added up over time (make it average and kind: level if it is a reading such as a balance)`;
      // A rate or share: percent, as a fraction (0.021) or, when its values are mostly above 1.5
      // and at most 100, as points (2.1) divided by 100 so that it shows as 2.1%.
      const numbers = c.examples.map(Number).filter((v) => Number.isFinite(v));
      const share = PERCENT_WORDS.test(name) && numbers.length > 0 && numbers.every((v) => v >= 0 && v <= 100);
      const points = share && numbers.filter((v) => v > 1.5).length > numbers.length / 2;
      if (share && (points || numbers.every((v) => v <= 1.5))) {
        comments[metricName] = points
          ? ` drafted by init: a percentage; its values are percent points (${numbers[0]} for ${numbers[0]}%), so divided by 100 (unit: percent reads 0.021 as 2.1%), averaged over time`
          : ` drafted by init: a percentage written as a fraction (0.021 for 2.1%), averaged over time`;
        metrics.push({ name: metricName, label: labelOf(c.name), also_called: [], average: points ? `${columnExpr(c.name)} / 100` : columnExpr(c.name), unit: 'percent', ...directionOf(name), kind: 'level' });
        continue;
      }
      metrics.push(
        named || reading
          ? { name: metricName, label: labelOf(c.name), also_called: [], average: columnExpr(c.name), unit: 'number', ...directionOf(name), kind: 'level' }
          : { name: metricName, label: labelOf(c.name), also_called: [], sum: columnExpr(c.name), unit: 'number', ...directionOf(name), kind: 'flow' },
      );
      continue;
    }
    if (c.family === 'text' && c.values > 0 && c.values <= DIMENSION_MAX_VALUES && c.values < Math.max(2, input.rows / 2)) {
      dimensions.push({ name: unique(name), label: labelOf(c.name), also_called: [], column: c.name });
    }
  }
  const dataset: Record<string, unknown> = {
    name: input.datasetName,
    label: input.label,
    source: input.source,
    ...(input.table ? { table: input.table } : {}),
    time_column: timeColumn,
    timezone: 'UTC',
    ...(keyColumn ? { key_column: keyColumn } : {}),
    metrics,
    dimensions,
  };
  notes.push(`metrics: ${metrics.map((m) => `${String(m.name)} (${String(m.kind)})`).join(', ')}`);
  notes.push(`dimensions: ${dimensions.map((d) => String(d.name)).join(', ') || 'none'}`);
  return { config: { version: 1, datasets: [dataset] }, notes, comments };
}
