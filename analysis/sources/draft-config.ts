// `threadcount init`: a first config drafted from the data itself, so a new user starts from
// something that loads and checks. It reads the table's columns and a sample of rows, then
// guesses: the time column (a date column, year/month/day parts, or text the engine reads as dates),
// a count of rows, a sum or an average per numeric column with its kind of quantity and unit, a
// rate per true/false column, dimensions for text with few values for its rows, and personal data
// (emails, phone numbers, names) marked so. Every guess is written where the user reviews it;
// `also_called` is left for them to fill in.
import type { SourceConfig } from '../../config/schema.js';
import { quoteIdentifier } from '../sql/dialect.js';
import type { DataSource, TableColumn } from './data-source.js';
import { typeFamily } from './dataset-check.js';
import { mayBeDates, readTextDates, type TextDateReading } from './text-dates.js';

const SAMPLE_ROWS = 100_000;
// Text is a breakdown (a dimension) when its values are few for the rows (common practice, not a
// published rule): a few dozen at most reads at a glance in any table; a larger table may carry more
// (220 airports in 20,000 flights, 174 distributors in 3,201 films) while each value has 10 rows or
// more on average (at most 10% as many values as rows) and there are at most 1,000 of them. More than that is a name, an id or free
// text: counted or left out, never grouped by.
const DIMENSION_FEW_VALUES = 60;
const DIMENSION_MAX_SHARE_OF_ROWS = 0.1;
const DIMENSION_CEILING = 1000;

/** True when a text column with this many values in this many rows reads as a breakdown. */
export function isBreakdown(values: number, rows: number): boolean {
  // One value only: a breakdown by it shows nothing.
  if (values < 2) return false;
  return (values <= DIMENSION_FEW_VALUES && values < Math.max(2, rows / 2)) || (values <= DIMENSION_CEILING && values <= rows * DIMENSION_MAX_SHARE_OF_ROWS);
}

export interface ColumnProfile {
  name: string;
  type: string;
  family: ReturnType<typeof typeFamily>;
  values: number;
  nonNull: number;
  /** A few non-empty values as text (for spotting emails and phone numbers). */
  examples: string[];
  /** A number column's least value in the sample (below zero: not an amount to add up). */
  min?: number;
  /** A number column's greatest value in the sample (with min: a year's range, a running number's span). */
  max?: number;
  /** A text column the engine reads as dates, and in which format. */
  textDate?: TextDateReading;
  /** A date column the source itself read from text in a CSV or JSON file (analysis/sources/file-dates.ts), and how. */
  readFromText?: TextDateReading;
}

/** How many distinct (date, breakdown value) pairs the sampled rows hold. */
export interface DateBreakdownCount {
  time: string;
  dimension: string;
  distinct: number;
}

/** How many distinct (date, every breakdown value) cells the sampled rows hold: as many as rows makes each row a cell of already-counted values, not an event. */
export interface DateCellCount {
  time: string;
  breakdowns: string[];
  distinct: number;
  /** Some stamps carry a time of day (a flight's departure): the rows are events, however unique. */
  timeOfDay: boolean;
}

/**
 * How a number column moves from one stamp to the next, with one row per stamp in date order: a
 * stock (a headcount, a balance) moves little for its size and each value stays close to the last;
 * an amount made in a period (sales, births) jumps about.
 */
export interface SeriesSteps {
  /** Stamps (rows) the figures are read over. */
  stamps: number;
  /** Correlation of each value with the one before (lag-1 autocorrelation); null when it cannot be computed. */
  lag1: number | null;
  /** The mean absolute step between stamps as a share of the mean absolute value. */
  relativeStep: number | null;
  /** Columns whose step between stamps this column's values equal (a net change of a level beside it). */
  changeOf: string[];
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
  /** Distinct (date, all breakdowns) cells per date column. */
  cells?: DateCellCount[];
  /** By date column (one row per stamp), by number column: how it moves between stamps. */
  series?: Record<string, Record<string, SeriesSteps>>;
}

