// Checks the embedded state file before serve writes to it: opened read-only (so a damaged file
// is never written to), every table read through (DuckDB checks each block's checksum as it
// reads it, and a truncated file is missing blocks it refers to). Replaying what the last process
// left in the write-ahead log happens in memory here; the file is only written once this passed.
import { DuckDBInstance } from '@duckdb/node-api';
import { quoteIdentifier } from '../../analysis/sql/dialect.js';

export class StateFileError extends Error {
  readonly code = 'state_file_unusable';
  constructor(
    readonly path: string,
    readonly reason: 'damaged' | 'in_use',
    detail: string,
  ) {
    super(
      reason === 'in_use'
        ? `the state file ${path} is in use by another process (is threadcount serve already running on it?): ${detail}`
        : `the state file ${path} is damaged and was left as it is: ${detail}. Put a backup in its place (threadcount state restore --from FILE, which keeps this one beside it), or move it aside to start with no conversations.`,
    );
    this.name = 'StateFileError';
  }
}

/** Reads the whole file read-only; throws StateFileError when it cannot. */
export async function checkStateFile(path: string): Promise<void> {
  let instance: DuckDBInstance | undefined;
  try {
    instance = await DuckDBInstance.create(path, { access_mode: 'READ_ONLY', memory_limit: '64MB' });
    const connection = await instance.connect();
    try {
      const tables = await connection.runAndReadAll(`SELECT table_name FROM duckdb_tables() WHERE database_name = current_database() AND schema_name = 'main'`);
      for (const [name] of tables.getRows()) {
        // Every column of every row is read (hashed and summed), so every block is checked.
        await connection.runAndReadAll(`SELECT count(*), sum(hash(COLUMNS(*))) FROM ${quoteIdentifier(String(name))}`);
      }
    } finally {
      connection.closeSync();
    }
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    throw new StateFileError(path, /could not set lock|conflicting lock/i.test(message) ? 'in_use' : 'damaged', message.split('\n')[0]!);
  } finally {
    instance?.closeSync();
  }
}
