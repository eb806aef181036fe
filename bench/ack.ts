// The chat side: `threadcount serve` in a child process, and a fixed number of requests sent at
// once through the local channel's HTTP API on 127.0.0.1, in rounds: one to warm up; then three
// times a round of GETs for unknown threads (the HTTP floor: a 404 and no bot work) and a round
// timing the API's acknowledgement (201, the message recorded); last a round that also reads each
// thread's event stream until the bot's first message. The bot is left to finish between rounds.
// Bounded in count (eight rounds) and time. With a PostgreSQL URL (THREADCOUNT_BENCH_PG_URL, else
// THREADCOUNT_TEST_PG_URL) the same server is measured again with its state in PostgreSQL (one
// replica of a team deployment): a warm-up round, then one round reading the bot's replies.
import { randomBytes } from 'node:crypto';
import { spawn } from 'node:child_process';
import { Agent, request } from 'node:http';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import pg from 'pg';
import { parseDocument } from 'yaml';
import { peakRssKb, stopChild } from './child-process.js';
import { packageRoot } from './data.js';
import { DEMO_REQUEST } from './plan.js';

export interface AckResult {
  /** Requests per round, all sent at once. */
  requests: number;
  /** Rounds of the 404 floor and of the acknowledgement (one round reads the bot's replies). */
  rounds: number;
  /** Requests of the two measured rounds that completed within the time limit. */
  completed: number;
  /** Request to the API's 201, with nothing else going on. */
  acceptedMs: number[];
  /** Request to the bot's first message, read from the thread's event stream. */
  acknowledgedMs: number[];
  /** Request to the 201 in the round where every sender also opened its thread's event stream. */
  acceptedWithStreamsMs: number[];
  /** The HTTP floor on this machine: the same number of requests for an unknown thread (404, no bot work). */
  notFoundMs: number[];
  /** The server's own time for the same answers, from its Server-Timing header (accepting the connection to writing the answer). */
  acceptedServerMs: number[];
  notFoundServerMs: number[];
  wallMs: number;
  serverMaxRssKb: number | null;
  /** The same server with its state in PostgreSQL; null when no URL was given. */
  shared: SharedAckResult | null;
  /** Why the PostgreSQL round failed, if it did. */
  sharedError?: string;
}

/** 200 requests at once to one replica keeping its state (threads, queue, audit) in PostgreSQL. */
export interface SharedAckResult {
  requests: number;
  /** Requests whose bot reply was read within the time limit. */
  completed: number;
  acceptedMs: number[];
  acknowledgedMs: number[];
  /** The replica's peak resident memory (Linux VmHWM), in KiB. */
  serverMaxRssKb: number | null;
}

const TIME_LIMIT_MS = 120_000;
const ROUNDS = 3;

export async function measureAck(configPath: string, requests = 200): Promise<AckResult> {
  const dir = mkdtempSync(join(tmpdir(), 'threadcount-bench-serve-'));
  const server = await startServer(configPath, join(dir, 'state.duckdb')).catch((err: unknown) => {
    rmSync(dir, { recursive: true, force: true });
    throw err;
  });
  // One socket per request, as separate senders would have; no pooling limit.
  const agent = new Agent({ keepAlive: false, maxSockets: Infinity });
  const deadline = Date.now() + TIME_LIMIT_MS;
  try {
    const round = async (label: string, readReply: boolean) => {
      const settled = await Promise.allSettled(Array.from({ length: requests }, (_, i) => oneRequest(server.url, agent, `${label} ${i}`, deadline, readReply)));
      const done = settled.flatMap((s) => (s.status === 'fulfilled' ? [s.value] : []));
      const failed = settled.find((s): s is PromiseRejectedResult => s.status === 'rejected');
      if (done.length === 0 && failed) throw failed.reason;
      // The bot goes on with each request (its reply, the next prompt): wait until it is done.
      await untilIdle(server.url, agent, deadline);
      return done;
    };
    // Unmeasured: the server's first requests pay for compiling and warming caches.
    await round('warm-up', true);
    // The short rounds three times each, alternating, so one unlucky moment does not decide the tail.
    const notFound: { ms: number; serverMs: number | null }[] = [];
    const accepted: { accepted: number; serverMs: number | null }[] = [];
    const started = performance.now();
    for (let r = 0; r < ROUNDS; r++) {
      notFound.push(...(await Promise.all(Array.from({ length: requests }, (_, i) => timedGet(server.url, agent, `api/threads/no-such-thread-${r}-${i}`, deadline)))));
      accepted.push(...(await round(`requester ${r}`, false)));
    }
    const replied = await round('follower', true);
    const wallMs = performance.now() - started;
    const stateUrl = process.env.THREADCOUNT_BENCH_PG_URL || process.env.THREADCOUNT_TEST_PG_URL;
    let shared: SharedAckResult | null = null;
    let sharedError: string | undefined;
    if (stateUrl) {
      shared = await measureSharedAck(configPath, stateUrl, requests, dir).catch((err: unknown) => {
        sharedError = err instanceof Error ? err.message : String(err);
        return null;
      });
    }
    return {
      requests,
      rounds: ROUNDS,
      completed: accepted.length + replied.length,
      acceptedMs: accepted.map((d) => d.accepted),
      acceptedServerMs: accepted.flatMap((d) => (d.serverMs === null ? [] : [d.serverMs])),
      notFoundServerMs: notFound.flatMap((d) => (d.serverMs === null ? [] : [d.serverMs])),
      acknowledgedMs: replied.map((d) => d.acknowledged!),
      acceptedWithStreamsMs: replied.map((d) => d.accepted),
      notFoundMs: notFound.map((d) => d.ms),
      wallMs,
      serverMaxRssKb: server.peakKb(),
      shared,
      ...(sharedError ? { sharedError } : {}),
    };
  } finally {
    agent.destroy();
    await server.stop();
    rmSync(dir, { recursive: true, force: true });
  }
}

