// The chat side under load. First a burst: 200 requests at once (bench/ack.ts), with the time from
// each request to the bot's first reply in its thread. Then many runs: `threadcount serve` on the
// embedded state file is given one request after another through the local channel's API, each
// taken from its brief card to its summary with "go", and its memory is read every 10 runs. Charts,
// tables and SQL live in the state file, not in the process, so memory should level off rather
// than grow with every run (issue 18: RSS within 10% from run 10 to run 100).
//
// The runs use serve in this process (the same function `threadcount serve` calls), so each reading
// can follow a full garbage collection (`node --expose-gc`: garbage V8 has not yet collected is not
// growth) and can name its parts: the JavaScript heap, and what each DuckDB engine reports it holds
// (duckdb_memory(), against its memory_limit). The npm script sets glibc's allocator as the Docker
// image does (cli/allocator.ts); the readings say which settings were in force.
//   npm run bench:chat-memory [-- --runs N] [--no-burst]
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { generateDemo } from '../config/demo/generate-demo.js';
import { parseEnvironment } from '../config/environment.js';
import { SERVE_ALLOCATOR_ENV } from '../cli/allocator.js';
import { serve } from '../cli/serve.js';
import { measureAck } from './ack.js';

interface Message {
  fromBot: boolean;
  text: string;
  quickReplies?: unknown[];
  files?: { kind: string }[];
}

const REQUESTS = [
  'How has revenue moved over time, month by month?',
  'Which routes brought in the most bookings this year?',
  'Where does average fare per passenger stand this month against last month?',
];

// Every DuckDB engine this process opens (the datasets', the state file's), so each reading can ask
// it what it holds. Recorded by wrapping the library's factory: the bench's own bookkeeping only.
const engines: { name: string; instance: DuckDBInstance }[] = [];
function recordEngines(): void {
  const create = DuckDBInstance.create.bind(DuckDBInstance);
  (DuckDBInstance as unknown as { create: typeof create }).create = async (path, options) => {
    const instance = await create(path, options);
    engines.push({ name: path && path !== ':memory:' ? 'state store' : 'dataset engine', instance });
    return instance;
  };
}

interface EngineMemory {
  name: string;
  usedBytes: number;
  limit: string;
}

async function engineMemory(): Promise<EngineMemory[]> {
  const out: EngineMemory[] = [];
  for (const e of engines) {
    let c;
    try {
      c = await e.instance.connect();
    } catch {
      continue; // closed: a check that opened the file and let it go
    }
    try {
      const r = await c.runAndReadAll("SELECT (SELECT COALESCE(SUM(memory_usage_bytes), 0) FROM duckdb_memory())::DOUBLE AS used, current_setting('memory_limit') AS lim");
      const row = r.getRowObjectsJson()[0]!;
      out.push({ name: e.name, usedBytes: Number(row.used), limit: String(row.lim) });
    } finally {
      c.closeSync();
    }
  }
  return out;
}

interface Reading {
  runs: number;
  rss: number;
  heapUsed: number;
  engines: EngineMemory[];
}

async function read(runs: number): Promise<Reading> {
  const gc = (globalThis as { gc?: () => void }).gc;
  if (!gc) throw new Error('run with node --expose-gc (npm run bench:chat-memory does)');
  // Twice: the first pass may leave finalisers whose objects the second frees.
  gc();
  gc();
  const m = process.memoryUsage();
  return { runs, rss: m.rss, heapUsed: m.heapUsed, engines: await engineMemory() };
}

async function api<T>(url: string, path: string, body?: unknown): Promise<T> {
  const res = await fetch(`${url}${path}`, body ? { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) } : {});
  if (res.status >= 300) throw new Error(`${path}: HTTP ${res.status}`);
  return (await res.json()) as T;
}

