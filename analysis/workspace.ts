// One dataset opened for questions: its config, its engine, and what it covers.
import type { DatasetConfig } from '../config/schema.js';
import { type LoadedConfig, resolveSourcePath } from '../config/load.js';
import type { CompileContext } from './compile-context.js';
import { type Coverage, withOwnLevels, withSigns } from './coverage.js';
import { keptCoverage } from './quality/kept-coverage.js';
import { SourceError, timeColumnTypeOf, type DataSource, type RunOptions, type TableColumn } from './sources/data-source.js';
import type { TimeColumnType } from './sql/dialect.js';
import { DuckDbSource } from './sources/duckdb-source.js';
import { PostgresSource } from './sources/postgres-source.js';
import type { Secrets } from '../config/environment.js';
import { loadValueIndex, type ValueIndex } from './values/value-index.js';

export interface Workspace {
  config: LoadedConfig;
  dataset: DatasetConfig;
  source: DataSource;
  context: CompileContext;
  coverage: Coverage;
  runOptions: RunOptions;
  /** The values of each non-personal dimension, so a request can name them. */
  values: ValueIndex;
}

/** Opens a dataset; `now` is the run's clock, after whose day rows are left out (coverage.ts coverageAsOf). */
export async function openWorkspace(config: LoadedConfig, datasetName?: string, secrets: Secrets = {}, now: Date = new Date()): Promise<Workspace> {
  const dataset = datasetName ? config.datasets.find((d) => d.name === datasetName) : config.datasets[0];
  if (!dataset) throw new SourceError('missing_table', `the config has no dataset named ${datasetName}`);
  const source = await openSource(config, dataset, secrets);
  try {
    const columns = await source.describe(dataset.table);
    const timeColumnType = computedTimeColumn(dataset) ? 'date' : timeColumnTypeIn(dataset, columns);
    const context: CompileContext = { dataset, dialect: source.dialect, timeColumnType };
    const runOptions: RunOptions = { maxRows: config.engine.max_result_rows, timeoutMs: config.engine.statement_timeout_ms };
    const coverage = await keptCoverage({ config, dataset, source, context, runOptions }, now);
    // The catalog as the data reads it: each metric knows whether its days reach or cross zero
    // (Metric.reachesZero), so every answer's one rule for percentages consults it.
    // And each level averaged across rows knows which breakdowns' members carry levels of their own (Metric.ownLevels).
    const read = await withOwnLevels(withSigns(dataset, coverage), source, context, runOptions);
    const opened: Workspace = { config, dataset: read, source, context: { ...context, dataset: read }, coverage, runOptions, values: new Map() };
    opened.values = await loadValueIndex(opened);
    return opened;
  } catch (err) {
    await source.close();
    throw err;
  }
}

/** A time column the config computes (a date from parts, an expression) is a DATE by construction. */
function computedTimeColumn(dataset: DatasetConfig): boolean {
  return dataset.derived?.some((d) => d.name === dataset.time_column) ?? false;
}

function timeColumnTypeIn(dataset: DatasetConfig, columns: TableColumn[]): TimeColumnType {
  const time = columns.find((c) => c.name === dataset.time_column);
  if (!time) throw new SourceError('missing_table', `the table "${dataset.table}" has no column "${dataset.time_column}" (the configured time column)`);
  const type = timeColumnTypeOf(time.type);
  if (!type) throw new SourceError('query_failed', `the time column "${dataset.time_column}" is ${time.type}, not a date or timestamp`);
  return type;
}

/** The engine for the dataset's source kind: embedded DuckDB for files, a pool for PostgreSQL. */
export async function openSource(config: LoadedConfig, dataset: DatasetConfig, secrets: Secrets): Promise<DataSource> {
  const src = dataset.source;
  if (src.kind === 'postgres') {
    const url = secrets[src.url_env];
    if (!url) {
      throw new SourceError('unreachable', `the environment variable ${src.url_env} (the PostgreSQL connection URL for the dataset "${dataset.name}") is not set`);
    }
    return PostgresSource.open({ url, ...(src.schema ? { schema: src.schema } : {}), timeoutMs: config.engine.statement_timeout_ms });
  }
  const paths = src.kind === 'duckdb' ? [src.path] : src.paths;
  return DuckDbSource.open({
    source: src,
    paths: paths.map((p) => resolveSourcePath(config, p)),
    table: dataset.table,
    // A dataset's own memory limit, when its source sets one, bounds its engine alone.
    engine: src.memory_limit ? { ...config.engine, memory_limit: src.memory_limit } : config.engine,
  });
}

/** Re-reads what the data covers and the values it holds (for "rerun with fresh data"); kept per version of the data, so unchanged data is not read again. */
export async function refreshCoverage(ws: Workspace, now: Date = new Date()): Promise<void> {
  ws.coverage = await keptCoverage(ws, now);
  const read = await withOwnLevels(withSigns(ws.config.datasets.find((d) => d.name === ws.dataset.name) ?? ws.dataset, ws.coverage), ws.source, ws.context, ws.runOptions);
  ws.dataset = read;
  ws.context = { ...ws.context, dataset: read };
  ws.values = await loadValueIndex(ws);
}

/** What the request reader needs to know about a workspace's data. */
export function datasetFacts(ws: Workspace): { dataset: DatasetConfig; coverage: Coverage; values: ValueIndex; stamp?: NonNullable<Coverage['stamps']> } {
  return { dataset: ws.dataset, coverage: ws.coverage, values: ws.values, ...(ws.coverage.stamps ? { stamp: ws.coverage.stamps } : {}) };
}
