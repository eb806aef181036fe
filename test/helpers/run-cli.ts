// Runs the threadcount command in this process, as its `main` is called by bin/threadcount.js,
// and returns its exit code with what it wrote to stdout and stderr.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { expect, vi } from 'vitest';
import { main } from '../../cli/main.js';

export async function runCli(args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((s) => ((out += String(s)), true));
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((s) => ((err += String(s)), true));
  try {
    return { code: await main(args), out, err };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

/**
 * Runs `threadcount ask --config config --request request --out out` (default answers), expects it
 * to exit 0 (stderr shown if not) and returns the texts of the thread's posts, in order.
 */
export async function askPostTexts(config: string, request: string, out: string): Promise<string[]> {
  const r = await runCli(['ask', '--config', config, '--request', request, '--out', out]);
  expect(r.code, r.err).toBe(0);
  return (JSON.parse(readFileSync(join(out, 'thread.json'), 'utf8')) as { posts: { text: string }[] }).posts.map((p) => p.text);
}
