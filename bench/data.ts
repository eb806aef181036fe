// The benchmark's demo data, generated once per size into .cache/bench/<rows>/ and reused while
// the generator would write the same table: its version is a hash of the exact SQL it runs for
// those rows and that seed, so any change to the generator or its planted effects rebuilds.
import { createHash } from 'node:crypto';
import { copyFileSync, existsSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { DEMO_CONFIG_FILE, DEMO_DATABASE_FILE, generateDemo } from '../config/demo/generate-demo.js';
import { DEFAULT_SEED } from '../config/demo/demo-effects.js';
import { demoStatements } from '../config/demo/demo-sql.js';

export interface BenchData {
  rows: number;
  dir: string;
  databasePath: string;
  configPath: string;
  /** Seconds spent generating in this run; null when the cached copy was reused. */
  generatedSeconds: number | null;
}

interface Stamp {
  rows: number;
  seed: number;
  version: string;
  writtenRows: number;
  seconds: number;
}

const STAMP_FILE = 'bench-data.json';

/** The folder holding package.json (compiled code runs from dist/bench). */
export function packageRoot(): string {
  let dir = dirname(fileURLToPath(import.meta.url));
  for (;;) {
    if (existsSync(join(dir, 'package.json'))) return dir;
    const parent = dirname(dir);
    if (parent === dir) throw new Error('cannot find the package root (package.json) above the benchmark');
    dir = parent;
  }
}

export function cacheDir(): string {
  return join(packageRoot(), '.cache', 'bench');
}

export function generatorVersion(rows: number, seed = DEFAULT_SEED): string {
  return createHash('sha256').update(demoStatements({ rows, seed }).join(';\n')).digest('hex').slice(0, 16);
}

export async function benchData(rows: number, log: (line: string) => void): Promise<BenchData> {
  const seed = DEFAULT_SEED;
  const dir = join(cacheDir(), String(rows));
  const databasePath = join(dir, DEMO_DATABASE_FILE);
  const configPath = join(dir, DEMO_CONFIG_FILE);
  const version = generatorVersion(rows, seed);
  const stampPath = join(dir, STAMP_FILE);
  const stamp = readStamp(stampPath);
  if (stamp && stamp.rows === rows && stamp.seed === seed && stamp.version === version && existsSync(databasePath)) {
    // The config is the example's, copied fresh so a changed catalog is always the one measured.
    copyFileSync(join(packageRoot(), 'config', 'examples', 'skerrywake.yaml'), configPath);
    return { rows, dir, databasePath, configPath, generatedSeconds: null };
  }
  log(`generating the demo data at ${rows.toLocaleString('en')} rows (cached in ${dir})...`);
  const started = performance.now();
  const result = await generateDemo({ outDir: dir, rows, seed });
  const seconds = (performance.now() - started) / 1000;
  const written: Stamp = { rows, seed, version, writtenRows: result.rows, seconds };
  writeFileSync(stampPath, `${JSON.stringify(written, null, 2)}\n`);
  return { rows, dir, databasePath, configPath, generatedSeconds: seconds };
}

function readStamp(path: string): Stamp | null {
  if (!existsSync(path)) return null;
  try {
    return JSON.parse(readFileSync(path, 'utf8')) as Stamp;
  } catch {
    return null;
  }
}
