// The embedded engine. Opens the configured file read-only (or views over CSV/Parquet files),
// and converts every column explicitly so BIGINT and DECIMAL never lose precision by accident.
import { randomBytes } from 'node:crypto';
import { existsSync } from 'node:fs';
import { tmpdir, totalmem } from 'node:os';
import { join } from 'node:path';
import { DuckDBConnection, DuckDBInstance, type DuckDBType, DuckDBTypeId } from '@duckdb/node-api';
import type { EngineConfig, SourceConfig } from '../../config/schema.js';
import { duckdbDialect } from '../sql/dialect.js';
import { rollupTable, storedRollupQuery, storeRollupStatement, type SharedScan } from '../rollup/rollup.js';
import type { CellValue, CompiledQuery, ResultColumn, ResultTable } from '../types.js';
import { readFileDates, type FileDateReading } from './file-dates.js';
import { missingColumnMessage, SourceError, type DataSource, type RunOptions, type TableColumn } from './data-source.js';

export interface DuckDbSourceOptions {
  source: Exclude<SourceConfig, { kind: 'postgres' }>;
  /** Absolute paths of the source files (already resolved against the config's folder). */
  paths: string[];
  table: string;
  engine: EngineConfig;
}

/**
 * The engine's memory when the config sets none: half of the memory the process may use (the
 * machine's, or its container's limit when lower). DuckDB's own default, 80%, suits a process that
 * has the machine to itself, not a chat service beside others; a fixed small limit (128 MB before)
 * made a 36 MB CSV's data-quality check run out of memory. Beyond the limit DuckDB spills to disk
 * (temp_directory below). Set engine.memory_limit to bound it further.
 */
export function defaultMemoryLimit(machineBytes = usableMemory()): string {
  const share = Math.floor(machineBytes / 2 / 2 ** 20);
  return `${Math.max(256, share)}MiB`;
}

function usableMemory(): number {
  const total = totalmem();
  // A container's limit (cgroup) when lower than the machine's; 0 or absent when there is none.
  const constrained = typeof process.constrainedMemory === 'function' ? (process.constrainedMemory() ?? 0) : 0;
  return constrained > 0 && constrained < total ? constrained : total;
}

export const DEFAULT_MEMORY_LIMIT = defaultMemoryLimit();


// Sub-question jobs run a few at a time; DuckDB parallelises each query across its own threads.
const POOL_SIZE = 4;
// The alias of an attached DuckDB data file (our own catalog name; never shown to users).
const DATA_CATALOG = 'tc_data';
// Rollups kept between runs: a few shapes of recent plans (each is aggregated rows, not the table).
const MAX_KEPT_ROLLUPS = 8;

export class DuckDbSource implements DataSource {
  readonly dialect = duckdbDialect;

  private readonly idle: DuckDBConnection[];
  private readonly waiting: ((c: DuckDBConnection) => void)[] = [];

  private constructor(
    private readonly instance: DuckDBInstance,
    private readonly connections: DuckDBConnection[],
    /** Date columns of CSV and JSON files written as text, and the format each was read with. */
    readonly textDates: Readonly<Record<string, FileDateReading>> = {},
  ) {
    this.idle = [...connections];
  }

  /** One query per connection at a time; callers beyond the pool size wait their turn. */
  private async withConnection<T>(work: (c: DuckDBConnection) => Promise<T>): Promise<T> {
    const c = this.idle.pop() ?? (await new Promise<DuckDBConnection>((resolve) => this.waiting.push(resolve)));
    try {
      return await work(c);
    } finally {
      const next = this.waiting.shift();
      if (next) next(c);
      else this.idle.push(c);
    }
  }

