// The chat side under load. First a burst: 200 requests at once (bench/ack.ts), with the time from
// each request to the bot's first reply in its thread. Then many runs: `threadcount serve` (a child process, the embedded state file) is
// given one request after another through the local channel's API, each taken from its brief card
// to its summary with "go", and its resident memory (VmRSS, from /proc) is read after runs 10, 50
// and 100. Charts, tables and SQL live in the state file, not in the process, so memory should
// level off rather than grow with every run (issue 18: within 10% from run 10 to run 100).
//   npm run bench:chat-memory [-- --runs N] [--no-burst]
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { generateDemo } from '../config/demo/generate-demo.js';
import { measureAck, startServer } from './ack.js';

interface Message {
  fromBot: boolean;
  text: string;
  quickReplies?: unknown[];
}

const REQUESTS = [
  'How has revenue moved over time, month by month?',
  'Which routes brought in the most bookings this year?',
  'Where does average fare per passenger stand this month against last month?',
];

function rssKb(pid: number): number {
  const m = /^VmRSS:\s+(\d+) kB$/m.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
  if (!m) throw new Error('no VmRSS in /proc');
  return Number(m[1]);
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
}

async function main(): Promise<void> {
  const i = process.argv.indexOf('--runs');
  const runs = i > 0 ? Number(process.argv[i + 1]) : 100;
  const marks = new Set([10, Math.round(runs / 2), runs]);
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
    const server = await startServer(demo.configPath, join(dir, 'state.duckdb'));
    const pid = server.pid;
    const rows: string[] = [];
    const started = Date.now();
    try {
      for (let n = 1; n <= runs; n++) {
        await oneRun(server.url, REQUESTS[(n - 1) % REQUESTS.length]!);
        if (marks.has(n)) {
          const kb = rssKb(pid);
          rows.push(`| ${n} | ${(kb / 1024).toFixed(0)} |`);
          process.stderr.write(`after run ${n}: RSS ${(kb / 1024).toFixed(0)} MB\n`);
        }
      }
    } finally {
      await server.stop();
    }
    const seconds = ((Date.now() - started) / 1000).toFixed(0);
    process.stdout.write(
      [`${runs} runs one after another on the demo data (${REQUESTS.length} requests in turn, each from its card to its summary), ${seconds} s; the server's resident memory (VmRSS) after:`, '', '| runs | RSS (MB) |', '|---|---|', ...rows, ''].join('\n'),
    );
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

void main().catch((err: unknown) => {
  process.stderr.write(`${err instanceof Error ? err.stack : String(err)}\n`);
  process.exitCode = 1;
});
