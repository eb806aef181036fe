// The config file's own shape, as people write it. config/normalise.ts turns a parsed file into
// the typed objects of config/schema.ts that the rest of the code reads.
//
// A metric says how it adds up with one key: `sum`, `count`, `count_distinct` or `average` (each an
// expression over columns, `count: rows` for rows), `ratio: {of, per}` (two metrics) or
// `rate: {when, of}` (the share of rows, or of a metric, where a condition holds); `when` narrows
// the rows a sum, count or average reads. A condition is an expression (`"channel = 'web'"`) or a
// test written in words: `{column, is | is_not | one_of | above | at_least | below | at_most}`.
// The earlier keys (`definition`, `synonyms`, `op`) still load for one release, with a warning.
import { z } from 'zod';
import {
  accessSchema,
  catalogName,
  chartsSchema,
  conversationSchema,
  engineSchema,
  memoryLimitSchema,
  isKnownTimeZone,
  metricKindSchema,
  qualitySchema,
  sourceSchema as internalSourceSchema,
  dateOrderSchema,
  unitSchema,
  unitLabelSchema,
} from './schema.js';

const text = z.string().min(1);
const columnName = z.string().min(1).max(300);
const scalar = z.union([z.string(), z.number(), z.boolean()]);

/** A test on one column, in words. Exactly one of the test keys (checked in normalise.ts). */
export const fileFilterSchema = z
  .object({
    column: columnName,
    is: scalar.optional(),
    is_not: scalar.optional(),
    one_of: z.array(z.union([z.string(), z.number()])).optional(),
    above: z.number().optional(),
    at_least: z.number().optional(),
    below: z.number().optional(),
    at_most: z.number().optional(),
    // Before the words: { column, op: eq|ne|in|gt|gte|lt|lte|is_true|is_false, value }.
    op: z.enum(['eq', 'ne', 'in', 'gt', 'gte', 'lt', 'lte', 'is_true', 'is_false']).optional(),
    value: z.union([scalar, z.array(z.union([z.string(), z.number()]))]).optional(),
  })
  .strict();
export type FileFilter = z.infer<typeof fileFilterSchema>;

/** A condition: an expression over columns, or a test in words. */
export const fileConditionSchema = z.union([text, fileFilterSchema]);
export type FileCondition = z.infer<typeof fileConditionSchema>;

/** The earlier metric definition, still read for one release. */
const legacyDefinitionSchema = z.discriminatedUnion('type', [
  z.object({ type: z.literal('sum'), column: columnName, where: fileFilterSchema.optional() }).strict(),
  z.object({ type: z.literal('count'), where: fileFilterSchema.optional() }).strict(),
  z.object({ type: z.literal('distinct_count'), column: columnName, where: fileFilterSchema.optional() }).strict(),
  z.object({ type: z.literal('average'), column: columnName, where: fileFilterSchema.optional() }).strict(),
  z.object({ type: z.literal('ratio'), numerator: catalogName, denominator: catalogName }).strict(),
  z.object({ type: z.literal('rate'), where: fileFilterSchema, of: catalogName.optional() }).strict(),
]);
export type LegacyDefinition = z.infer<typeof legacyDefinitionSchema>;

export const fileMetricSchema = z
  .object({
    name: catalogName,
    label: text,
    also_called: z.array(text).optional(),
    description: z.string().optional(),
    // How it adds up: exactly one of these (checked in normalise.ts).
    sum: text.optional(),
    count: z.literal('rows').optional(),
    count_distinct: text.optional(),
    average: text.optional(),
    ratio: z.object({ of: catalogName, per: catalogName }).strict().optional(),
    rate: z.object({ when: fileConditionSchema, of: catalogName.optional() }).strict().optional(),
    when: fileConditionSchema.optional(),
    unit: unitSchema,
    currency: z.string().length(3).optional(),
    decimals: z.number().int().min(0).max(6).optional(),
    unit_label: unitLabelSchema.optional(),
    higher_is_better: z.boolean().optional(),
    kind: metricKindSchema.optional(),
    // Before: definition: {type, ...} and synonyms.
    definition: legacyDefinitionSchema.optional(),
    synonyms: z.array(text).optional(),
  })
  .strict();
