// Expected chart specs live as JSON files beside the tests. Numbers are rounded to six
// significant digits before comparing, so float noise in the last bits never fails a test.
// A mismatch writes `<name>-changed.json` next to the expected file for review (git-ignored).
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { significant } from '../../../analysis/format.js';

const EXPECTED_DIR = join(dirname(fileURLToPath(import.meta.url)), 'expected');

export function roundNumbers(value: unknown): unknown {
  if (typeof value === 'number') return Number.isFinite(value) ? significant(value, 6) : String(value);
  if (Array.isArray(value)) return value.map(roundNumbers);
  if (value !== null && typeof value === 'object') {
    return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, roundNumbers(v)]));
  }
  return value;
}

export interface SnapshotOutcome {
  ok: boolean;
  message: string;
}

/** Compares `value` with `expected/<name>.json`; see the file comment for what happens on a mismatch. */
export function checkSnapshot(name: string, value: unknown): SnapshotOutcome {
  const text = `${JSON.stringify(roundNumbers(value), null, 2)}\n`;
  const expectedPath = join(EXPECTED_DIR, `${name}.json`);
  const changedPath = join(EXPECTED_DIR, `${name}-changed.json`);
  if (!existsSync(expectedPath)) {
    if (process.env['CI'] === 'true') {
      return { ok: false, message: `missing expected file ${expectedPath} (not written under CI=true)` };
    }
    mkdirSync(EXPECTED_DIR, { recursive: true });
    writeFileSync(expectedPath, text);
    return { ok: true, message: `wrote new expected file ${expectedPath}` };
  }
  const expected = readFileSync(expectedPath, 'utf8');
  if (expected === text) {
    if (existsSync(changedPath)) rmSync(changedPath);
    return { ok: true, message: 'matches' };
  }
  writeFileSync(changedPath, text);
  return { ok: false, message: `spec differs from ${expectedPath}; see ${changedPath}` };
}
