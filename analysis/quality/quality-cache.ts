// Quality reports kept between runs and between processes, one small JSON file per dataset in a
// folder beside the conversation state file. A cache, not state: a file that is missing,
// unreadable, corrupt, of another version of the data or of another check definition reads as
// nothing, and a file that cannot be written is simply not written.
import { createHash, randomBytes } from 'node:crypto';
import { mkdir, readFile, rename, rm, writeFile } from 'node:fs/promises';
import { dirname, join, resolve } from 'node:path';
import { z } from 'zod';
import type { LoadedConfig } from '../../config/load.js';
import type { DatasetConfig } from '../../config/schema.js';
import type { StampGranularity } from '../stamps.js';
import type { QualityReport } from './quality-checks.js';

// Raise when the entry's layout or meaning changes, so older files read as nothing.
const FORMAT = 2;

/** What is kept for one version of the data: the report's parts, with missing values per column checked so far. */
export interface QualityEntry {
  /** The data's version and the check's definition, hashed; an entry is used only when it matches. */
  key: string;
  rows: number;
  lastDate: string | null;
  duplicateKeys: QualityReport['duplicateKeys'];
  negatives: QualityReport['negatives'];
  nulls: { column: string; count: number }[];
}

const count = z.number().nonnegative();
const entrySchema = z.object({
  format: z.literal(FORMAT),
  key: z.string().min(1),
  rows: count,
  lastDate: z.string().regex(/^\d{4}-\d{2}-\d{2}$/).nullable(),
  duplicateKeys: z.object({ column: z.string(), keys: count, extraRows: count, sampledOneIn: z.number().int().min(1) }).nullable(),
  negatives: z.array(z.object({ column: z.string(), count })),
  nulls: z.array(z.object({ column: z.string(), count })),
});

/** The cache's folder: `threadcount-cache/quality` beside the config's conversation state file. */
export function qualityCacheDir(config: LoadedConfig): string {
  return join(dirname(resolve(config.baseDir, config.conversation.state_path)), 'threadcount-cache', 'quality');
}

/** One file per dataset and source, so a new version of the data replaces the old entry. */
export function qualityCacheFile(config: LoadedConfig, dataset: DatasetConfig): string {
  return join(qualityCacheDir(config), `${datasetFileStem(dataset)}.json`);
}

/** The dataset's coverage (first and last day, rows), kept beside its quality report. */
export function coverageCacheFile(config: LoadedConfig, dataset: DatasetConfig): string {
  return join(qualityCacheDir(config), `${datasetFileStem(dataset)}.coverage.json`);
}

function datasetFileStem(dataset: DatasetConfig): string {
  return createHash('sha256').update(JSON.stringify([dataset.name, dataset.source])).digest('hex').slice(0, 24);
}

export function entryKey(version: string, definition: string): string {
  return createHash('sha256').update(JSON.stringify([FORMAT, version, definition])).digest('hex');
}

/** The entry stored under `key`, or null for anything else. */
export async function readEntry(file: string, key: string): Promise<QualityEntry | null> {
  return readKept(file, key, entrySchema);
}

/** What is kept of the coverage for one version of the data. */
export interface CoverageEntry {
  key: string;
  firstDate: string | null;
  lastDate: string | null;
  rows: number;
  stamps?: StampGranularity;
  strayTail?: { firstDate: string; lastDate: string; rows: number; typicalDayRows: number };
  /** The metrics whose days reach or cross zero (coverage.ts compileSigns). */
  reachZero?: string[];
}

const day = z.string().regex(/^\d{4}-\d{2}-\d{2}$/).nullable();
const coverageSchema = z.object({
  format: z.literal(FORMAT),
  key: z.string().min(1),
  firstDate: day,
  lastDate: day,
  rows: count,
  stamps: z.enum(['daily', 'weekly', 'monthly', 'quarterly', 'yearly', 'irregular'] satisfies StampGranularity[]).optional(),
  strayTail: z.object({ firstDate: z.string(), lastDate: z.string(), rows: count, typicalDayRows: count }).optional(),
  reachZero: z.array(z.string()).optional(),
});

export async function readCoverageEntry(file: string, key: string): Promise<CoverageEntry | null> {
  return readKept(file, key, coverageSchema);
}

async function readKept<T extends { format: number; key: string }>(file: string, key: string, schema: z.ZodType<T>): Promise<Omit<T, 'format'> | null> {
  try {
    const parsed = schema.safeParse(JSON.parse(await readFile(file, 'utf8')));
    if (!parsed.success || parsed.data.key !== key) return null;
    const { format: _format, ...entry } = parsed.data;
    return entry;
  } catch {
    return null;
  }
}

/** Writes the entry whole or not at all (a temporary file renamed over the old one). */
export async function writeEntry(file: string, entry: QualityEntry | CoverageEntry): Promise<void> {
  const temporary = `${file}.${process.pid}.${randomBytes(4).toString('hex')}.tmp`;
  try {
    await mkdir(dirname(file), { recursive: true });
    await writeFile(temporary, `${JSON.stringify({ format: FORMAT, ...entry })}\n`);
    await rename(temporary, file);
  } catch {
    await rm(temporary, { force: true }).catch(() => undefined);
  }
}