export type FileMetric = z.infer<typeof fileMetricSchema>;

export const fileDimensionSchema = z
  .object({
    name: catalogName,
    label: text,
    also_called: z.array(text).optional(),
    // The column as the table names it (any characters), or an expression over columns.
    column: columnName.optional(),
    expr: text.optional(),
    // Personal data: never grouped by, never filtered on in output, never shown, never a metric.
    personal_data: z.boolean().default(false),
    synonyms: z.array(text).optional(),
    // The words people use for values of this column: { "Mainland–Saltreach": [the reach] }.
    value_names: z.record(text, z.array(text)).optional(),
  })
  .strict();
export type FileDimension = z.infer<typeof fileDimensionSchema>;

export const fileComparisonGroupSchema = z
  .object({
    name: catalogName,
    label: text,
    also_called: z.array(text).optional(),
    // Who the members are: a true/false column, or a condition (`{column: site, one_of: [A, B]}`).
    column: columnName.optional(),
    when: fileConditionSchema.optional(),
    members_label: text,
    others_label: text,
    launch_date: z.iso.date().optional(),
    // Customer key used for per-customer frequency comparisons.
    unit_column: columnName.optional(),
    synonyms: z.array(text).optional(),
  })
  .strict();
export type FileComparisonGroup = z.infer<typeof fileComparisonGroupSchema>;

/** The time column: a column, a date built from parts, or an expression giving a date. */
export const fileTimeColumnSchema = z.union([
  columnName,
  z.object({ year: columnName, month: columnName.optional(), day: columnName.optional() }).strict(),
  z.object({ expr: text }).strict(),
]);
export type FileTimeColumn = z.infer<typeof fileTimeColumnSchema>;

/** A source: the engine's own shapes, plus `path` for one file (or glob). */
export const fileSourceSchema = z.union([
  internalSourceSchema,
  z.object({ kind: z.enum(['csv', 'parquet', 'json']), path: text, memory_limit: memoryLimitSchema.optional(), date_order: dateOrderSchema.optional() }).strict(),
]);

/** A named stretch of time a request may mention ("during the storm week"). */
export const fileEventSchema = z
  .object({
    name: text,
    from: z.iso.date(),
    to: z.iso.date(),
    also_called: z.array(text).optional(),
  })
  .strict()
  .refine((e) => e.from <= e.to, { message: 'an event must not end before it starts', path: ['to'] });
export type FileEvent = z.infer<typeof fileEventSchema>;

export const fileDatasetSchema = z
  .object({
    name: catalogName,
    label: text,
    source: fileSourceSchema,
    // The table or view; for files, the name the rows go by (the dataset's name when absent).
    table: columnName.optional(),
    time_column: fileTimeColumnSchema,
    timezone: z.string().refine(isKnownTimeZone, 'is not an IANA time zone name (e.g. Europe/Dublin)'),
    key_column: columnName.optional(),
    amount_columns: z.array(columnName).default([]),
    metrics: z.array(fileMetricSchema).min(1),
    dimensions: z.array(fileDimensionSchema).default([]),
    comparison_groups: z.array(fileComparisonGroupSchema).default([]),
    min_group_size: z.number().int().min(0).max(1_000_000).optional(),
    // How the data-quality checks treat a large table: repeated keys counted in full, on a sample
    // or not at all, and a freshness column for PostgreSQL (see config/schema.ts qualitySchema).
    quality: qualitySchema.optional(),
    events: z.array(fileEventSchema).default([]),
    // Which half of the world the seasons of "this summer" are counted in.
    hemisphere: z.enum(['north', 'south']).default('north'),
  })
  .strict();
export type FileDataset = z.infer<typeof fileDatasetSchema>;

export const configFileSchema = z
  .object({
    version: z.literal(1),
    datasets: z.array(fileDatasetSchema).min(1),
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
export type ConfigFile = z.infer<typeof configFileSchema>;