/** Reads each column's type, distinct and non-empty counts and a few values, over a sample of rows. */
export async function profileColumns(
  source: DataSource,
  table: string,
): Promise<{ rows: number; columns: ColumnProfile[]; readings: DateBreakdownCount[]; cells: DateCellCount[]; series: Record<string, Record<string, SeriesSteps>> }> {
  const described: TableColumn[] = await source.describe(table);
  const q = quoteIdentifier;
  const text = source.dialect.name === 'postgres' ? 'TEXT' : 'VARCHAR';
  const sample = `(SELECT * FROM ${q(table)} LIMIT ${SAMPLE_ROWS}) AS tc_sample`;
  const double = source.dialect.name === 'postgres' ? 'DOUBLE PRECISION' : 'DOUBLE';
  const parts = described.flatMap((c, i) => [
    `COUNT(DISTINCT ${q(c.name)}) AS d${i}`,
    `COUNT(${q(c.name)}) AS n${i}`,
    ...(typeFamily(c.type) === 'number' ? [`MIN(CAST(${q(c.name)} AS ${double})) AS m${i}`, `MAX(CAST(${q(c.name)} AS ${double})) AS x${i}`] : []),
  ]);
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
    ...(stats[`m${i}`] !== null && stats[`m${i}`] !== undefined ? { min: Number(stats[`m${i}`]) } : {}),
    ...(stats[`x${i}`] !== null && stats[`x${i}`] !== undefined ? { max: Number(stats[`x${i}`]) } : {}),
  }));
  const textDates = await readTextDates(source, table, columns.filter((c) => c.family === 'text' && mayBeDates(c.examples)).map((c) => c.name), SAMPLE_ROWS);
  for (const c of columns) if (textDates[c.name]) c.textDate = textDates[c.name];
  for (const c of columns) if (c.family === 'time' && source.textDates?.[c.name]) c.readFromText = source.textDates[c.name];
  // Rows per date and breakdown value: one row each (a reading per industry per month) says the
  // numbers beside them are readings of a level, not amounts that add up over time.
  const rows = Number(stats.tc_rows ?? 0);
  // A year column counts as a date here: one row per country per year makes its numbers readings too.
  const times = columns.filter((c) => c.family === 'time' || c.textDate || (c.family === 'number' && YEAR.test(catalogNameOf(c.name))));
  const breakdowns = columns.filter((c) => c.family === 'text' && c.values > 1 && isBreakdown(c.values, rows) && !times.includes(c));
  const pairs = times.flatMap((t) => breakdowns.map((d) => ({ time: t.name, dimension: d.name })));
  const pairCounts = pairs.length
    ? (await source.run({ sql: `SELECT ${pairs.map((p, i) => `COUNT(DISTINCT CAST(${q(p.time)} AS ${text}) || '|' || CAST(${q(p.dimension)} AS ${text})) AS p${i}`).join(', ')} FROM ${sample}`, params: [] }, run)).rows[0] ?? {}
    : {};
  // Rows per date and every breakdown together: one row each makes every row a cell of a grid
  // (a shop's takings on one channel on one day), whose count counts cells, not events.
  const cellKey = (t: ColumnProfile) => [t, ...breakdowns].map((c) => `COALESCE(CAST(${q(c.name)} AS ${text}), '')`).join(` || '|' || `);
  // Stamps at many times of day are events' times; dates, years and stamps at one or two times of day
  // (midnight, or a zone's midnight written in UTC: 08:00 in winter, 07:00 in summer) mark cells.
  const timestamp = (t: ColumnProfile) => t.family === 'time' && /timestamp|datetime/i.test(t.type);
  const cellCounts = times.length
    ? (
        await source.run(
          {
            sql: `SELECT ${times.map((t, i) => [`COUNT(DISTINCT ${cellKey(t)}) AS c${i}`, ...(timestamp(t) ? [`COUNT(DISTINCT ${q(t.name)} - date_trunc('day', ${q(t.name)})) AS h${i}`] : [])].join(', ')).join(', ')} FROM ${sample}`,
            params: [],
          },
          run,
        )
      ).rows[0] ?? {}
    : {};
  const cells = times.map((t, i) => ({
    time: t.name,
    breakdowns: breakdowns.map((d) => d.name),
    distinct: Number(cellCounts[`c${i}`] ?? 0),
    timeOfDay: Number(cellCounts[`h${i}`] ?? 0) > 2 || /%[HIMS]/.test(t.textDate?.format ?? ''),
  }));
  const series: Record<string, Record<string, SeriesSteps>> = {};
  for (const t of times) {
    const steps = await seriesSteps(source, sample, t, columns.filter((c) => c.family === 'number' && !times.includes(c)), rows);
    if (steps) series[t.name] = steps;
  }
  return { rows, columns, readings: pairs.map((p, i) => ({ ...p, distinct: Number(pairCounts[`p${i}`] ?? 0) })), cells, series };
}

// Stamps a series needs before its steps say anything (common practice: a year of months).
const SERIES_MIN_STAMPS = 12;
// Change columns tried against the others' steps, at most (each pair is one aggregate in one query).
const CHANGE_PAIRS_MAX = 400;

/** How each number column moves between stamps, when the table has one row per stamp of `time`. */
async function seriesSteps(source: DataSource, sample: string, time: ColumnProfile, numbers: ColumnProfile[], rows: number): Promise<Record<string, SeriesSteps> | undefined> {
  if (time.values !== rows || rows < SERIES_MIN_STAMPS || numbers.length === 0) return undefined;
  const q = quoteIdentifier;
  // Text dates are put in order by the format they were read in (DuckDB's try_strptime); elsewhere text order is no date order.
  const order = time.textDate ? (source.dialect.name === 'duckdb' ? `try_strptime(${q(time.name)}, '${time.textDate.format}')` : undefined) : q(time.name);
  if (!order) return undefined;
  const double = source.dialect.name === 'postgres' ? 'DOUBLE PRECISION' : 'DOUBLE';
  const x = (i: number) => `tc_x${i}`;
  const step = (i: number) => `tc_s${i}`;
  const prev = (i: number) => `tc_p${i}`;
  const lagged = numbers.flatMap((c, i) => [`CAST(${q(c.name)} AS ${double}) AS ${x(i)}`, `LAG(CAST(${q(c.name)} AS ${double})) OVER (ORDER BY ${order}) AS ${prev(i)}`]);
  // A column that goes below zero may be the net change of another: its values against that one's steps.
  const pairs = numbers
    .flatMap((a, i) => (a.min !== undefined && a.min < 0 ? numbers.map((b, j) => [i, j] as const).filter(([, j]) => j !== i) : []))
    .slice(0, CHANGE_PAIRS_MAX);
  const aggregates = [
    'COUNT(*) AS tc_n',
    ...numbers.flatMap((_, i) => [`CORR(${x(i)}, ${prev(i)}) AS r${i}`, `AVG(ABS(${step(i)})) / NULLIF(AVG(ABS(${x(i)})), 0) AS v${i}`]),
    ...pairs.map(([i, j], k) => `AVG(ABS(${x(i)} - ${step(j)})) / NULLIF(AVG(ABS(${x(i)})), 0) AS m${k}`),
  ];
  const sql = `WITH tc_lagged AS (SELECT ${lagged.join(', ')} FROM ${sample}), tc_steps AS (SELECT *, ${numbers.map((_, i) => `${x(i)} - ${prev(i)} AS ${step(i)}`).join(', ')} FROM tc_lagged) SELECT ${aggregates.join(', ')} FROM tc_steps`;
  const r = (await source.run({ sql, params: [] }, { maxRows: 10, timeoutMs: 120_000 })).rows[0] ?? {};
  const num = (v: unknown) => (v === null || v === undefined || !Number.isFinite(Number(v)) ? null : Number(v));
  const out: Record<string, SeriesSteps> = {};
  numbers.forEach((c, i) => {
    // A mean mismatch under 5% of the change's own size (common practice: revised figures differ a little).
    const changeOf = pairs.filter(([a], k) => a === i && (num(r[`m${k}`]) ?? Infinity) <= 0.05).map(([, b]) => numbers[b]!.name);
    out[c.name] = { stamps: Number(r.tc_n ?? 0), lag1: num(r[`r${i}`]), relativeStep: num(r[`v${i}`]), changeOf };
  });
  return out;
}

