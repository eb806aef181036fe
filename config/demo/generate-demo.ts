// Writes the Skerrywake Ferries demo (an invented company): a seeded DuckDB file with the
// `bookings` table and a copy of the example config that points at it.
import { existsSync } from 'node:fs';
import { copyFile, mkdir, rename, rm } from 'node:fs/promises';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { DuckDBInstance } from '@duckdb/node-api';
import { DEFAULT_ROWS, DEFAULT_SEED } from './demo-effects.js';
import { demoStatements } from './demo-sql.js';

export interface DemoOptions {
  outDir: string;
  /** Rows in the table, duplicate rows included; default 200_000. */
  rows?: number;
  /** Same seed and rows give the same table content; default 20250618. */
  seed?: number;
}

export interface DemoResult {
  databasePath: string;
  configPath: string;
  rows: number;
}

export const DEMO_DATABASE_FILE = 'skerrywake.duckdb';
export const DEMO_CONFIG_FILE = 'threadcount.yaml';
const MIN_ROWS = 1_000;
const MAX_ROWS = 100_000_000;

export async function generateDemo(opts: DemoOptions): Promise<DemoResult> {
  const rows = opts.rows ?? DEFAULT_ROWS;
  const seed = opts.seed ?? DEFAULT_SEED;
  if (!Number.isInteger(rows) || rows < MIN_ROWS || rows > MAX_ROWS) {
    throw new RangeError(`demo rows must be a whole number from ${MIN_ROWS} to ${MAX_ROWS}, got ${rows}`);
  }
  if (!Number.isSafeInteger(seed)) throw new RangeError(`demo seed must be a whole number, got ${seed}`);

  const outDir = resolve(opts.outDir);
  await mkdir(outDir, { recursive: true });
  const databasePath = join(outDir, DEMO_DATABASE_FILE);
  const configPath = join(outDir, DEMO_CONFIG_FILE);

  // Build under a temporary name and rename at the end, so a failed run never leaves half a file.
  const building = join(outDir, `.${DEMO_DATABASE_FILE}.${process.pid}.building`);
  await removeDatabase(building);
  let written: number;
  try {
    written = await buildDatabase(building, rows, seed);
  } catch (err) {
    await removeDatabase(building);
    throw err;
  }
  await removeDatabase(databasePath);
  await rename(building, databasePath);
  await copyFile(exampleConfigPath(), configPath);
  return { databasePath, configPath, rows: written };
}

async function buildDatabase(path: string, rows: number, seed: number): Promise<number> {
  const instance = await DuckDBInstance.create(path);
  try {
    const connection = await instance.connect();
    try {
      for (const sql of demoStatements({ rows, seed })) await connection.run(sql);
      // Fold the write-ahead log into the file before it is renamed.
      await connection.run('CHECKPOINT');
      const reader = await connection.runAndReadAll('SELECT count(*) FROM bookings');
      return Number(reader.getRowsJson()[0]?.[0]);
    } finally {
      connection.closeSync();
    }
  } finally {
    instance.closeSync();
  }
}

async function removeDatabase(path: string): Promise<void> {
  await rm(path, { force: true });
  await rm(`${path}.wal`, { force: true });
}

/** The example config ships at <package root>/config/examples; compiled code runs from dist/. */
function exampleConfigPath(): string {
  let dir = dirname(fileURLToPath(import.meta.url));
  for (;;) {
    if (existsSync(join(dir, 'package.json'))) return join(dir, 'config', 'examples', 'skerrywake.yaml');
    const parent = dirname(dir);
    if (parent === dir) throw new Error('cannot find the package root (package.json) above the demo generator');
    dir = parent;
  }
}
