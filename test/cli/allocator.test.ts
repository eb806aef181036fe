// glibc's allocator settings for a long-running serve: one list (cli/allocator.ts), set the same way
// by the memory bench, and named by serve at start-up when missing. Their effect on memory is
// measured by bench:chat-memory (BENCHMARKS.md), not asserted here.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { allocatorNote, SERVE_ALLOCATOR_ENV } from '../../cli/allocator.js';

describe('allocator settings for serve', () => {
  it('names only the missing settings on glibc, and nothing elsewhere', () => {
    const all = { ...SERVE_ALLOCATOR_ENV };
    expect(allocatorNote(all, true)).toBeUndefined();
    expect(allocatorNote({}, false)).toBeUndefined();
    const note = allocatorNote({ MALLOC_ARENA_MAX: '4' }, true)!;
    expect(note).toMatch(/MALLOC_MMAP_THRESHOLD_=131072 MALLOC_TRIM_THRESHOLD_=131072/);
    // One set to another value is the operator's choice, not missing.
    expect(note).not.toMatch(/MALLOC_ARENA_MAX/);
  });

  it('the memory bench runs with the same settings', () => {
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { scripts: Record<string, string> };
    for (const [name, value] of Object.entries(SERVE_ALLOCATOR_ENV)) expect(pkg.scripts['bench:chat-memory']).toContain(`${name}=${value}`);
  });
});