const EMAIL = /^[^\s@]+@[^\s@]+\.[^\s@]+$/;
const PHONE = /^\+?[\d\s().-]{7,20}$/;
const PERSONAL_NAME = /(^|_)(e_?mail|phone|mobile|telephone|tel|first_?name|last_?name|surname|full_?name|given_?name|family_?name|address|street|postcode|zip_?code|birth_?date|date_?of_?birth|dob|passport|ssn|national_?id)($|_)/;
// Names of people and the people a row is about: personal when they hold many values, or nearly one
// per row (a name per person), unless the name is a thing's (airport_name, product_name).
const PERSON_COLUMN = /(^|_)(name|customer|client|patient|employee|passenger|guest|member|user|username|contact|person|driver|owner|student|buyer|recipient|sender|holder|candidate)$/;
const THING_NAME = /(^|_)(airport|airline|carrier|operator|product|item|company|business|brand|store|shop|branch|city|town|country|state|region|county|district|province|station|stop|port|harbour|harbor|route|line|ship|vessel|aircraft|model|team|department|dept|category|type|species|genre|title|file|host|server|app|project|campaign|event|venue|school|hospital|series|job|course|game|track|song|album|movie|film|show|channel|site|page|industry|sector|plan|service|segment|market|currency|unit|metric|field|column|table)_name$/;
// Values that are keys whatever the column is called: UUIDs and long hexadecimal hashes.
const ID_VALUE = /^([0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}|[0-9a-f]{16,})$/i;
// Readings averaged over time rather than added up (a level, not a flow).
const LEVEL_WORDS = /(^|_)(temp|temperature|level|balance|concentration|co2|ppm|price|index|rate|ratio|pct|percent|share|avg|mean|average|headcount|stock|inventory|population|pressure|humidity|speed|wind|latitude|longitude|lat|lon|lng|score|age|height|weight)($|_|\d)/;
// Amounts that add up over time whatever the data's shape (a flow).
const FLOW_WORDS = /(^|_)(revenue|sales|amount|spend|spent|cost|costs|paid|income|sold|orders|bookings|visits|trips|births|deaths|arrivals|departures|volume|quantity|qty|units|takings|fares|tickets|calls|clicks|views|downloads|generation|generated|production|produced|output|consumption|consumed|usage|emissions|shipments|shipped|deliveries|delivered|purchases|transactions|passengers|mwh|kwh|gwh|tons|tonnes|barrels)($|_|\d)/;
// Money: a sum (or, for a price, an average) with unit currency. The currency comes from a mark or
// code in a column's name ("Cost Total $"), the same for the table's other money columns.
const MONEY_WORDS = /(^|_)(revenue|revenues|sales|amount|amounts|spend|spent|cost|costs|paid|income|price|prices|fare|fares|fee|fees|takings|profit|profits|budget|gross|salary|salaries|wage|wages|payment|payments|receipts|disbursements|refund|refunds|cash|loan|loans|debt|debts|contributions|donations|usd|eur|gbp|dollars|euros)($|_|\d)/;
const CURRENCY_MARKS: readonly [RegExp, string][] = [[/\$/, 'USD'], [/€/, 'EUR'], [/£/, 'GBP'], [/¥/, 'JPY'], [/₹/, 'INR']];
const CURRENCY_CODE = /(^|_)(usd|eur|gbp|jpy|chf|cad|aud|nzd|sek|nok|dkk|inr|cny)($|_)/;
// A value per row that a total would not mean (a flight's delay, a rating, a duration): its mean per row.
// Counts held at a date, which add up across segments but are averaged over time.
const STOCK_WORDS = /(^|_)(headcount|headcounts|stock|inventory|population|employed|unemployed|employment|unemployment|employees|staff|members|subscribers|accounts|enrolled|enrollment|enrolment|residents|beds|fleet)($|_|\d)/;
// A net change per row (jobs added, a balance's delta): a flow whose total nets rises against falls.
const CHANGE_WORDS = /(^|_)(change|changes|chg|net|added|delta|deltas|diff|difference)($|_|\d)/;
// A stock read from its values alone, with one row per stamp: each value correlates at least this well
// with the one before (lag-1 autocorrelation) and a typical step is at most this share of its size
// (common practice, not a published rule: payroll headcounts step about 0.2% a month, CO2 about 0.3%,
// while sales, births or jobs added step 10% or more).
const STEADY_LAG1 = 0.9;
const STEADY_STEP = 0.01;
const PER_ROW_WORDS = /(^|_)(delay|delays|lateness|latency|duration|time|length|wait|waiting|rating|ratings|stars|grade|per|elevation|altitude)($|_|\d)/;

