// A PostgreSQL warehouse (or any engine speaking its wire protocol and dialect). Every query runs
// in its own READ ONLY transaction with a statement timeout, through a small pool; results come
// through a cursor that fetches at most maxRows + 1 rows; column types are converted explicitly,
// by parsers set on this source's own connections (never pg's global ones).
import pg from 'pg';
import Cursor from 'pg-cursor';
import { quoteIdentifier } from '../sql/dialect.js';
import { postgresDialect } from '../sql/postgres-dialect.js';
import type { CellValue, CompiledQuery, ResultColumn, ResultTable } from '../types.js';
import { missingColumnMessage, SourceError, type DataSource, type RunOptions, type TableColumn } from './data-source.js';

export interface PostgresSourceOptions {
  /** A postgres:// connection URL (a secret: it comes from the environment, never from the config file). */
  url: string;
  /** Schema holding the table; the connecting role's default search path when absent. */
  schema?: string;
  /** Time limit for the catalog look-up made when the dataset opens. */
  timeoutMs: number;
}

// Sub-question jobs run a few at a time; each holds a connection only while its query runs.
const POOL_SIZE = 4;
const CONNECT_TIMEOUT_MS = 10_000;
// If the server stops answering altogether (a dead network), the client gives up this long
// after the server-side statement timeout should have fired.
const CLIENT_GRACE_MS = 15_000;

// Type OIDs from PostgreSQL's pg_type catalog (stable across versions).
const OID = {
  bool: 16,
  int8: 20,
  int2: 21,
  int4: 23,
  oid: 26,
  float4: 700,
  float8: 701,
  date: 1082,
  timestamp: 1114,
  timestamptz: 1184,
  numeric: 1700,
} as const;
const NUMERIC_OIDS = new Set<number>([OID.int8, OID.int2, OID.int4, OID.oid, OID.float4, OID.float8, OID.numeric]);

/** Text-format parsers for this source only: every value becomes a plain CellValue. */
export const pgTypeParsers = {
  getTypeParser: (oid: number, format?: string): ((text: string) => CellValue) => {
    if (format === 'binary') return () => null; // never requested: every query uses the text format
    if (NUMERIC_OIDS.has(oid)) return parseFiniteNumber;
    switch (oid) {
      case OID.bool:
        return (v) => v === 't' || v === 'true';
      case OID.date:
        return (v) => (/^\d{4}-\d{2}-\d{2}$/.test(v) ? v : null); // 'infinity' and BC dates are not calendar dates here
      case OID.timestamp:
        return parseTimestamp;
      case OID.timestamptz:
        return parseTimestampTz;
      default:
        return (v) => v; // text, and anything unusual as its text form
    }
  },
};

function parseFiniteNumber(v: string): number | null {
  // INT8 and NUMERIC arrive as exact text; NaN and ±Infinity become missing values, never numbers.
  const n = Number(v);
  return Number.isFinite(n) ? n : null;
}

/** '2024-03-01 10:00:00.5' -> '2024-03-01T10:00:00.5' (wall-clock time, no zone). */
function parseTimestamp(v: string): string | null {
  const m = /^(\d{4}-\d{2}-\d{2}) (\d{2}:\d{2}:\d{2}(?:\.\d+)?)$/.exec(v);
  return m ? `${m[1]}T${m[2]}` : null;
}

/** '2024-03-01 10:00:00+00' (or +05:30) -> '2024-03-01T10:00:00.000Z'. */
function parseTimestampTz(v: string): string | null {
  const m = /^(\d{4}-\d{2}-\d{2}) (\d{2}:\d{2}:\d{2}(?:\.\d+)?)([+-]\d{2})(?::(\d{2}))?(?::(\d{2}))?$/.exec(v);
  if (!m) return null;
  // Offsets with seconds (historic zones) are dropped to the minute; the session runs in UTC anyway.
  const ms = Date.parse(`${m[1]}T${m[2]}${m[3]}:${m[4] ?? '00'}`);
  return Number.isFinite(ms) ? new Date(ms).toISOString() : null;
}

