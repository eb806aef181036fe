// The audit log: who asked what, which SQL ran, what was posted. A demo conversation's log is
// checked against what the thread itself received (the posts' keys and texts, the SQL files
// attached), the DuckDB store keeps it across a reopen, and `threadcount audit` prints it.
import { copyFileSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pLimit from 'p-limit';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { sqlForReaders } from '../../analysis/sql/render-sql.js';
import type { NamedQuery } from '../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { Bot } from '../../bot/Bot.js';
import type { OutgoingPost, ThreadPort } from '../../bot/port.js';
import { presentAnswer, presentSummary } from '../../bot/present-answer.js';
import { playScriptedConversation } from '../../bot/scripted-conversation.js';
import { DuckDbStateStore } from '../../bot/stores/DuckDbStateStore.js';
import { MemoryStateStore } from '../../bot/stores/MemoryStateStore.js';
import type { AuditEntry, StateStore } from '../../bot/thread-state.js';
import { main } from '../../cli/main.js';
import { loadConfig } from '../../config/load.js';
import { auditEntry } from '../helpers/audit-entry.js';
import { demoFixture } from '../helpers/demo-fixture.js';
import { EXAMPLE_CONFIG_PATH } from '../helpers/example-config.js';

interface Posted {
  key: string;
  text: string;
  files: { name: string; content: string | null }[];
}

class KeyedPort implements ThreadPort {
  readonly posts: Posted[] = [];
  async post(_threadId: string, post: OutgoingPost): Promise<string> {
    this.posts.push({
      key: post.key,
      text: post.text,
      files: (post.files ?? []).map((f) => ({ name: f.name, content: f.kind === 'sql' ? String(f.content) : null })),
    });
    return String(this.posts.length - 1);
  }
  async update(): Promise<void> {}
}

let ws: Workspace;
beforeAll(async () => {
  const config = loadConfig((await demoFixture()).configPath);
  // A state folder of its own: the quality cache beside it starts empty, so the run's check runs (and is logged).
  const stateDir = mkdtempSync(join(tmpdir(), 'threadcount-audit-state-'));
  ws = await openWorkspace({ ...config, conversation: { ...config.conversation, state_path: join(stateDir, 'state.duckdb') } });
});
afterAll(async () => {
  await ws?.source.close();
});

const now = new Date('2026-12-01T09:00:00Z');
const REQUEST =
  'Ops review is on the 15th. Could the data team tell us whether this summer beat last summer, which routes and booking channels drove the difference, whether SkerryPass holders really travel more often than other customers since it launched, and where average fare per passenger and the share of revenue we refunded stand for the last full month?';

describe('the audit log of a demo conversation', () => {
  let port: KeyedPort;
  let audit: AuditEntry[];
  const said: string[] = [];

  beforeAll(async () => {
    port = new KeyedPort();
    const store: StateStore = new MemoryStateStore();
    const bot = new Bot({ workspace: ws, port, store, now: () => now, presentAnswer, presentSummary, jobs: pLimit(3) });
    const end = await playScriptedConversation({
      bot,
      store,
      threadId: 'local:audit',
      requester: 'maren',
      channel: 'local',
      request: REQUEST,
      answers: { metrics: 'revenue', audience: 'managers' },
      onRequesterMessage: (text) => said.push(text),
    });
    expect(end).toBe('done');
    audit = await store.listAudit();
  });

  it('opens with the request: who asked, in which channel, the text and the dataset', () => {
    expect(audit[0]).toEqual({
      at: now.toISOString(),
      threadId: 'local:audit',
      requester: 'maren',
      channel: 'local',
      kind: 'request',
      detail: { text: REQUEST, dataset: 'bookings' },
    });
    // Every later message of the requester, in the order sent.
    expect(audit.filter((e) => e.kind === 'message').map((e) => e.detail.text)).toEqual(said.slice(1));
    expect(said.length).toBeGreaterThan(1);
  });

  it('lists every post the thread received, by key, in order, with its first text and files', () => {
    // Edits in place (the brief card once agreed) are logged under keys of their own, naming the post they replace.
    const edits = audit.filter((e) => e.kind === 'post' && e.detail.edits);
    expect(edits.length).toBeGreaterThan(0);
    for (const e of edits) expect(port.posts.map((p) => p.key)).toContain(e.detail.edits);
    const posts = audit.filter((e) => e.kind === 'post' && !e.detail.edits);
    expect(posts.map((e) => e.detail.key)).toEqual(port.posts.map((p) => p.key));
    // The progress message is edited later; the log keeps what was first posted.
    expect(posts.map((e) => e.detail.files)).toEqual(port.posts.map((p) => p.files.map((f) => f.name)));
    expect(posts.filter((e) => !String(e.detail.key).includes(':progress')).map((e) => e.detail.text)).toEqual(
      port.posts.filter((p) => !p.key.includes(':progress')).map((p) => p.text),
    );
    expect(posts.every((e) => e.requester === 'maren' && e.channel === 'local')).toBe(true);
  });

  it('logs the run\'s data-quality queries before any answer\'s SQL', () => {
    const quality = audit.filter((e) => e.kind === 'sql' && e.detail.template === 'quality_check');
    // The counts by day, and the repeated-key count over the configured key column.
    expect(quality.map((e) => e.detail.query)).toEqual(['quality', 'quality_keys']);
    expect(quality.every((e) => e.detail.subQuestion === null)).toBe(true);
    expect(String(quality[1]!.detail.sql)).toContain('GROUP BY "booking_id"');
    const firstAnswerSql = audit.findIndex((e) => e.kind === 'sql' && e.detail.subQuestion !== null);
    expect(audit.indexOf(quality[1]!)).toBeLessThan(firstAnswerSql);
  });

  it('lists every SQL that ran, equal to the SQL files attached, each before its answer\'s post', () => {
    const sql = audit.filter((e) => e.kind === 'sql' && e.detail.subQuestion !== null);
    const answers = port.posts.filter((p) => p.files.some((f) => f.name.endsWith('.sql')));
    expect(answers.length).toBeGreaterThanOrEqual(12);
    const ids = answers.map((p) => /:answer:(.+)$/.exec(p.key)![1]!);
    // Exactly the sub-questions that attached SQL, in posting order.
    expect([...new Set(sql.map((e) => e.detail.subQuestion))]).toEqual(ids);
    for (const [i, post] of answers.entries()) {
      const mine = sql.filter((e) => e.detail.subQuestion === ids[i]);
      const queries: NamedQuery[] = mine.map((e) => ({ name: String(e.detail.query), sql: String(e.detail.sql), params: e.detail.params as NamedQuery['params'] }));
      // The attached file is the same queries written for readers: same statements, same bound values.
      expect(sqlForReaders(queries, 'duckdb')).toBe(post.files.find((f) => f.name.endsWith('.sql'))!.content);
      // Each query is logged after the previous answer's post and before its own.
      const postAt = audit.findIndex((e) => e.kind === 'post' && e.detail.key === post.key);
      const previousAt = i === 0 ? 0 : audit.findIndex((e) => e.kind === 'post' && e.detail.key === answers[i - 1]!.key);
      for (const e of mine) {
        const at = audit.indexOf(e);
        expect(at).toBeGreaterThan(previousAt);
        expect(at).toBeLessThan(postAt);
      }
    }
    expect(sql.every((e) => e.detail.dataset === 'bookings' && typeof e.detail.template === 'string')).toBe(true);
  });
});

describe('the audit log in the DuckDB state file', () => {
  const dir = mkdtempSync(join(tmpdir(), 'threadcount-audit-'));
  const entry = auditEntry;
  const entries = [
    entry('t1', '2026-11-30T23:59:59.000Z', 'request', { text: 'revenue trend' }),
    entry('t2', '2026-12-01T08:00:00.000Z', 'request', { text: 'bookings trend' }),
    entry('t1', '2026-12-01T09:00:00.000Z', 'sql', { subQuestion: 'q1', sql: 'SELECT $1', params: ['2024-01-01', 3, true] }),
    entry('t1', '2026-12-01T09:00:01.000Z', 'post', { key: 't1:ack:0', text: 'On it', files: [] }),
  ];

  it('keeps entries in the order written, across a reopen, and filters by thread and time', async () => {
    const path = join(dir, 'state.duckdb');
    const store = await DuckDbStateStore.open(path);
    for (const e of entries.slice(0, 2)) await store.appendAudit(e);
    await store.close();
    const again = await DuckDbStateStore.open(path);
    for (const e of entries.slice(2)) await again.appendAudit(e);
    expect(await again.listAudit()).toEqual(entries);
    expect(await again.listAudit({ threadId: 't1' })).toEqual([entries[0], entries[2], entries[3]]);
    expect(await again.listAudit({ since: '2026-12-01' })).toEqual(entries.slice(1));
    expect(await again.listAudit({ threadId: 't1', since: '2026-12-01T09:00:01.000Z' })).toEqual([entries[3]]);
    await again.close();
    // Read-only, as `threadcount audit` opens it.
    const reader = await DuckDbStateStore.open(path, { readOnly: true });
    expect(await reader.listAudit()).toEqual(entries);
    await reader.close();
  });

  it('the memory store gives the same answers', async () => {
    const store = new MemoryStateStore();
    for (const e of entries) await store.appendAudit(e);
    expect(await store.listAudit({ threadId: 't1', since: '2026-12-01' })).toEqual([entries[2], entries[3]]);
  });

  describe('threadcount audit', () => {
    let stdout = '';
    let stderr = '';
    const capture = () => {
      stdout = '';
      stderr = '';
      vi.spyOn(process.stdout, 'write').mockImplementation((s) => ((stdout += String(s)), true));
      vi.spyOn(process.stderr, 'write').mockImplementation((s) => ((stderr += String(s)), true));
    };
    afterEach(() => vi.restoreAllMocks());

    it('prints the log as JSON lines, filtered by --thread and --since, from the state file beside the config', async () => {
      const cfgDir = mkdtempSync(join(tmpdir(), 'threadcount-audit-cli-'));
      const config = join(cfgDir, 'threadcount.yaml');
      copyFileSync(EXAMPLE_CONFIG_PATH, config);
      const store = await DuckDbStateStore.open(join(cfgDir, 'threadcount-state.duckdb'));
      for (const e of entries) await store.appendAudit(e);
      await store.close();
      capture();
      expect(await main(['audit', '--config', config, '--thread', 't1', '--since', '2026-12-01'])).toBe(0);
      const lines = stdout.trim().split('\n').map((l) => JSON.parse(l) as AuditEntry);
      expect(lines).toEqual([entries[2], entries[3]]);
      // Keys in a fixed order, one object per line.
      expect(stdout.split('\n')[0]).toMatch(/^\{"at":"2026-12-01T09:00:00\.000Z","threadId":"t1","requester":"maren","channel":"slack:C1","kind":"sql","detail":/);
    });

    it('says what is wrong with --since, and when there is no state file', async () => {
      const cfgDir = mkdtempSync(join(tmpdir(), 'threadcount-audit-cli-'));
      const config = join(cfgDir, 'threadcount.yaml');
      writeFileSync(config, readFileSync(EXAMPLE_CONFIG_PATH, 'utf8'));
      capture();
      expect(await main(['audit', '--config', config])).toBe(2);
      expect(stderr).toMatch(/there is no state file at .*threadcount-state\.duckdb yet/);
      const store = await DuckDbStateStore.open(join(cfgDir, 'threadcount-state.duckdb'));
      await store.close();
      capture();
      expect(await main(['audit', '--config', config, '--since', '2026-02-30'])).toBe(2);
      expect(stderr).toMatch(/--since 2026-02-30 is not a real date/);
      capture();
      expect(await main(['audit', '--config', config, '--since', 'yesterday'])).toBe(2);
      expect(stderr).toMatch(/--since must be a date like 2026-12-01/);
      capture();
      expect(await main(['audit', '--config', config])).toBe(0);
      expect(stdout).toBe('');
    });
  });
});
