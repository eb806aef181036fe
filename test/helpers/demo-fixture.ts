// The generated Skerrywake demo (invented data), built once per test process and size, so
// several tests in one file share one DuckDB file. Open it read-only: other tests may read it too.
import { rmSync } from 'node:fs';
import { mkdir, mkdtemp, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll } from 'vitest';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { generateDemo, type DemoResult } from '../../config/demo/generate-demo.js';
import { loadConfig } from '../../config/load.js';

// One folder per process, named "<pid>-<random>": test workers are often killed rather than
// exited, so each build also removes the folders of processes that no longer run.
const ROOT = join(tmpdir(), 'threadcount-demo-fixtures');
const built = new Map<number, Promise<DemoResult>>();

export async function demoFixture(rows = 200_000): Promise<DemoResult> {
  let demo = built.get(rows);
  if (!demo) {
    demo = build(rows);
    built.set(rows, demo);
    // A failed build should not poison later callers.
    demo.catch(() => built.delete(rows));
  }
  return demo;
}

/**
 * The demo's workspace for the tests of one file (or describe block): opened before them, closed
 * after. Read it through the returned function once the tests run.
 */
export function useDemoWorkspace(): () => Workspace {
  let ws: Workspace | undefined;
  beforeAll(async () => {
    ws = await openWorkspace(loadConfig((await demoFixture()).configPath));
  }, 300_000);
  afterAll(async () => ws?.source.close());
  return () => {
    if (!ws) throw new Error('the demo workspace is opened in beforeAll: read it inside a test');
    return ws;
  };
}

async function build(rows: number): Promise<DemoResult> {
  await mkdir(ROOT, { recursive: true });
  await removeLeftovers();
  const outDir = await mkdtemp(join(ROOT, `${process.pid}-`));
  process.once('exit', () => rmSync(outDir, { recursive: true, force: true }));
  return generateDemo({ outDir, rows });
}

async function removeLeftovers(): Promise<void> {
  for (const name of await readdir(ROOT)) {
    const pid = Number(name.split('-')[0]);
    if (Number.isInteger(pid) && pid > 0 && !isRunning(pid)) await rm(join(ROOT, name), { recursive: true, force: true });
  }
}

function isRunning(pid: number): boolean {
  try {
    process.kill(pid, 0); // signal 0 only checks that the process exists
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}