  static async open(opts: DuckDbSourceOptions): Promise<DuckDbSource> {
    const settings: Record<string, string> = {};
    if (opts.engine.threads) settings.threads = String(opts.engine.threads);
    settings.memory_limit = opts.engine.memory_limit ?? DEFAULT_MEMORY_LIMIT;
    // Freed memory goes back to the system from DuckDB's background thread (as for the state file:
    // bot/stores/DuckDbStateStore.ts), not only when this engine next allocates.
    settings.allocator_background_threads = 'true';
    // Spills go to a folder of this engine's own under the system's temporary folder (DuckDB
    // makes it when first needed and removes it on close), never into the working directory.
    settings.temp_directory = join(tmpdir(), `threadcount-duckdb-${process.pid}-${randomBytes(4).toString('hex')}`);
    for (const p of opts.paths) {
      // A glob is checked by the reader itself ("no files found that match").
      if (!isGlob(p) && !existsSync(p)) throw new SourceError('unreachable', `the data file ${p} does not exist`);
    }
    let instance: DuckDBInstance;
    let connection: DuckDBConnection;
    let textDates: Record<string, FileDateReading> = {};
    // The engine's own catalog is in memory (where rollups are kept, see rollup/rollup.ts); a
    // DuckDB data file is attached to it read-only and made every connection's default.
    try {
      instance = await DuckDBInstance.create(':memory:', settings);
    } catch (err) {
      throw new SourceError('unreachable', `cannot start the embedded engine: ${firstLine(err)}`, err);
    }
    connection = await instance.connect();
    if (opts.source.kind === 'duckdb') {
      try {
        // The path comes from the config, not from chat; it still goes in as an escaped SQL literal.
        await connection.run(`ATTACH '${opts.paths[0]!.replaceAll("'", "''")}' AS ${DATA_CATALOG} (READ_ONLY)`);
        await connection.run(`USE ${DATA_CATALOG}`);
      } catch (err) {
        connection.closeSync();
        instance.closeSync();
        throw new SourceError('unreachable', `cannot open the data file: ${firstLine(err)}`, err);
      }
    }
    // Views made on one connection are visible to the others (same database instance).
    if (opts.source.kind !== 'duckdb') {
      // File paths come from the config, not from chat; they still go in as SQL string literals.
      const list = `[${opts.paths.map((p) => `'${p.replaceAll("'", "''")}'`).join(', ')}]`;
      try {
        // Dates written as text in CSV and JSON are read with the format their values show (file-dates.ts).
        const query = async (sql: string) => (await connection.runAndReadAll(sql)).getRowObjectsJson() as Record<string, unknown>[];
        const files = opts.source.kind === 'csv' || opts.source.kind === 'json' ? await readFileDates(query, opts.source.kind, list, opts.source.date_order) : undefined;
        if (files) textDates = files.read;
        const reader = files?.reader ?? `read_parquet(${list})`;
        await connection.run(`CREATE VIEW ${duckdbDialect.quoteIdent(opts.table)} AS SELECT * FROM ${reader}`);
      } catch (err) {
        connection.closeSync();
        instance.closeSync();
        throw new SourceError('unreachable', `cannot read the ${opts.source.kind} files: ${firstLine(err)}`, err);
      }
    }
    const others = await Promise.all(Array.from({ length: POOL_SIZE - 1 }, () => instance.connect()));
    if (opts.source.kind === 'duckdb') for (const c of others) await c.run(`USE ${DATA_CATALOG}`);
    return new DuckDbSource(instance, [connection, ...others], textDates);
  }

  async describe(table: string): Promise<TableColumn[]> {
    const reader = await this.withConnection((c) => c.runAndReadAll(
      'SELECT column_name, data_type FROM information_schema.columns WHERE table_catalog = current_database() AND table_name = $1 ORDER BY ordinal_position',
      [table],
    ));
    const rows = reader.getRowObjectsJson();
    if (rows.length === 0) throw new SourceError('missing_table', `the table "${table}" does not exist in the dataset`);
    return rows.map((r) => ({ name: String(r.column_name), type: String(r.data_type).toUpperCase() }));
  }

  run(query: CompiledQuery, options: RunOptions): Promise<ResultTable> {
    if (query.scan) return this.runOverRollup(query.scan, options);
    return this.withConnection((c) => this.runOn(c, query, options));
  }

  // Rollups kept in the in-memory catalog, by key; the least recently used beyond the limit are
  // dropped once no query reads them. A key names the rollup's SQL and the data's coverage.
  private readonly rollups = new Map<string, { ready: Promise<void>; readers: number; usedAt: number; dropped: boolean }>();
  private clock = 0;

  /** Stores the rollup on first use (one scan of the table), then runs the query over the stored copy. */
  private async runOverRollup(scan: SharedScan, options: RunOptions): Promise<ResultTable> {
    for (;;) {
      let entry = this.rollups.get(scan.key);
      if (!entry) {
        const ready = this.withConnection((c) => this.runOn(c, storeRollupStatement(scan), options)).then(() => undefined);
        entry = { ready, readers: 0, usedAt: 0, dropped: false };
        this.rollups.set(scan.key, entry);
        // A rollup that failed (a timeout, say) is forgotten, so the next reader tries again.
        ready.catch(() => {
          if (this.rollups.get(scan.key) === entry) this.rollups.delete(scan.key);
        });
      }
      await entry.ready;
      // Dropped while this reader waited: store it again.
      if (entry.dropped) continue;
      entry.readers++;
      entry.usedAt = ++this.clock;
      try {
        return await this.withConnection((c) => this.runOn(c, storedRollupQuery(scan), options));
      } finally {
        entry.readers--;
        await this.evictRollups();
      }
    }
  }

  private async evictRollups(): Promise<void> {
    const idle = [...this.rollups.entries()].filter(([, e]) => e.readers === 0 && e.usedAt > 0).sort((a, b) => a[1].usedAt - b[1].usedAt);
    for (const [key, entry] of idle.slice(0, Math.max(0, this.rollups.size - MAX_KEPT_ROLLUPS))) {
      this.rollups.delete(key);
      entry.dropped = true;
      await this.withConnection((c) => c.run(`DROP TABLE IF EXISTS ${rollupTable(key)}`)).catch(() => undefined);
    }
  }

