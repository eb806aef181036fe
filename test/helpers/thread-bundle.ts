// Checks a thread's zip against the files the thread itself posted, unzipped with fflate (the
// same library that wrote it; its reader follows the ZIP format's central directory, PKWARE APPNOTE).
import { unzipSync } from 'fflate';
import { expect } from 'vitest';

export interface PostedFile {
  name: string;
  bytes: Buffer;
}

/** The zip's entries by path. */
export function unzipBundle(zip: Uint8Array): Map<string, Buffer> {
  return new Map(Object.entries(unzipSync(zip)).map(([path, bytes]) => [path, Buffer.from(bytes)]));
}

/**
 * The zip holds every chart, table and SQL file the thread posted, byte for byte, and the digest,
 * and nothing else but the summary's text; returns its entries.
 */
export function expectBundleHoldsThread(zip: Uint8Array, posted: PostedFile[]): Map<string, Buffer> {
  const entries = unzipBundle(zip);
  const threadFiles = posted.filter((f) => !f.name.endsWith('.zip'));
  expect(threadFiles.some((f) => f.name.endsWith('.png') && f.name !== 'digest.png'), 'the thread posted a chart').toBe(true);
  expect(threadFiles.some((f) => f.name.endsWith('.csv')), 'the thread posted a table').toBe(true);
  expect(threadFiles.some((f) => f.name.endsWith('.sql')), 'the thread posted its SQL').toBe(true);
  expect(threadFiles.map((f) => f.name), 'the thread posted the digest').toContain('digest.png');
  const byName = new Map([...entries].map(([path, bytes]) => [path.split('/').pop()!, { path, bytes }]));
  for (const f of threadFiles) {
    const entry = byName.get(f.name);
    expect(entry, `${f.name} is in the zip`).toBeDefined();
    expect(entry!.bytes.equals(f.bytes), `${f.name} is the same bytes in the zip`).toBe(true);
  }
  expect(entries.get('summary.txt')?.toString('utf8')).toMatch(/^\*Summary\*/);
  expect([...entries.keys()].sort()).toEqual([...threadFiles.map((f) => byName.get(f.name)!.path), 'summary.txt'].sort());
  // Charts, tables and SQL sit in folders of their own; the digest at the top.
  expect(byName.get('digest.png')!.path).toBe('digest.png');
  for (const [path] of entries) if (path.endsWith('.csv')) expect(path).toMatch(/^tables\//);
  return entries;
}
