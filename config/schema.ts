// The typed config every module reads. The file's own shape (config/file-schema.ts) is parsed
// once at start-up and turned into these objects by config/normalise.ts; everything else receives
// the typed object and never reads YAML or process.env itself.
import { z } from 'zod';
import type { Expr } from './expression.js';

/** A column or table name as the engine has it: any characters (every identifier is quoted in SQL). */
const identifier = z.string().min(1).max(300);
/** A name threadcount itself creates (the shared state's schema): letters, digits, underscore. */
const plainIdentifier = z
  .string()
  .regex(/^[A-Za-z_][A-Za-z0-9_]*$/, 'must be a plain name (letters, digits, underscore)');
export const catalogName = z
  .string()
  .regex(/^[a-z][a-z0-9_]*$/, 'must be lower_snake_case (letters, digits, underscore)');

export const filterSchema = z
  .object({
    column: identifier,
    op: z.enum(['eq', 'ne', 'in', 'gt', 'gte', 'lt', 'lte', 'is_true', 'is_false']),
    value: z.union([z.string(), z.number(), z.boolean(), z.array(z.union([z.string(), z.number()]))]).optional(),
  })
  .strict();
export type ColumnFilter = z.infer<typeof filterSchema>;

export const metricDefinitionSchema = z.discriminatedUnion('type', [
  z.object({ type: z.literal('sum'), column: identifier, where: filterSchema.optional() }).strict(),
  z.object({ type: z.literal('count'), where: filterSchema.optional() }).strict(),
  z.object({ type: z.literal('distinct_count'), column: identifier, where: filterSchema.optional() }).strict(),
  // quantile: set only inside a run, when the request named a statistic (analysis/statistic.ts); never in a file.
  z.object({ type: z.literal('average'), column: identifier, where: filterSchema.optional(), quantile: z.number().gt(0).lt(1).optional() }).strict(),
  // A ratio of two catalog metrics, computed as a ratio of their aggregates at every grain.
  z.object({ type: z.literal('ratio'), numerator: catalogName, denominator: catalogName }).strict(),
  // The share of rows (or of a base metric) that pass a filter.
  z.object({ type: z.literal('rate'), where: filterSchema, of: catalogName.optional() }).strict(),
]);
export type MetricDefinition = z.infer<typeof metricDefinitionSchema>;

export const unitSchema = z.enum(['currency', 'count', 'percent', 'number']);
export type Unit = z.infer<typeof unitSchema>;

/** The short name of a metric's unit, written after its values: "355 ppm". */
export const unitLabelSchema = z.string().trim().min(1).max(16).regex(/^[^\d\n]+$/, 'must be a short unit name without digits (e.g. ppm, °C, kg)');

/**
 * What kind of quantity a metric is, which decides how it rolls up to a coarser grain and how its
 * growth and seasonality are stated: a `flow` sums over time (revenue, bookings); a `level` is a
 * reading averaged over time (a concentration, a balance, a headcount); a `ratio` is a ratio or a
 * rate. Optional in the file: analysis/catalog.ts `metricKind` infers it from the definition.
 */
export const metricKindSchema = z.enum(['flow', 'level', 'ratio']);
export type MetricKind = z.infer<typeof metricKindSchema>;

export const metricSchema = z
  .object({
    name: catalogName,
    label: z.string().min(1),
    synonyms: z.array(z.string().min(1)).default([]),
    description: z.string().optional(),
    definition: metricDefinitionSchema,
    unit: unitSchema,
    currency: z.string().length(3).optional(),
    decimals: z.number().int().min(0).max(6).optional(),
    // Written after every value of a count or number ("ppm", "°C", "staff"): see analysis/format.ts.
    unit_label: unitLabelSchema.optional(),
    higher_is_better: z.boolean().optional(),
    kind: metricKindSchema.optional(),
  })
  .strict();