function resultTypeOf(oid: number): ResultColumn['type'] {
  if (NUMERIC_OIDS.has(oid)) return 'number';
  if (oid === OID.bool) return 'boolean';
  if (oid === OID.date) return 'date';
  return 'text';
}

export class PostgresSource implements DataSource {
  readonly dialect = postgresDialect;

  private constructor(
    private readonly pool: pg.Pool,
    private readonly schema: string | undefined,
    private readonly describeTimeoutMs: number,
  ) {}

  static open(opts: PostgresSourceOptions): PostgresSource {
    let pool: pg.Pool;
    try {
      pool = new pg.Pool({
        connectionString: opts.url,
        max: POOL_SIZE,
        idleTimeoutMillis: 30_000,
        connectionTimeoutMillis: CONNECT_TIMEOUT_MS,
        application_name: 'threadcount',
        types: pgTypeParsers,
      });
    } catch (err) {
      // A malformed URL; its text may hold a password, so it is not repeated.
      throw new SourceError('unreachable', 'the PostgreSQL connection URL could not be read', err);
    }
    // A connection that the server or the network closes emits 'error': through the pool while
    // idle, on the client itself while checked out. Without listeners Node would stop the process;
    // a query on it fails on its own (and is reported), and the next one opens a fresh connection.
    pool.on('error', () => undefined);
    pool.on('connect', (client) => client.on('error', () => undefined));
    return new PostgresSource(pool, opts.schema, opts.timeoutMs);
  }

  async describe(table: string): Promise<TableColumn[]> {
    const result = await this.run(
      {
        sql: `SELECT column_name, upper(data_type) AS data_type
FROM information_schema.columns
WHERE table_schema = current_schema() AND table_name = $1
ORDER BY ordinal_position`,
        params: [table],
      },
      { maxRows: 100_000, timeoutMs: this.describeTimeoutMs },
    );
    if (result.rows.length === 0) {
      const where = this.schema ? ` in the schema "${this.schema}"` : '';
      throw new SourceError('missing_table', `the table "${table}" does not exist${where} (or this role may not read it)`);
    }
    return result.rows.map((r) => ({ name: String(r.column_name), type: String(r.data_type) }));
  }

  async run(query: CompiledQuery, options: RunOptions): Promise<ResultTable> {
    const timeoutMs = Math.max(1, Math.trunc(options.timeoutMs));
    let client: pg.PoolClient;
    try {
      client = await this.pool.connect();
    } catch (err) {
      throw mapError(err, timeoutMs);
    }
    let broken: unknown = undefined;
    try {
      // One round trip: a read-only transaction whose settings end with it (no session state,
      // so this also works behind a transaction-pooling proxy).
      const settings = [
        'BEGIN TRANSACTION READ ONLY',
        `SET LOCAL statement_timeout = ${timeoutMs}`,
        "SET LOCAL TimeZone = 'UTC'",
        // Lets a table partitioned on the time column (locally or over postgres_fdw shards)
        // aggregate each partition on its own, where it lives: every day-level GROUP BY holds the
        // partition key. Off by default in PostgreSQL for its planning cost; set only where the
        // server knows the setting, so other engines speaking the protocol are not refused.
        "SELECT set_config('enable_partitionwise_aggregate', 'on', true) WHERE current_setting('enable_partitionwise_aggregate', true) IS NOT NULL",
        ...(this.schema ? [`SET LOCAL search_path = ${quoteIdentifier(this.schema)}`] : []),
      ];
      await client.query(settings.join('; '));
      const table = await withClientGuard(readCapped(client, query, options.maxRows), timeoutMs + CLIENT_GRACE_MS);
      await client.query('COMMIT');
      return table;
    } catch (err) {
      broken = err;
      if (!isConnectionError(err) && !(err instanceof ClientGuardTimeout)) {
        // The transaction is aborted after an error; end it so the connection can be reused.
        await client.query('ROLLBACK').then(
          () => (broken = undefined),
          () => undefined,
        );
      }
      throw mapError(err, timeoutMs);
    } finally {
      // A connection that failed at the protocol level is closed rather than reused.
      client.release(broken instanceof Error ? broken : broken === undefined ? undefined : true);
    }
  }

  async close(): Promise<void> {
    await this.pool.end();
  }
}

