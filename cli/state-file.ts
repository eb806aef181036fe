// `threadcount state check | backup | restore`: the embedded state file's care. A backup is a
// fresh DuckDB file copied table by table from the state (what the last process left in the
// write-ahead log included), checked before it is reported written. A restore checks the backup,
// moves the current file (and its write-ahead log) aside, never deleting it, and copies the backup
// in. All three need serve stopped: DuckDB locks the file while serve has it open.
import { copyFileSync, existsSync, renameSync } from 'node:fs';
import { DuckDBInstance } from '@duckdb/node-api';
import { checkStateFile, StateFileError } from '../bot/stores/state-file-check.js';

/** Checks the file as serve does at start; throws StateFileError when it is damaged or in use. */
export async function checkState(statePath: string): Promise<void> {
  if (!existsSync(statePath)) throw new StateUsageError(`there is no state file at ${statePath}`);
  await checkStateFile(statePath);
}

/** Writes a checked copy of the state to `outPath`, which must not exist yet. */
export async function backupState(statePath: string, outPath: string): Promise<void> {
  await checkState(statePath);
  if (existsSync(outPath)) throw new StateUsageError(`${outPath} already exists; a backup never overwrites a file`);
  const instance = await DuckDBInstance.create(':memory:');
  try {
    const connection = await instance.connect();
    try {
      await connection.run(`ATTACH ${literal(statePath)} AS tc_state (READ_ONLY)`);
      await connection.run(`ATTACH ${literal(outPath)} AS tc_backup`);
      await connection.run('COPY FROM DATABASE tc_state TO tc_backup');
      await connection.run('CHECKPOINT tc_backup');
      await connection.run('DETACH tc_backup');
    } finally {
      connection.closeSync();
    }
  } finally {
    instance.closeSync();
  }
  await checkStateFile(outPath);
}

/**
 * Puts a backup in place of the state file. The file it replaces (damaged or not) and its
 * write-ahead log are kept beside it as "<name>.replaced-<time>": a restore deletes nothing.
 * Returns the names they were kept under.
 */
export async function restoreState(statePath: string, backupPath: string, now = new Date()): Promise<string[]> {
  if (!existsSync(backupPath)) throw new StateUsageError(`there is no backup at ${backupPath}`);
  await checkStateFile(backupPath);
  // A file serve has open is locked: replacing it under serve would lose what serve writes next.
  if (existsSync(statePath)) {
    await checkStateFile(statePath).catch((err: unknown) => {
      if (err instanceof StateFileError && err.reason === 'in_use') throw err;
    });
  }
  const stamp = now.toISOString().replace(/[:.]/g, '-');
  const kept: string[] = [];
  // A write-ahead log left beside the old file belongs to it, not to the backup.
  for (const name of [statePath, `${statePath}.wal`]) {
    if (!existsSync(name)) continue;
    renameSync(name, `${name}.replaced-${stamp}`);
    kept.push(`${name}.replaced-${stamp}`);
  }
  copyFileSync(backupPath, statePath);
  return kept;
}

export class StateUsageError extends Error {}

function literal(path: string): string {
  return `'${path.replaceAll("'", "''")}'`;
}
