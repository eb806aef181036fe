// The snapshot helper itself: first run writes, a mismatch writes -changed and fails, CI never writes.
import { existsSync, readFileSync, rmSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterEach, describe, expect, it } from 'vitest';
import { checkSnapshot, roundNumbers } from './snapshot.js';

const dir = join(dirname(fileURLToPath(import.meta.url)), 'expected');
const name = `zz-selftest-${process.pid}`;
const expectedPath = join(dir, `${name}.json`);
const changedPath = join(dir, `${name}-changed.json`);

afterEach(() => {
  rmSync(expectedPath, { force: true });
  rmSync(changedPath, { force: true });
  delete process.env['CI'];
});

describe('checkSnapshot', () => {
  it('rounds numbers to six significant digits', () => {
    expect(roundNumbers({ a: [1234567.891, 0.1 + 0.2], b: 'x', c: null })).toEqual({ a: [1234570, 0.3], b: 'x', c: null });
  });

  it('writes a missing expected file outside CI, refuses under CI=true', () => {
    process.env['CI'] = 'true';
    expect(checkSnapshot(name, { v: 1 }).ok).toBe(false);
    expect(existsSync(expectedPath)).toBe(false);
    delete process.env['CI'];
    expect(checkSnapshot(name, { v: 1 }).ok).toBe(true);
    expect(JSON.parse(readFileSync(expectedPath, 'utf8'))).toEqual({ v: 1 });
  });

  it('ignores float noise, fails on a real change and writes the -changed file', () => {
    checkSnapshot(name, { v: 0.3 });
    expect(checkSnapshot(name, { v: 0.1 + 0.2 }).ok).toBe(true);
    const outcome = checkSnapshot(name, { v: 0.31 });
    expect(outcome.ok).toBe(false);
    expect(JSON.parse(readFileSync(changedPath, 'utf8'))).toEqual({ v: 0.31 });
    expect(checkSnapshot(name, { v: 0.3 }).ok).toBe(true);
    expect(existsSync(changedPath)).toBe(false);
  });
});