export type Metric = z.infer<typeof metricSchema> & {
  /**
   * Read from the data once per dataset, never written in a file (the schema is strict): the
   * metric's daily value, over the whole data or one breakdown value's rows, went below
   * zero (an average delay on a day of early flights). Set by analysis/workspace.ts from the
   * coverage (analysis/coverage.ts readSigns); catalog.ts metricPercentScale consults it.
   */
  readonly reachesZero?: boolean;
  /**
   * Read from the data once per dataset, never written in a file: for a level averaged across rows
   * (a price, a temperature), each breakdown's members as readings of their own (analysis/coverage.ts
   * readOwnLevels); catalog.ts ownLevelDimension decides from it whether the members are entities.
   */
  readonly ownLevels?: readonly OwnLevelsReading[];
};

/** One breakdown's members as the data holds them, for a level metric (see Metric.ownLevels). */
export interface OwnLevelsReading {
  dimension: string;
  /** Distinct stamps of the time column with a row of any member. */
  stamps: number;
  members: readonly { value: string; cells: number; single: number; first: string; last: string; median: number | null }[];
}

export const dimensionSchema = z
  .object({
    name: catalogName,
    column: identifier,
    label: z.string().min(1),
    synonyms: z.array(z.string().min(1)).default([]),
    // Personal data: never grouped by, never filtered on in output, never shown.
    personal_data: z.boolean().default(false),
    // The words people use for values of this column: { "Mainland–Saltreach": [the reach, saltreach run] }.
    value_names: z.record(z.string().min(1), z.array(z.string().min(1))).optional(),
  })
  .strict();
export type Dimension = z.infer<typeof dimensionSchema>;

export const comparisonGroupSchema = z
  .object({
    name: catalogName,
    label: z.string().min(1),
    synonyms: z.array(z.string().min(1)).default([]),
    column: identifier,
    // Labels for the rows where the column is true and false.
    members_label: z.string().min(1),
    others_label: z.string().min(1),
    launch_date: z.iso.date().optional(),
    // Customer key used for per-customer frequency comparisons.
    unit_column: identifier.optional(),
  })
  .strict();
export type ComparisonGroup = z.infer<typeof comparisonGroupSchema>;

export const eventSchema = z
  .object({
    name: z.string().min(1),
    from: z.iso.date(),
    to: z.iso.date(),
    // Other words for it ("the storm", "storm closures").
    synonyms: z.array(z.string().min(1)).default([]),
  })
  .strict()
  .refine((e) => e.from <= e.to, { message: 'an event must not end before it starts', path: ['to'] });
export type EventConfig = z.infer<typeof eventSchema>;

/** The name of an environment variable that holds a secret (a URL with a password). */
const envVarName = z.string().regex(/^[A-Z_][A-Z0-9_]*$/, 'must be the name of an environment variable (upper case letters, digits, underscore)');

/** DuckDB's memory limit as written in the config: "2GB", "512MiB". */
export const memoryLimitSchema = z.string().regex(/^\d+(\.\d+)?\s*(KB|MB|GB|TB|KiB|MiB|GiB|TiB)$/i, 'must be an amount of memory such as 512MB or 2GB');

/**
 * Which comes first in a CSV or JSON file's dates written as text ("03-12-2001") when no value has a
 * day above 12 to settle it (analysis/sources/file-dates.ts); values that settle it win.
 */
export const dateOrderSchema = z.enum(['day_first', 'month_first']);
export type DateOrder = z.infer<typeof dateOrderSchema>;

