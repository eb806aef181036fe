// The embedded engine's memory settings on the demo (invented data), in real DuckDB: a bounded
// memory limit unless the config sets one, and spills into a folder of its own under the
// system's temporary folder that is gone once the engine closes.
import { existsSync, readdirSync } from 'node:fs';
import { tmpdir, totalmem } from 'node:os';
import { dirname } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import type { DataSource } from '../../analysis/sources/data-source.js';
import { DEFAULT_MEMORY_LIMIT, defaultMemoryLimit, DuckDbSource } from '../../analysis/sources/duckdb-source.js';
import type { EngineConfig } from '../../config/schema.js';
import { demoFixture } from '../helpers/demo-fixture.js';

const RUN = { maxRows: 1000, timeoutMs: 60_000 };
const sources: DataSource[] = [];
afterEach(async () => {
  for (const s of sources.splice(0)) await s.close();
});

async function open(engine: Partial<EngineConfig> = {}): Promise<DuckDbSource> {
  const demo = await demoFixture();
  const source = await DuckDbSource.open({
    source: { kind: 'duckdb', path: demo.databasePath },
    paths: [demo.databasePath],
    table: 'bookings',
    engine: { statement_timeout_ms: 60_000, max_result_rows: 1000, ...engine },
  });
  sources.push(source);
  return source;
}

async function settings(source: DataSource): Promise<{ memoryLimit: string; tempDirectory: string }> {
  const t = await source.run({ sql: "SELECT current_setting('memory_limit') AS m, current_setting('temp_directory') AS t", params: [] }, RUN);
  return { memoryLimit: String(t.rows[0]!.m), tempDirectory: String(t.rows[0]!.t) };
}

// Grouping two million text keys (each seen twice): far more than 64 MB of hash table.
const REPEATED = { sql: "SELECT COUNT(*) AS keys FROM (SELECT 'key-' || (i % 2000000) AS k FROM range(4000000) t(i) GROUP BY k HAVING COUNT(*) > 1)", params: [] };

describe('DuckDbSource memory settings', () => {
  it('bounds the memory by default to half the machine\'s and takes the config\'s limit when set', async () => {
    // DuckDB shows a limit in binary units, cut to one decimal (1 GB, 10^9 bytes, is 953.6 MiB), or in GiB from 1000 MiB up.
    const shown = (bytes: number) => {
      const mib = bytes / 2 ** 20;
      return mib >= 1000 ? `${(Math.floor((mib / 1024) * 10) / 10).toFixed(1)} GiB` : `${(Math.floor(mib * 10) / 10).toFixed(1)} MiB`;
    };
    expect(DEFAULT_MEMORY_LIMIT).toBe(`${Math.floor(totalmem() / 2 / 2 ** 20)}MiB`);
    expect(defaultMemoryLimit(8 * 2 ** 30)).toBe('4096MiB');
    expect(defaultMemoryLimit(300 * 2 ** 20)).toBe('256MiB');
    expect((await settings(await open())).memoryLimit).toBe(shown(Math.floor(totalmem() / 2 / 2 ** 20) * 2 ** 20));
    expect((await settings(await open({ memory_limit: '1GB' }))).memoryLimit).toBe(shown(1e9));
  });

  it('spills under a tight limit into its own temporary folder, with the same answer, and leaves nothing behind', async () => {
    const roomy = await open({ memory_limit: '1GB' });
    const expected = (await roomy.run(REPEATED, RUN)).rows[0]!.keys;
    const tight = await open({ memory_limit: '64MB', threads: 1 });
    const { tempDirectory } = await settings(tight);
    expect(dirname(tempDirectory)).toBe(tmpdir());
    expect(tempDirectory).not.toBe((await settings(roomy)).tempDirectory);
    let spilled = 0;
    const watch = setInterval(() => {
      if (existsSync(tempDirectory)) spilled = Math.max(spilled, readdirSync(tempDirectory).length);
    }, 5);
    try {
      expect((await tight.run(REPEATED, RUN)).rows[0]!.keys).toBe(expected);
    } finally {
      clearInterval(watch);
    }
    expect(expected).toBe(2_000_000);
    expect(spilled).toBeGreaterThan(0);
    await tight.close();
    sources.splice(sources.indexOf(tight), 1);
    expect(existsSync(tempDirectory)).toBe(false);
  });

  it('retries a query that runs out of memory once on one thread, and says so when that fails too', async () => {
    // A list of ten million numbers cannot spill: it needs far more than 16 MB on any plan.
    const tight = await open({ memory_limit: '16MB' });
    const sql = { sql: 'SELECT list(i) AS l FROM range(10000000) t(i)', params: [] };
    await expect(tight.run(sql, RUN)).rejects.toThrow(/ran out of memory, and again when retried on one thread/);
    // The engine's thread count is back as it was.
    const t = await tight.run({ sql: "SELECT current_setting('threads') AS t", params: [] }, RUN);
    expect(Number(t.rows[0]!.t)).toBeGreaterThan(0);
  });
});