async function until<T>(what: string, check: () => Promise<T | undefined>, timeoutMs = 300_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await check();
    if (v !== undefined) return v;
    if (Date.now() > end) throw new Error(`gave up waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

async function oneRun(url: string, request: string): Promise<void> {
  const { threadId } = await api<{ threadId: string }>(url, 'api/threads', { author: 'bench', text: request });
  const messages = async () => (await api<{ messages: Message[] }>(url, `api/threads/${threadId}`)).messages;
  await until('the brief card', async () => ((await messages()).some((m) => m.fromBot && m.quickReplies?.length) ? true : undefined));
  await api(url, `api/threads/${threadId}/messages`, { author: 'bench', text: 'go' });
  await until('the summary', async () => ((await messages()).some((m) => m.fromBot && m.text.startsWith('*Summary*')) ? true : undefined));
  // The thread's zip follows its summary in a post of its own: a reading taken before it lands
  // would count the zip being built (transient) as memory kept.
  await until('the thread\'s zip', async () => ((await messages()).some((m) => m.fromBot && m.files?.some((f) => f.kind === 'bundle')) ? true : undefined));
}

const mb = (bytes: number) => (bytes / 2 ** 20).toFixed(0);

async function main(): Promise<void> {
  const i = process.argv.indexOf('--runs');
  const runs = i > 0 ? Number(process.argv[i + 1]) : 100;
  const dir = mkdtempSync(join(tmpdir(), 'threadcount-bench-chat-memory-'));
  try {
    const demo = await generateDemo({ outDir: join(dir, 'demo') });
    if (!process.argv.includes('--no-burst')) {
      // Without PostgreSQL: the embedded state file only.
      delete process.env.THREADCOUNT_BENCH_PG_URL;
      delete process.env.THREADCOUNT_TEST_PG_URL;
      const burst = await measureAck(demo.configPath, 200);
      const q = (xs: number[], p: number) => {
        const sorted = [...xs].sort((a, b) => a - b);
        return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)]!;
      };
      process.stdout.write(
        [
          `200 requests at once to serve on the state file, after a warm-up round (${burst.acknowledgedMs.length} of 200 replied within the limit):`,
          '',
          '| from the request to | p50 (ms) | p99 (ms) |',
          '|---|---|---|',
          `| the API's 201 | ${q(burst.acceptedMs, 50).toFixed(0)} | ${q(burst.acceptedMs, 99).toFixed(0)} |`,
          `| the bot's first reply in the thread | ${q(burst.acknowledgedMs, 50).toFixed(0)} | ${q(burst.acknowledgedMs, 99).toFixed(0)} |`,
          '',
          '',
        ].join('\n'),
      );
    }
    // The runs: serve in this process, the local channel only (no chat platform's tokens).
    const env: Record<string, string | undefined> = {};
    for (const [k, v] of Object.entries(process.env)) if (!/^(SLACK|DISCORD)_/.test(k)) env[k] = v;
    env.THREADCOUNT_HOST = '127.0.0.1';
    env.THREADCOUNT_PORT = '0';
    recordEngines();
    const server = await serve({ configFile: demo.configPath, statePath: join(dir, 'state.duckdb'), environment: parseEnvironment(env), log: () => undefined });
    const readings: Reading[] = [];
    const started = Date.now();
    try {
      readings.push(await read(0));
      for (let n = 1; n <= runs; n++) {
        await oneRun(server.localUrl, REQUESTS[(n - 1) % REQUESTS.length]!);
        if (n % 10 === 0) {
          await server.inbox.idle();
          const r = await read(n);
          readings.push(r);
          process.stderr.write(`after run ${n}: RSS ${mb(r.rss)} MB\n`);
        }
      }
    } finally {
      await server.stop();
    }
    const seconds = ((Date.now() - started) / 1000).toFixed(0);
    const names = readings[0]!.engines.map((e) => `${e.name} (limit ${e.limit})`);
    const at = (n: number) => readings.find((r) => r.runs === n);
    const first = at(10);
    const last = at(runs);
    const verdict =
      first && last && runs >= 10
        ? `RSS after ${runs} runs is ${(((last.rss - first.rss) / first.rss) * 100).toFixed(1)}% from RSS after 10 (${mb(first.rss)} to ${mb(last.rss)} MB): ${Math.abs(last.rss - first.rss) <= first.rss * 0.1 ? 'within' : '**not** within'} the issue's 10%.`
        : '';
    process.stdout.write(
      [
        `${runs} runs one after another on the demo data (${REQUESTS.length} requests in turn, each from its card to its summary), ${seconds} s; ${Object.keys(SERVE_ALLOCATOR_ENV).map((k) => `${k}=${process.env[k] ?? 'unset'}`).join(', ')}. Memory after a full garbage collection, in MB: the process's resident set (RSS), the JavaScript heap in use, and what each DuckDB engine reports it holds (duckdb_memory()):`,
        '',
        `| runs | RSS | JS heap used | ${names.join(' | ')} |`,
        `|---|---|---|${names.map(() => '---|').join('')}`,
        ...readings.map((r) => `| ${r.runs} | ${mb(r.rss)} | ${mb(r.heapUsed)} | ${r.engines.map((e) => mb(e.usedBytes)).join(' | ')} |`),
        '',
        verdict,
        '',
      ].join('\n'),
    );
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

void main().catch((err: unknown) => {
  process.stderr.write(`${err instanceof Error ? err.stack : String(err)}\n`);
  process.exitCode = 1;
});