export const sourceSchema = z.discriminatedUnion('kind', [
  // A table or view in a DuckDB file. `memory_limit` (on any embedded source) bounds this
  // dataset's engine instead of engine.memory_limit.
  z.object({ kind: z.literal('duckdb'), path: z.string().min(1), memory_limit: memoryLimitSchema.optional() }).strict(),
  // Files read in place; each path may be a glob (data/*.csv).
  z.object({ kind: z.literal('csv'), paths: z.array(z.string().min(1)).min(1), memory_limit: memoryLimitSchema.optional(), date_order: dateOrderSchema.optional() }).strict(),
  z.object({ kind: z.literal('parquet'), paths: z.array(z.string().min(1)).min(1), memory_limit: memoryLimitSchema.optional() }).strict(),
  z.object({ kind: z.literal('json'), paths: z.array(z.string().min(1)).min(1), memory_limit: memoryLimitSchema.optional(), date_order: dateOrderSchema.optional() }).strict(),
  // A PostgreSQL warehouse. Its URL holds a password, so the file names only the environment
  // variable that holds it (read once at start by config/environment.ts).
  z
    .object({
      kind: z.literal('postgres'),
      url_env: envVarName,
      schema: identifier.optional(),
    })
    .strict(),
]);
export type SourceConfig = z.infer<typeof sourceSchema>;

// How the data-quality checks treat a large table (see analysis/quality/).
export const qualitySchema = z
  .object({
    // Repeated keys: counted over every key (full), over a fixed 1-in-16 sample of keys and scaled
    // up (sampled: the caveat says it is an estimate), or not at all (off). auto: full up to
    // full_key_count_max_rows rows, sampled beyond.
    duplicate_keys: z.enum(['auto', 'full', 'sampled', 'off']).default('auto'),
    full_key_count_max_rows: z.number().int().min(0).default(20_000_000),
    // A column whose largest value moves whenever the data changes (a load time, an updated_at):
    // on PostgreSQL its maximum tells whether the data changed since the last check, instead of
    // the table's write counters. Index it: the check reads its maximum on every run.
    freshness_column: identifier.optional(),
  })
  .strict();
export type QualityConfig = z.infer<typeof qualitySchema>;

export const datasetSchema = z
  .object({
    name: catalogName,
    label: z.string().min(1),
    source: sourceSchema,
    table: identifier,
    time_column: identifier,
    timezone: z.string().refine(isKnownTimeZone, 'is not an IANA time zone name (e.g. Europe/Dublin)'),
    key_column: identifier.optional(),
    // Amount columns that should never be negative; negatives are reported as a data-quality caveat.
    amount_columns: z.array(identifier).default([]),
    metrics: z.array(metricSchema).min(1),
    dimensions: z.array(dimensionSchema).default([]),
    comparison_groups: z.array(comparisonGroupSchema).default([]),
    // Small-group suppression: a segment or comparison group with fewer rows than this is never
    // shown on its own (segments join "All others"; a group reads "too few to show"). 0 = off.
    min_group_size: z.number().int().min(0).max(1_000_000).optional(),
    // Columns the config computes from the table's own (expressions, a date from parts, a group
    // defined by values): the rows every query reads carry them under these names (see
    // analysis/compile-context.ts datasetRelation). Absent when the config names only columns.
    derived: z.array(z.custom<DerivedColumn>()).optional(),
    quality: qualitySchema.optional(),
    // Named stretches of time a request may mention ("during the storm week").
    events: z.array(eventSchema).default([]),
    // Which half of the world the seasons of "this summer" are counted in.
    hemisphere: z.enum(['north', 'south']).default('north'),
  })
  .strict();
export type DatasetConfig = z.infer<typeof datasetSchema>;

/** A column computed from the table's columns; `name` is the expression's canonical text. */
export interface DerivedColumn {
  name: string;
  expr: Expr;
  /** What it is for, so a problem with it is named in the user's terms (e.g. `metrics[2].sum`). */
  key: string;
}

export const engineSchema = z
  .object({
    threads: z.number().int().min(1).max(256).optional(),
    // DuckDB's memory limit; when unset, a share of the machine's (see analysis/sources/duckdb-source.ts).
    memory_limit: memoryLimitSchema.optional(),
    statement_timeout_ms: z.number().int().min(100).default(60_000),
    max_result_rows: z.number().int().min(10).max(1_000_000).default(10_000),
  })
  .strict();