  /**
   * Runs the query; one that runs out of memory is retried once with a smaller plan, on a single
   * thread (each DuckDB thread holds its own share of a grouping's hash tables). A second failure
   * is reported as such, so the thread says why the answer is missing.
   */
  private async runOn(connection: DuckDBConnection, query: CompiledQuery, options: RunOptions): Promise<ResultTable> {
    try {
      return await this.runOnce(connection, query, options);
    } catch (err) {
      if (!(err instanceof SourceError) || err.code !== 'query_failed' || !/Out of Memory Error/i.test(err.message)) throw err;
      const threads = await connection.runAndReadAll("SELECT current_setting('threads') AS t");
      const before = String(threads.getRowObjectsJson()[0]?.t ?? '');
      await connection.run('SET threads = 1');
      try {
        return await this.runOnce(connection, query, options);
      } catch (again) {
        if (again instanceof SourceError && /Out of Memory Error/i.test(again.message)) {
          throw new SourceError('query_failed', `the query ran out of memory, and again when retried on one thread (${again.message.replace(/^the query failed: /, '')}); set engine.memory_limit higher or ask for a shorter period`, again);
        }
        throw again;
      } finally {
        if (/^\d+$/.test(before)) await connection.run(`SET threads = ${before}`);
      }
    }
  }

  private async runOnce(connection: DuckDBConnection, query: CompiledQuery, options: RunOptions): Promise<ResultTable> {
    // DuckDB has no statement_timeout setting; interrupting the connection cancels the query.
    let timedOut = false;
    const timer = setTimeout(() => {
      timedOut = true;
      connection.interrupt();
    }, options.timeoutMs);
    try {
      const reader = await connection.streamAndReadUntil(query.sql, options.maxRows + 1, query.params);
      const columns = reader.columnNames().map((name, i) => ({ name, type: resultTypeOf(reader.columnTypes()[i]!) }));
      const json = reader.getRowObjectsJson();
      const truncated = json.length > options.maxRows;
      const rows = json.slice(0, options.maxRows).map((r) => convertRow(r, columns));
      return { columns, rows, truncated };
    } catch (err) {
      if (timedOut) throw new SourceError('timeout', `the query ran past the ${options.timeoutMs} ms limit and was stopped`, err);
      const line = firstLine(err);
      // The same codes as the PostgreSQL source, from DuckDB's error classes.
      if (/^Catalog Error: Table with name .* does not exist/.test(line)) throw new SourceError('missing_table', `the table is missing from the database (${line})`, err);
      const gone = /^Binder Error: Referenced column "((?:[^"]|"")+)" not found/.exec(line);
      if (gone) throw new SourceError('dataset_changed', missingColumnMessage(gone[1], line), err);
      throw new SourceError('query_failed', `the query failed: ${line}`, err);
    } finally {
      clearTimeout(timer);
    }
  }

  async close(): Promise<void> {
    for (const c of this.connections) c.closeSync();
    this.instance.closeSync();
  }
}

function resultTypeOf(t: DuckDBType): ResultColumn['type'] {
  switch (t.typeId) {
    case DuckDBTypeId.DATE:
      return 'date';
    case DuckDBTypeId.BOOLEAN:
      return 'boolean';
    case DuckDBTypeId.TINYINT:
    case DuckDBTypeId.SMALLINT:
    case DuckDBTypeId.INTEGER:
    case DuckDBTypeId.BIGINT:
    case DuckDBTypeId.HUGEINT:
    case DuckDBTypeId.UTINYINT:
    case DuckDBTypeId.USMALLINT:
    case DuckDBTypeId.UINTEGER:
    case DuckDBTypeId.UBIGINT:
    case DuckDBTypeId.FLOAT:
    case DuckDBTypeId.DOUBLE:
    case DuckDBTypeId.DECIMAL:
      return 'number';
    default:
      return 'text';
  }
}

/** JSON-converted values (BIGINT and DECIMAL arrive as exact strings) mapped to plain JS values. */
function convertRow(r: Record<string, unknown>, columns: ResultColumn[]): Record<string, CellValue> {
  const out: Record<string, CellValue> = {};
  for (const c of columns) {
    const v = r[c.name];
    if (v === null || v === undefined) out[c.name] = null;
    else if (c.type === 'number') {
      const n = typeof v === 'number' ? v : Number(v);
      // 'NaN' and 'Infinity' from DOUBLE arithmetic become missing values, never numbers.
      out[c.name] = Number.isFinite(n) ? n : null;
    } else if (c.type === 'boolean') out[c.name] = Boolean(v);
    else if (c.type === 'date') out[c.name] = String(v).slice(0, 10);
    // Timestamps stay as the engine's ISO text; captions format them before anyone sees them.
    else out[c.name] = String(v);
  }
  return out;
}

function isGlob(path: string): boolean {
  return /[*?[]/.test(path);
}

function firstLine(err: unknown): string {
  return (err instanceof Error ? err.message : String(err)).split('\n')[0] ?? 'unknown error';
}