/** Reads at most maxRows + 1 rows through a cursor (so ORDER BY is kept and the tail never travels). */
function readCapped(client: pg.PoolClient, query: CompiledQuery, maxRows: number): Promise<ResultTable> {
  const cursor = client.query(new Cursor(query.sql, query.params, { types: pgTypeParsers }));
  return new Promise<ResultTable>((resolve, reject) => {
    cursor.read(maxRows + 1, (err, rows, result) => {
      if (err) {
        reject(err);
        return;
      }
      const columns: ResultColumn[] = (result?.fields ?? []).map((f) => ({ name: f.name, type: resultTypeOf(f.dataTypeID) }));
      const truncated = rows.length > maxRows;
      const kept = (rows as Record<string, CellValue>[]).slice(0, maxRows).map((r) => {
        const out: Record<string, CellValue> = {};
        for (const c of columns) out[c.name] = r[c.name] ?? null;
        return out;
      });
      cursor.close((closeErr) => (closeErr ? reject(closeErr) : resolve({ columns, rows: kept, truncated })));
    });
  });
}

class ClientGuardTimeout extends Error {}

function withClientGuard<T>(work: Promise<T>, ms: number): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const guard = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new ClientGuardTimeout('the server did not answer')), ms);
  });
  work.catch(() => undefined); // a late failure after the guard fired is not "unhandled"
  return Promise.race([work, guard]).finally(() => clearTimeout(timer));
}

// SQLSTATE classes and codes, from PostgreSQL's "Appendix A. Error Codes".
const UNREACHABLE_STATES = new Set([
  '28000', // invalid_authorization_specification (no such role, pg_hba rejects)
  '28P01', // invalid_password
  '3D000', // invalid_catalog_name: the database does not exist
  '57P01', // admin_shutdown
  '57P02', // crash_shutdown
  '57P03', // cannot_connect_now (starting up, recovering)
  '53300', // too_many_connections
]);
const NETWORK_CODES = new Set(['ECONNREFUSED', 'ECONNRESET', 'ENOTFOUND', 'EAI_AGAIN', 'ETIMEDOUT', 'EHOSTUNREACH', 'ENETUNREACH', 'EPIPE']);

function codeOf(err: unknown): string | undefined {
  const code = (err as { code?: unknown } | null)?.code;
  return typeof code === 'string' ? code : undefined;
}

function isConnectionError(err: unknown): boolean {
  const code = codeOf(err);
  if (code && (NETWORK_CODES.has(code) || UNREACHABLE_STATES.has(code) || code.startsWith('08'))) return true;
  const message = err instanceof Error ? err.message : '';
  return /connection terminated|timeout exceeded when trying to connect|Client has encountered a connection error/i.test(message);
}

function mapError(err: unknown, timeoutMs: number): SourceError {
  if (err instanceof SourceError) return err;
  if (err instanceof ClientGuardTimeout) {
    return new SourceError('timeout', `the database did not answer within ${timeoutMs + CLIENT_GRACE_MS} ms and the query was abandoned`, err);
  }
  const code = codeOf(err);
  const text = firstLine(err);
  if (code === '57014') return new SourceError('timeout', `the query ran past the ${timeoutMs} ms limit and was stopped`, err);
  if (code === '42P01') return new SourceError('missing_table', `the table is missing from the database (${text})`, err);
  if (code === '42703') return new SourceError('dataset_changed', missingColumnMessage(/column "((?:[^"]|"")+)" does not exist/.exec(text)?.[1], text), err);
  if (isConnectionError(err)) return new SourceError('unreachable', `cannot reach the PostgreSQL database: ${redact(text)}`, err);
  return new SourceError('query_failed', `the query failed: ${text}`, err);
}

/** Connection errors can quote the URL; a password in it is never repeated. */
function redact(text: string): string {
  return text.replace(/(postgres(?:ql)?:\/\/[^:/@\s]*:)[^@\s]*@/gi, '$1***@');
}

function firstLine(err: unknown): string {
  const message = err instanceof Error ? err.message : String(err);
  return (message.split('\n')[0] ?? '').trim() || (codeOf(err) ?? 'unknown error');
}