export type EngineConfig = z.infer<typeof engineSchema>;

export const chartsSchema = z
  .object({
    width: z.number().int().min(320).max(4000).default(1200),
    height: z.number().int().min(200).max(4000).default(675),
    scale: z.union([z.literal(1), z.literal(2)]).default(1),
    locale: z.string().default('en-IE'),
  })
  .strict();
export type ChartsConfig = z.infer<typeof chartsSchema>;

// Conversations, post keys, the audit log, the local channel's threads and the queue of runs in
// PostgreSQL, shared by every replica of the bot that names the same database. Its URL holds a
// password, so the file names only the environment variable that holds it.
export const sharedStateSchema = z
  .object({
    kind: z.literal('postgres'),
    url_env: envVarName,
    // The schema of the bot's tables; the queue's tables go in "<schema>_queue".
    schema: plainIdentifier.default('threadcount'),
    // Runs one replica works on at once.
    runs_per_replica: z.number().int().min(1).max(16).default(2),
    // A run still going after this long is taken as lost with its replica and retried by another:
    // set it well above the longest run (the queue allows under 24 hours).
    run_expiry_seconds: z.number().int().min(5).max(86_399).default(900),
    // Attempts after the first, for runs whose replica died or that failed outright.
    run_retries: z.number().int().min(0).max(20).default(3),
    // How often one of the replicas looks for runs past their expiry.
    expiry_check_seconds: z.number().int().min(1).max(3600).default(30),
  })
  .strict();
export type SharedStateConfig = z.infer<typeof sharedStateSchema>;

export const conversationSchema = z
  .object({
    // Where conversations are kept between restarts (an embedded DuckDB file), relative to the config.
    state_path: z.string().min(1).default('threadcount-state.duckdb'),
    // Set for several replicas: the state in PostgreSQL instead of the file above.
    state: sharedStateSchema.optional(),
    remind_after_minutes: z.number().int().min(1).default(240),
    deadline_warning_hours: z.number().int().min(1).default(24),
    // Sub-question jobs that may run at once across all threads.
    max_concurrent_jobs: z.number().int().min(1).max(32).default(2),
  })
  .strict();
export type ConversationConfig = z.infer<typeof conversationSchema>;

// Which datasets each chat channel may use. A channel key is "local", "slack:<channel id>" or
// "discord:<guild id>:<channel id>"; `match` is a glob on it (* any run of characters, ? one).
// The first rule that matches decides; a channel no rule matches gets `default_datasets`.
// Without an `access` section every channel may use every dataset.
export const accessRuleSchema = z
  .object({
    match: z.string().min(1),
    datasets: z.array(catalogName),
  })
  .strict();
export type AccessRule = z.infer<typeof accessRuleSchema>;

export const accessSchema = z
  .object({
    channels: z.array(accessRuleSchema).default([]),
    default_datasets: z.array(catalogName).default([]),
  })
  .strict();
export type AccessConfig = z.infer<typeof accessSchema>;

export const configSchema = z
  .object({
    version: z.literal(1),
    datasets: z.array(datasetSchema).min(1),
    engine: engineSchema.default({ statement_timeout_ms: 60_000, max_result_rows: 10_000 }),
    charts: chartsSchema.default({ width: 1200, height: 675, scale: 1, locale: 'en-IE' }),
    conversation: conversationSchema.default({
      state_path: 'threadcount-state.duckdb',
      remind_after_minutes: 240,
      deadline_warning_hours: 24,
      max_concurrent_jobs: 2,
    }),
    access: accessSchema.optional(),
  })
  .strict();
export type Config = z.infer<typeof configSchema>;

export function isKnownTimeZone(zone: string): boolean {
  try {
    new Intl.DateTimeFormat('en', { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}