// Units a column's name states ("Speed IAS in knots", "Running Time min"): written after its values.
const UNIT_LABELS: readonly [RegExp, string][] = [
  [/(^|_)(knots|kts|kt)($|_)/, 'kt'],
  [/(^|_)(minutes|mins|min)($|_)/, 'min'],
  [/(^|_)(seconds|secs|sec)($|_)/, 's'],
  [/(^|_)(hours|hrs)($|_)/, 'h'],
  [/(^|_)(km|kilometres|kilometers)($|_)/, 'km'],
  [/(^|_)(miles)($|_)/, 'mi'],
  [/(^|_)(mph)($|_)/, 'mph'],
  [/(^|_)(kg|kilograms)($|_)/, 'kg'],
  [/(^|_)(celsius|degc)($|_)/, '°C'],
  [/(^|_)(fahrenheit|degf)($|_)/, '°F'],
  [/(^|_)(ppm)($|_)/, 'ppm'],
];

/** `unit_label` when the column's name states its unit; nothing otherwise. */
function unitLabelNamed(name: string): { unit_label?: string } {
  const found = UNIT_LABELS.find(([re]) => re.test(name));
  return found ? { unit_label: found[1] } : {};
}

/** The currency a column's name states ("$" read as USD), and what it was read from. */
function currencyNamed(column: string): { code: string; from: string } | undefined {
  for (const [mark, code] of CURRENCY_MARKS) if (mark.test(column)) return { code, from: `"${mark.source.replace(/\\/g, '')}" in ${column}` };
  const code = CURRENCY_CODE.exec(catalogNameOf(column))?.[2];
  return code ? { code: code.toUpperCase(), from: `"${code}" in ${column}` } : undefined;
}

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

// The currency a money column gets when no column names one: said in the notes and the file.
const ASSUMED_CURRENCY = 'USD';
const PERCENT_WORDS = /(^|_)(rate|pct|percent|percentage|share)($|_)/;
const ID_WORDS = /(^|_)(id|key|uuid|code)$/;
// Numbers that name or number things rather than measure them (a flight number, a zip or FIPS code,
// a record id, a district, a group): never added up. Read from the name's last word, or a code word anywhere.
const CODE_NAME_END = /(^|_)(id|ids|key|uuid|code|codes|number|num|no|nr|zip|zipcode|postcode|fips|geoid|district|group|class|category|type|cluster|seq|serial)$/;
const CODE_NAME_ANY = /(^|_)(zip|zipcode|postcode|postal|fips|geoid)($|_)/;
// A year kept as a whole number (budget_year, year_built): a date part. The span is common practice
// for calendar years in business and public data (ruling out counts that merely look like years).
const YEAR_NAME = /(^|_)(year|years|yr|yyyy)($|_)/;
const YEAR_SPAN = [1800, 2100] as const;
// Evidence from values alone (no name): nearly every value differs (common practice: 95%).
const NEARLY_ALL_DISTINCT = 0.95;
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

/**
 * A label for a column. Currency marks are said by the unit ("$1.2M"), not the label; with `unitSaid`
 * a currency code or unit the name ends in (revenue_eur, "Speed IAS in knots") is said by the
 * metric's currency or unit_label instead, so it is dropped from the label too.
 */
function labelOf(column: string, unitSaid = false): string {
  let words = column.replace(/([a-z0-9])([A-Z])/g, '$1 $2').replace(/[$€£¥₹]/g, ' ').replace(/[_\s]+/g, ' ').trim();
  if (unitSaid) {
    const unitWord = (w: string) => CURRENCY_CODE.test(w.toLowerCase()) || UNIT_LABELS.some(([re]) => re.test(w.toLowerCase()));
    const parts = words.split(' ');
    while (parts.length > 1 && unitWord(parts[parts.length - 1]!)) parts.pop();
    if (parts.length > 1 && /^in$/i.test(parts[parts.length - 1]!)) parts.pop();
    words = parts.join(' ');
  }
  return words.charAt(0).toUpperCase() + words.slice(1);
}

/** A text column the engine reads as dates (preferring a name that says so). */
function textDateColumn(columns: ColumnProfile[]): (ColumnProfile & { textDate: TextDateReading }) | undefined {
  const found = columns.filter((c): c is ColumnProfile & { textDate: TextDateReading } => c.family === 'text' && !!c.textDate);
  return found.find((c) => TIME_WORDS.test(catalogNameOf(c.name))) ?? found[0];
}

/** The source's `date_order` a format reads in. */
function dateOrderOf(format: string): 'day_first' | 'month_first' {
  return format.indexOf('%d') < format.indexOf('%m') ? 'day_first' : 'month_first';
}

/**
 * What init read of a text date column, and what it assumed, for the notes and the file. `fix`: how
 * to read the other order (the format to write, or the source's date_order to set).
 */
function textDateSaid(t: TextDateReading, fix: (other: string) => string = (other) => `write ${other}`): string {
  const said = [`text dates read as ${t.format} (${t.read === t.sampled ? `all ${t.sampled}` : `${t.read} of ${t.sampled}`} distinct values sampled${t.read < t.sampled ? '; the others read as no date' : ''})`];
  if (t.dayMonthUnsettled) said.push(`every sampled value has a day and a month of 12 or under, so the data cannot tell day-first from month-first: assumed ${t.format}; if the ${dateOrderOf(t.format) === 'day_first' ? 'month' : 'day'} comes first ${fix(t.dayMonthUnsettled)}`);
  const others = t.others.filter((f) => f !== t.dayMonthUnsettled);
  if (others.length) said.push(`they also fit ${others.join(', ')}: check which the data means`);
  return said.join('; ');
}