/** One replica on PostgreSQL state (a schema of its own, dropped after): warm-up, then a round reading the replies. */
async function measureSharedAck(configPath: string, stateUrl: string, requests: number, dir: string): Promise<SharedAckResult> {
  const schema = `tc_bench_${randomBytes(4).toString('hex')}`;
  // Beside the original, so its relative data paths still resolve; removed after.
  const sharedConfig = join(dirname(configPath), `${schema}.yaml`);
  const doc = parseDocument(readFileSync(configPath, 'utf8'));
  doc.setIn(['conversation', 'state'], doc.createNode({ kind: 'postgres', url_env: 'THREADCOUNT_BENCH_STATE_URL', schema }));
  writeFileSync(sharedConfig, doc.toString());
  const server = await startServer(sharedConfig, join(dir, 'unused.duckdb'), { THREADCOUNT_BENCH_STATE_URL: stateUrl }).catch((err: unknown) => {
    rmSync(sharedConfig, { force: true });
    throw err;
  });
  const agent = new Agent({ keepAlive: false, maxSockets: Infinity });
  const deadline = Date.now() + TIME_LIMIT_MS;
  try {
    const round = async (label: string) => {
      const settled = await Promise.allSettled(Array.from({ length: requests }, (_, i) => oneRequest(server.url, agent, `${label} ${i}`, deadline, true)));
      await untilIdle(server.url, agent, deadline);
      return settled.flatMap((s) => (s.status === 'fulfilled' ? [s.value] : []));
    };
    await round('shared warm-up');
    const replied = await round('shared');
    return {
      requests,
      completed: replied.length,
      acceptedMs: replied.map((d) => d.accepted),
      acknowledgedMs: replied.map((d) => d.acknowledged!),
      serverMaxRssKb: server.peakKb(),
    };
  } finally {
    agent.destroy();
    await server.stop();
    rmSync(sharedConfig, { force: true });
    const client = new pg.Client({ connectionString: stateUrl });
    await client.connect();
    for (const s of [schema, `${schema}_queue`]) await client.query(`DROP SCHEMA IF EXISTS ${pg.escapeIdentifier(s)} CASCADE`);
    await client.end();
  }
}

/** The server's own holding time from its Server-Timing header ("held;dur=12.34"), or null. */
function heldMs(header: string | string[] | undefined): number | null {
  const m = /(?:^|,)\s*held;dur=(\d+(?:\.\d+)?)/.exec(Array.isArray(header) ? header.join(',') : (header ?? ''));
  return m ? Number(m[1]) : null;
}

/** A GET timed to the end of its response, whatever its status. */
function timedGet(baseUrl: string, agent: Agent, path: string, deadline: number): Promise<{ ms: number; serverMs: number | null }> {
  const started = performance.now();
  return new Promise((resolve, reject) => {
    const req = request(new URL(path, baseUrl), { agent, timeout: Math.max(1, deadline - Date.now()) }, (res) => {
      res.resume();
      res.on('end', () => resolve({ ms: performance.now() - started, serverMs: heldMs(res.headers['server-timing']) }));
    });
    req.on('timeout', () => req.destroy(new Error('the request ran past the time limit')));
    req.on('error', reject);
    req.end();
  });
}

