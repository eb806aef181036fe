// Runs the threadcount command in this process, as its `main` is called by bin/threadcount.js,
// and returns its exit code with what it wrote to stdout and stderr.
import { vi } from 'vitest';
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