export interface Draft {
  config: Record<string, unknown>;
  /** What was guessed, for the person running init. */
  notes: string[];
  /** By metric name: what init guessed about it, written as a comment above it in the file. */
  comments: Record<string, string>;
  /** What init read and assumed about the time column, written above it in the file. */
  timeComment?: string;
  /** By dimension name: why a number column was drafted as a breakdown (a code, a year), above it in the file. */
  dimensionComments: Record<string, string>;
  /** Number columns left out (a year or code with too many values), written above the metrics. */
  leftOutComment?: string;
}

/**
 * What a row is, where the data's name says it: a name that is one plural noun, after any size or
 * year mark ("flights_3m" counts flights, "birdstrikes" birdstrikes). Several words ("unemployment
 * across industries") or a singular ("football", "weather") name the data, not its rows; a column
 * of the same name ("sales" in sales.csv) is the measure, not the rows. English plurals only.
 */
export function rowNoun(datasetName: string, columns: Pick<ColumnProfile, 'name'>[]): string | undefined {
  const words = datasetName.toLowerCase().split(/[_\s]+/).filter((w) => w && !/^\d+[a-z]?$/.test(w));
  if (words.length !== 1) return undefined;
  const w = words[0]!;
  if (!/^[a-z]{3,}s$/.test(w) || /(?:ss|us|is|ics|news)$/.test(w)) return undefined;
  if (columns.some((c) => catalogNameOf(c.name) === w)) return undefined;
  return w;
}