/** Waits until every thread's last message is the bot asking something: nothing left to do. */
async function untilIdle(baseUrl: string, agent: Agent, deadline: number): Promise<void> {
  while (Date.now() < deadline) {
    const text = await new Promise<string>((resolve, reject) => {
      const req = request(new URL('api/threads', baseUrl), { agent }, (res) => {
        let body = '';
        res.setEncoding('utf8');
        res.on('data', (chunk: string) => (body += chunk));
        res.on('end', () => resolve(body));
      });
      req.on('error', reject);
      req.end();
    });
    const { threads } = JSON.parse(text) as { threads: { waiting: boolean }[] };
    if (threads.every((t) => t.waiting)) return;
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  throw new Error('the bot was still busy with the warm-up requests at the time limit');
}

/** POST the request; then read the thread's event stream until the bot's first message. */
async function oneRequest(
  baseUrl: string,
  agent: Agent,
  author: string,
  deadline: number,
  readReply: boolean,
): Promise<{ accepted: number; serverMs: number | null; acknowledged: number | null }> {
  const started = performance.now();
  const body = JSON.stringify({ author, text: DEMO_REQUEST });
  let serverMs: number | null = null;
  const created = await new Promise<string>((resolve, reject) => {
    const req = request(
      new URL('api/threads', baseUrl),
      { method: 'POST', agent, headers: { 'content-type': 'application/json', 'content-length': Buffer.byteLength(body) }, timeout: Math.max(1, deadline - Date.now()) },
      (res) => {
        serverMs = heldMs(res.headers['server-timing']);
        let text = '';
        res.setEncoding('utf8');
        res.on('data', (chunk: string) => (text += chunk));
        res.on('end', () => (res.statusCode === 201 ? resolve(text) : reject(new Error(`POST /api/threads answered ${res.statusCode}: ${text}`))));
      },
    );
    req.on('timeout', () => req.destroy(new Error('the request ran past the time limit')));
    req.on('error', reject);
    req.end(body);
  });
  const accepted = performance.now() - started;
  if (!readReply) return { accepted, serverMs, acknowledged: null };
  const { threadId } = JSON.parse(created) as { threadId: string };
  // The stream replays the thread's events from the start, so the reply cannot be missed.
  await new Promise<void>((resolve, reject) => {
    const req = request(new URL(`api/threads/${encodeURIComponent(threadId)}/events`, baseUrl), { agent, timeout: Math.max(1, deadline - Date.now()) }, (res) => {
      if (res.statusCode !== 200) return reject(new Error(`the event stream answered ${res.statusCode}`));
      let buffer = '';
      res.setEncoding('utf8');
      res.on('data', (chunk: string) => {
        buffer += chunk;
        let end: number;
        while ((end = buffer.indexOf('\n\n')) >= 0) {
          const block = buffer.slice(0, end);
          buffer = buffer.slice(end + 2);
          const type = /^event: (.+)$/m.exec(block)?.[1];
          const data = /^data: (.+)$/m.exec(block)?.[1];
          if (type === 'message.created' && data && (JSON.parse(data) as { fromBot?: boolean }).fromBot) {
            resolve();
            req.destroy();
            return;
          }
        }
      });
      res.on('end', () => reject(new Error('the event stream ended before the bot replied')));
    });
    req.on('timeout', () => req.destroy(new Error('the bot did not reply within the time limit')));
    req.on('error', (err) => reject(err));
    req.end();
  });
  return { accepted, serverMs, acknowledged: performance.now() - started };
}

export interface Server {
  url: string;
  pid: number;
  /** The server's peak resident memory so far (Linux: VmHWM), in KiB; null where unknown. */
  peakKb(): number | null;
  stop(): Promise<void>;
}

export async function startServer(configPath: string, statePath: string, extraEnv: Record<string, string> = {}): Promise<Server> {
  // Only the local channel: the chat platforms' tokens are left out of the child's environment.
  const env: NodeJS.ProcessEnv = {};
  for (const [k, v] of Object.entries(process.env)) if (!/^(SLACK|DISCORD)_/.test(k)) env[k] = v;
  env.THREADCOUNT_HOST = '127.0.0.1';
  env.THREADCOUNT_PORT = '0';
  Object.assign(env, extraEnv);
  const child = spawn(process.execPath, [join(packageRoot(), 'bin', 'threadcount.js'), 'serve', '--config', configPath, '--state', statePath], {
    env,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let stderr = '';
  child.stderr!.on('data', (chunk: Buffer) => (stderr += chunk.toString()));
  const url = await new Promise<string>((resolve, reject) => {
    let stdout = '';
    const timer = setTimeout(() => reject(new Error(`threadcount serve did not start within 30 s: ${stderr}`)), 30_000);
    child.stdout!.on('data', (chunk: Buffer) => {
      stdout += chunk.toString();
      const m = /Local channel: (http:\/\/127\.0\.0\.1:\d+\/)/.exec(stdout);
      if (m) {
        clearTimeout(timer);
        resolve(m[1]!);
      }
    });
    child.once('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`threadcount serve exited (${code}) before it listened: ${stderr}`));
    });
  });
  return { url, pid: child.pid!, peakKb: () => peakRssKb(child.pid), stop: () => stopChild(child) };
}
