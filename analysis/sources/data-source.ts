// One runner interface for every engine: templates compile SQL for `dialect`, and `run`
// executes it with bound parameters, a row cap and a time limit.
import type { CompiledQuery, ResultTable } from '../types.js';
import type { Dialect, TimeColumnType } from '../sql/dialect.js';
import type { DateOrder } from '../../config/schema.js';
import type { TextDateReading } from './text-dates.js';

export interface TableColumn {
  name: string;
  /** The engine's own type name, upper case (e.g. DATE, VARCHAR, DECIMAL(10,2)). */
  type: string;
}

export interface RunOptions {
  maxRows: number;
  timeoutMs: number;
}

export interface DataSource {
  readonly dialect: Dialect;
  /** Columns of the configured table; throws SourceError('missing_table') when absent. */
  describe(table: string): Promise<TableColumn[]>;
  run(query: CompiledQuery, options: RunOptions): Promise<ResultTable>;
  close(): Promise<void>;
  /** Date columns the source itself read from text (CSV and JSON files), with the format and what it assumed. */
  readonly textDates?: Readonly<Record<string, TextDateReading & { orderFromConfig?: DateOrder }>>;
}

/**
 * Why a query could not give an answer. `dataset_changed`: the table no longer has a column the
 * config (and so an agreed plan) relies on, e.g. it was dropped or renamed after the plan was made.
 */
export type SourceErrorCode = 'unreachable' | 'missing_table' | 'dataset_changed' | 'timeout' | 'query_failed';

export class SourceError extends Error {
  constructor(
    readonly code: SourceErrorCode,
    message: string,
    override readonly cause?: unknown,
  ) {
    super(message);
    this.name = 'SourceError';
  }
}

export function timeColumnTypeOf(engineType: string): TimeColumnType | null {
  const t = engineType.toUpperCase();
  if (t === 'DATE') return 'date';
  if (t.startsWith('TIMESTAMP WITH TIME ZONE') || t === 'TIMESTAMPTZ') return 'timestamptz';
  if (t.startsWith('TIMESTAMP')) return 'timestamp';
  return null;
}

/** What a query that names a column the table no longer has is reported as: the column, by name. */
export function missingColumnMessage(column: string | undefined, engineText: string): string {
  return column
    ? `column ${column.replaceAll('""', '"')} is missing from the table (renamed or dropped since the config was written?)`
    : `a column the config names is missing from the table (${engineText})`;
}