export function draftConfig(input: DraftInput): Draft {
  const notes: string[] = [];
  const used = new Set<string>();
  // "min" is a unit (Running Time min) unless the column is a low beside a high (temp_min beside temp_max) or names a reading.
  const unitLabelOf = (name: string): { unit_label?: string } => {
    const found = unitLabelNamed(name);
    if (found.unit_label !== 'min' || !/(^|_)min$/.test(name)) return found;
    const high = name.replace(/min$/, 'max');
    return LEVEL_WORDS.test(name) || input.columns.some((c) => catalogNameOf(c.name) === high) ? {} : found;
  };
  const unique = (base: string) => {
    let name = base;
    for (let i = 2; used.has(name); i++) name = `${base}_${i}`;
    used.add(name);
    return name;
  };
  const personal = (c: ColumnProfile) =>
    PERSONAL_NAME.test(catalogNameOf(c.name)) ||
    (c.family === 'text' &&
      PERSON_COLUMN.test(catalogNameOf(c.name)) &&
      !THING_NAME.test(catalogNameOf(c.name)) &&
      (c.values > DIMENSION_FEW_VALUES || (input.rows >= 10 && c.values >= input.rows / 2))) ||
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
  let timeComment: string | undefined;
  let dateOrder: 'day_first' | 'month_first' | undefined;
  const timeParts = new Set<string>();
  if (textDate) {
    timeColumn = { expr: `strptime(${columnExpr(textDate.name)}, '${textDate.textDate.format}')` };
    timeParts.add(textDate.name);
    notes.push(`time column: ${textDate.name}, ${textDateSaid(textDate.textDate)}`);
    timeComment = ` drafted by init: ${textDate.name} holds dates as text, ${textDateSaid(textDate.textDate)}`;
  } else if (time?.readFromText) {
    // The source read the file's text dates itself: the order it took is written into the source, where it can be turned round.
    timeColumn = time.name;
    const read = time.readFromText;
    const said = textDateSaid(read, (other) => `set date_order: ${dateOrderOf(other)} in source`);
    if (read.dayMonthUnsettled && (input.source.kind === 'csv' || input.source.kind === 'json')) dateOrder = dateOrderOf(read.format);
    notes.push(`time column: ${time.name}, ${said}`);
    timeComment = ` drafted by init: ${time.name} holds dates as text in the file, ${said}`;
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
  const timeName = textDate?.name ?? time?.name ?? (timeColumn !== 'FILL_IN' && !month ? year?.name : undefined);
  const dateValues = input.columns.find((c) => c.name === timeName)?.values ?? 0;
  const panel = input.readings?.find((r) => r.time === timeName && r.distinct === input.rows && dateValues > 0 && dateValues < input.rows);
  // Said above each metric in the file, where the person reviews it (never in a description, which
  // requesters read in charts and in "what can you measure?").
  const comments: Record<string, string> = {};
  // The rows are named for what the file says a row is: a file or table named by one plural noun
  // ("flights", "birdstrikes") counts those. Nothing else names them, so the plain label stays and
  // the comment asks for the right word: it is what requesters will say ("how many matches").
  const noun = rowNoun(input.datasetName, input.columns);
  const rowsName = unique(noun ?? 'rows');
  comments[rowsName] = noun
    ? ` drafted by init: the number of rows, each read as one of the ${noun} the ${input.table ? 'table' : 'file'} is named for (rename it if a row is something else)`
    : ' drafted by init: the number of rows; nothing in the file says what a row is: rename the label (and name) to it, e.g. Orders or Visits, and add the word to also_called';
  const rowsMetric: Record<string, unknown> = { name: rowsName, label: noun ? labelOf(noun) : 'Rows', also_called: noun ? [noun.replace(/_/g, ' ')] : [], count: 'rows', unit: 'count', kind: 'flow' };
  const metrics: Record<string, unknown>[] = [rowsMetric];
  // One row per date and breakdown cell (a shop's channel on a day, or one row per month): the rows
  // hold figures already counted, so a count of rows counts cells, not events.
  // A grid's cells are mostly filled (every industry each month); rows that are unique only because
  // they pair rare values (a match: a date, a home team and an away team of 116) fill a tiny share of
  // date × every breakdown, and are events. A tenth filled is our own line, not a published rule.
  const gridCells = (x: DateCellCount) => (input.columns.find((c) => c.name === x.time)?.values ?? 0) * x.breakdowns.reduce((n, b) => n * Math.max(1, input.columns.find((c) => c.name === b)?.values ?? 1), 1);
  const cell = input.cells?.find((x) => x.time === timeName && x.distinct === input.rows && input.rows > 1 && !x.timeOfDay && input.rows >= 0.1 * gridCells(x));
  // How each number column moves between dates, when the data has one row per date.
  const steps = timeName ? input.series?.[timeName] : undefined;
  const steady = (c: ColumnProfile) => {
    const s = steps?.[c.name];
    return s && s.stamps >= SERIES_MIN_STAMPS && s.lag1 !== null && s.lag1 >= STEADY_LAG1 && s.relativeStep !== null && s.relativeStep <= STEADY_STEP ? s : undefined;
  };
  const dimensions: Record<string, unknown>[] = [];
  const dimensionComments: Record<string, string> = {};
  const leftOutCodes: string[] = [];
  let keyColumn: string | undefined;
  const moneyMetrics: string[] = [];
  // Money columns share the currency a name states ("Cost Total $"); without one it is assumed, and said.
  const isMoney = (c: ColumnProfile) => c.family === 'number' && (MONEY_WORDS.test(catalogNameOf(c.name)) || !!currencyNamed(c.name));
  const tableCurrency = input.columns.filter(isMoney).map((c) => currencyNamed(c.name)).find(Boolean);
  // Rows per time value: about one is a reading per date (a level); many are events, whose values are averaged per row.
  const timeValues = input.columns.find((c) => c.name === timeName)?.values ?? 0;
  const eventsPerStamp = timeValues > 0 && input.rows / timeValues > 1.5;
  const leftOutText: string[] = [];
  const numericText: string[] = [];
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
    // Years, identifiers and codes kept as numbers: a breakdown when few, else counted distinct or
    // left out; never a sum.
    const code = codeOf(c);
    const idLike = !!code || ID_WORDS.test(name) || (c.values === input.rows && input.rows > 100 && c.family !== 'number');
    if (idLike) {
      const why = code?.why ?? 'an identifier or code (its name or its values say so)';
      if (isBreakdown(c.values, input.rows)) {
        const dimensionName = unique(name);
        dimensions.push({ name: dimensionName, label: labelOf(c.name), also_called: [], column: c.name });
        dimensionComments[dimensionName] = ` drafted by init: ${why}, so a breakdown, never added up`;
      } else if (code?.kind === 'year') {
        leftOutCodes.push(`${c.name} (${why}, with too many values for a breakdown)`);
      } else if (!keyColumn && c.values === c.nonNull && c.values === input.rows) {
        keyColumn = c.name;
      } else {
        const metricName = unique(`distinct_${name}`);
        comments[metricName] = ` drafted by init: ${c.name} is ${why}, so counted distinct, never added up`;
        metrics.push({ name: metricName, label: `Distinct ${labelOf(c.name).toLowerCase()}`, also_called: [], count_distinct: columnExpr(c.name), unit: 'count', kind: 'flow' });
      }
      continue;
    }
    if (c.family === 'boolean') {
      metrics.push({ name: unique(`${name}_rate`), label: `${labelOf(c.name)} rate`, also_called: [], rate: { when: { column: c.name, is: true } }, unit: 'percent', ...directionOf(name), kind: 'ratio' });
      continue;
    }
    if (c.family === 'number') {
      // Whole numbers with a handful of values (a weekday, a category code) are a breakdown, not an
      // amount, unless the name says amount or money.
      const wholeNumbers = c.examples.every((v) => /^-?\d+$/.test(v));
      if (c.values > 0 && c.values <= 7 && input.rows > 50 && wholeNumbers && !isMoney(c) && !FLOW_WORDS.test(name)) {
        dimensions.push({ name: unique(name), label: labelOf(c.name), also_called: [], column: c.name });
        continue;
      }
      // A currency code or unit the name ends in (revenue_eur) is said by currency or unit_label: not in the name either.
      const unitSaid = isMoney(c) || !!unitLabelOf(name).unit_label;
      const metricName = unique(unitSaid ? catalogNameOf(labelOf(c.name, true)) : name);
      // A rate or share: percent, as a fraction (0.021) or, when its values are mostly above 1.5
      // and at most 100, as points (2.1) divided by 100 so that it shows as 2.1%.
      const numbers = c.examples.map(Number).filter((v) => Number.isFinite(v));
      const share = PERCENT_WORDS.test(name) && numbers.length > 0 && numbers.every((v) => v >= 0 && v <= 100);
      const points = share && numbers.filter((v) => v > 1.5).length > numbers.length / 2;
      if (share && (points || numbers.every((v) => v <= 1.5))) {
        comments[metricName] = points
          ? ` drafted by init: a percentage; its values are percent points (${numbers[0]} for ${numbers[0]}%), so divided by 100 (unit: percent reads 0.021 as 2.1%), averaged over time`
          : ` drafted by init: a percentage written as a fraction (0.021 for 2.1%), averaged over time`;
        // Across a breakdown the mean of the rows' rates weights every row alike, which is not the
        // overall rate when the rows' bases differ (a large industry and a small one).
        if (panel) comments[metricName] += `; across ${panel.dimension} it is the plain mean of the rows' rates, not weighted by their size: for the overall rate, define a ratio of two sums (of: part, per: base) if the data holds both`;
        metrics.push({ name: metricName, label: labelOf(c.name), also_called: [], average: points ? `${columnExpr(c.name)} / 100` : columnExpr(c.name), unit: 'percent', ...directionOf(name), kind: 'level' });
        continue;
      }
      const { how, kind, why } = howItAddsUp(c, name);
      comments[metricName] = ` drafted by init: ${why}`;
      const money = isMoney(c);
      if (money) {
        const own = currencyNamed(c.name) ?? tableCurrency;
        comments[metricName] += own ? `; money in ${own.code}, read from ${own.from}` : `; money (its name says so) in ${ASSUMED_CURRENCY}, assumed: no column names its currency, so set currency`;
        moneyMetrics.push(metricName);
      }
      const currency = money ? { currency: (currencyNamed(c.name) ?? tableCurrency)?.code ?? ASSUMED_CURRENCY } : {};
      const unitLabel = money ? {} : unitLabelOf(name);
      // Whole numbers added up (orders, items, a headcount) count things: unit count.
      const counted = !money && how === 'sum' && !unitLabel.unit_label && wholeNumbers && c.examples.length > 0;
      metrics.push({ name: metricName, label: labelOf(c.name, unitSaid), also_called: [], [how]: columnExpr(c.name), unit: money ? 'currency' : counted ? 'count' : 'number', ...currency, ...unitLabel, ...directionOf(name), kind });
      continue;
    }
    if (c.family !== 'text' || c.values === 0) continue;
    if (numbersAsText(c) && (c.values > 7 || MONEY_WORDS.test(name) || FLOW_WORDS.test(name))) {
      numericText.push(c.name);
    } else if (isBreakdown(c.values, input.rows) && !freeText(c) && !c.examples.every((v) => ID_VALUE.test(v))) {
      dimensions.push({ name: unique(name), label: labelOf(c.name), also_called: [], column: c.name });
    } else {
      leftOutText.push(`${c.name} (${c.values.toLocaleString('en')} value${c.values === 1 ? '' : 's'}${freeText(c) ? ', free text' : ''})`);
    }
  }
  if (cell && metrics.some((m) => m !== rowsMetric && (m.sum !== undefined || m.average !== undefined))) {
    metrics.splice(metrics.indexOf(rowsMetric), 1);
    delete comments[rowsName];
    const per = cell.breakdowns.length ? `${[cell.time, ...cell.breakdowns].join(' × ')} cell` : cell.time;
    notes.push(`no count of rows: the data has one row per ${per}, holding figures already counted, so a count of rows would count ${cell.breakdowns.length ? 'cells' : `${cell.time}s`}, not events (add {name: rows, count: rows, kind: flow} if each row is an event)`);
  }
  if (leftOutCodes.length) notes.push(`left out (numbers that are not amounts): ${leftOutCodes.join(', ')}`);
  if (numericText.length) notes.push(`left out (numbers written as text: add a metric over CAST(column AS DOUBLE) if they are amounts): ${numericText.join(', ')}`);
  if (leftOutText.length) notes.push(`left out (one value only, too many values in ${input.rows.toLocaleString('en')} rows for a breakdown, or free text): ${leftOutText.join(', ')}`);
  if (moneyMetrics.length) notes.push(`money (unit currency): ${moneyMetrics.join(', ')}, in ${tableCurrency ? `${tableCurrency.code} (read from ${tableCurrency.from})` : `${ASSUMED_CURRENCY}, assumed (no column names its currency): set currency`}`);
  const dataset: Record<string, unknown> = {
    name: input.datasetName,
    label: input.label,
    source: dateOrder ? { ...input.source, date_order: dateOrder } : input.source,
    ...(input.table ? { table: input.table } : {}),
    time_column: timeColumn,
    timezone: 'UTC',
    ...(keyColumn ? { key_column: keyColumn } : {}),
    metrics,
    dimensions,
  };
  notes.push(`metrics: ${metrics.map((m) => `${String(m.name)} (${String(m.kind)})`).join(', ')}`);
  notes.push(`dimensions: ${dimensions.map((d) => String(d.name)).join(', ') || 'none'}`);
  return {
    config: { version: 1, datasets: [dataset] },
    notes,
    comments,
    dimensionComments,
    ...(leftOutCodes.length ? { leftOutComment: ` left out by init (numbers that are not amounts; add a dimension if you need one): ${leftOutCodes.join(', ')}` } : {}),
    ...(timeComment ? { timeComment } : {}),
  };

  /** Sum, or average, and why: said above the metric in the file. */
  function howItAddsUp(c: ColumnProfile, name: string): { how: 'sum' | 'average'; kind: 'flow' | 'level' | 'ratio'; why: string } {
    const flow = FLOW_WORDS.test(name) || MONEY_WORDS.test(name) || !!currencyNamed(c.name);
    // Counts of people or things held at a date (a headcount, the unemployed per industry per
    // month) add up across the breakdown on one date but not over time: a sum of kind level, which
    // totals each date and averages the dates of a period (a year is its mean monthly total).
    const wholeCounts = c.examples.length > 0 && c.examples.every((v) => /^\d+$/.test(v.trim())) && (c.min === undefined || c.min >= 0);
    const stockName = STOCK_WORDS.test(name);
    // A net change per row (jobs added in a month): the period's change is the rows' sum, rises
    // netted against falls, which is what a net change over a period means. Read from the data when
    // its values are the steps of another column, else from a name that says change with values
    // going both ways.
    const changeOf = steps?.[c.name]?.changeOf ?? [];
    const changeWord = CHANGE_WORDS.exec(name)?.[2];
    if (!flow && c.min !== undefined && c.min < 0 && (changeOf.length > 0 || changeWord)) {
      const evidence = changeOf.length
        ? `its values are the step from one ${timeName} to the next of ${changeOf.join(', ')}`
        : `its name says so ("${changeWord}")`;
      return { how: 'sum', kind: 'flow', why: `a net change in each row, added up over time: ${evidence}, and its values go both ways (${c.min} to ${c.max}), so a period's change is the sum of its rows, rises netted against falls (make it average and kind: ratio if each row is a rate of change)` };
    }
    if ((panel || !eventsPerStamp) && !flow && (stockName || (panel && wholeCounts && !LEVEL_WORDS.test(name)))) {
      const per = panel ? `one row per ${panel.dimension} per ${panel.time}` : `one row per ${timeName}`;
      return { how: 'sum', kind: 'level', why: `a level held at each ${timeName} (${stockName ? 'its name reads as a count held, such as a headcount' : 'whole numbers, read as a count of people or things'}): the data has ${per}, so it is totalled on each ${timeName} and averaged over the ${timeName}s of a period (make it average if a total across rows means nothing, such as a temperature; sum and kind: flow if it adds up over time)` };
    }
    // One row per date and a value that moves slowly for its size: a stock (a headcount, a balance)
    // held at each date, not an amount made in it. Named readings (a price, a temperature) stay averages below.
    const held = !flow && !eventsPerStamp && !LEVEL_WORDS.test(name) && !PER_ROW_WORDS.test(name) ? steady(c) : undefined;
    if (held) {
      const pct = `${(held.relativeStep! * 100).toFixed(held.relativeStep! < 0.001 ? 2 : 1)}%`;
      return {
        how: 'sum',
        kind: 'level',
        why: `a level held at each ${timeName}: the data has one row per ${timeName} and ${c.name} moves slowly for its size (each value correlates ${held.lag1!.toFixed(3)} with the one before over ${held.stamps} ${timeName}s; a typical step is ${pct} of its size), as a stock such as a headcount or a balance does, not an amount made in each ${timeName}: so it is taken on each ${timeName} and averaged over the ${timeName}s of a period (sum and kind: flow if it adds up over time)`,
      };
    }
    if (LEVEL_WORDS.test(name) && (panel || !eventsPerStamp)) return { how: 'average', kind: 'level', why: 'a level (its name reads as a reading), averaged over time' };
    if (LEVEL_WORDS.test(name)) return { how: 'average', kind: 'ratio', why: `a value per row (its name reads as a reading; the data has ${(input.rows / timeValues).toFixed(1)} rows per ${timeName} on average, so the mean per row), averaged over the rows` };
    // A reading per breakdown value per date adds up across values on one date, never over time:
    // drafted as its average (a year is the mean of its readings), unless its name says amount.
    if (panel && !flow) return { how: 'average', kind: 'level', why: `a level, averaged over time: the data has one row per ${panel.dimension} per ${panel.time}, so ${c.name} reads as a reading, not an amount (make it sum and kind: flow if it adds up over time)` };
    if (PER_ROW_WORDS.test(name) && !flow) return { how: 'average', kind: 'ratio', why: 'a value per row (its name reads as one: a delay, a duration, a time taken, a rating), averaged over the rows; a total would mean little (make it sum and kind: flow if it adds up)' };
    if (c.min !== undefined && c.min < 0 && !flow) return { how: 'average', kind: 'ratio', why: `a value per row averaged over the rows: its values go below zero (down to ${c.min}), so a total would net highs against lows (make it sum and kind: flow if it adds up)` };
    return { how: 'sum', kind: 'flow', why: 'a flow, added up over time (make it average and kind: level if it is a reading such as a balance)' };
  }
}

