// Which version of the data a quality report (and the coverage) describes, so it can be reused
// while the data has not changed. For files (DuckDB, CSV, Parquet) the version is each file's
// identity: path, device, inode, size, and modification and status-change times in nanoseconds.
// Any rewrite, in place or by replacing the file, changes at least one of them. For PostgreSQL it
// is read from the server's catalog and statistics (postgres-version.ts), when they give a sound
// signal for the table; otherwise there is none and the checks run every time (they count by day
// inside the warehouse, so they cost our process neither memory nor CPU).
import { readdir, stat } from 'node:fs/promises';
import { resolveSourcePath } from '../../config/load.js';
import type { Workspace } from '../workspace.js';
import { postgresVersion, type VersionSource } from './postgres-version.js';

/** A file's identity, or that it is absent (a DuckDB write-ahead log usually is). */
export type FileIdentity = { path: string; absent: true } | { path: string; dev: string; ino: string; size: string; mtimeNs: string; ctimeNs: string };

/** The data's version as text, or null when it cannot be told (a file that cannot be read, a table with no sound signal). */
export async function dataVersion(ws: VersionSource & Pick<Workspace, 'config'>): Promise<string | null> {
  const src = ws.dataset.source;
  if (src.kind === 'postgres') return postgresVersion(ws);
  const paths = (src.kind === 'duckdb' ? [src.path] : src.paths).map((p) => resolveSourcePath(ws.config, p));
  // A DuckDB file's write-ahead log holds changes not yet written into the file itself.
  const logs = src.kind === 'duckdb' ? paths.map((p) => `${p}.wal`) : [];
  const files = await Promise.all([...paths.map((p) => identify(p, false)), ...logs.map((p) => identify(p, true))]);
  if (files.some((f) => f === null)) return null;
  // A DuckDB file is opened once and read through that handle, so if the path now names another
  // file (replaced by a rename after the workspace opened), the engine still reads the old one:
  // its report must not be stored under the new file's identity. CSV and Parquet files are
  // opened afresh by every query, so the path is what the engine reads.
  if (src.kind === 'duckdb') {
    for (const f of files.slice(0, paths.length)) if (!f || 'absent' in f || !(await heldOpen(f))) return null;
  }
  return JSON.stringify({ kind: src.kind, files });
}

async function identify(path: string, mayBeAbsent: boolean): Promise<FileIdentity | null> {
  try {
    const s = await stat(path, { bigint: true });
    return { path, dev: String(s.dev), ino: String(s.ino), size: String(s.size), mtimeNs: String(s.mtimeNs), ctimeNs: String(s.ctimeNs) };
  } catch (err) {
    return mayBeAbsent && (err as NodeJS.ErrnoException).code === 'ENOENT' ? { path, absent: true } : null;
  }
}

/**
 * Whether this process holds the file open, through Linux's /proc/self/fd (each entry stats as
 * the open file itself). Elsewhere this cannot be told, and the answer is no (no caching).
 */
async function heldOpen(f: Extract<FileIdentity, { ino: string }>): Promise<boolean> {
  let fds: string[];
  try {
    fds = await readdir('/proc/self/fd');
  } catch {
    return false;
  }
  for (const fd of fds) {
    try {
      const s = await stat(`/proc/self/fd/${fd}`, { bigint: true });
      if (String(s.ino) === f.ino && String(s.dev) === f.dev) return true;
    } catch {
      // Closed since the listing (the listing's own handle among them).
    }
  }
  return false;
}