/** Why a number column names or numbers things rather than measures them, if it does. */
export interface CodeReading {
  kind: 'year' | 'code';
  why: string;
}

/** A whole-number column that is a year, an identifier or a code, read from its name and values. */
export function codeOf(c: ColumnProfile): CodeReading | undefined {
  if (c.family !== 'number' || c.examples.length === 0 || !c.examples.every((v) => /^-?\d+$/.test(v.trim()))) return undefined;
  const name = catalogNameOf(c.name);
  const span = c.min !== undefined && c.max !== undefined ? `${c.min} to ${c.max}` : undefined;
  if (YEAR_NAME.test(name) && span && c.min! >= YEAR_SPAN[0] && c.max! <= YEAR_SPAN[1]) return { kind: 'year', why: `a year (${span}), a part of a date` };
  if (CODE_NAME_END.test(name) || CODE_NAME_ANY.test(name)) return { kind: 'code', why: `an identifier or code (its name says so; ${c.values.toLocaleString('en')} values)` };
  // Values alone: a running number (row 0, 1, 2, ...: nearly every value differs and they fill
  // their span), never for a column whose name reads as an amount. Distinct values of the same width
  // are no evidence on their own: monthly employment in thousands is all 4-5 digit numbers.
  if (FLOW_WORDS.test(name) || MONEY_WORDS.test(name) || !span || c.min! < 0) return undefined;
  const distinct = c.nonNull >= 20 && c.values >= c.nonNull * NEARLY_ALL_DISTINCT;
  if (distinct && c.max! - c.min! + 1 <= c.values * 1.1) return { kind: 'code', why: `a running number (${c.values.toLocaleString('en')} values, nearly all different, filling ${span})` };
  return undefined;
}

/** Text whose values are all plain numbers ("0", "3500"): amounts stored as text, not labels (a code with a leading zero stays a label). */
function numbersAsText(c: ColumnProfile): boolean {
  return c.examples.length > 0 && c.examples.every((v) => /^-?(0|[1-9]\d*)(\.\d+)?$/.test(v.trim()));
}

/** Text that reads as sentences rather than labels: long, or many words (common practice: labels are short). */
function freeText(c: ColumnProfile): boolean {
  const middle = <T>(xs: T[]) => xs[Math.floor(xs.length / 2)];
  const lengths = c.examples.map((v) => v.length).sort((a, b) => a - b);
  const words = c.examples.map((v) => v.trim().split(/\s+/).length).sort((a, b) => a - b);
  return c.examples.length > 0 && ((middle(lengths) ?? 0) > 40 || (middle(words) ?? 0) > 6);
}
