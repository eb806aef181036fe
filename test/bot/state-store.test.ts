// One contract for every StateStore: memory, the DuckDB file and PostgreSQL give the same answers
// for threads, post keys and the audit log. Then what only the shared store promises: a post
// and its key commit together, two processes racing on one key post once, a thread's work never
// overlaps across processes, and a dead process's thread lock is released.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { DuckDbStateStore } from '../../bot/stores/DuckDbStateStore.js';
import { MemoryStateStore } from '../../bot/stores/MemoryStateStore.js';
import { PostgresStateStore } from '../../bot/stores/PostgresStateStore.js';
import type { KeyedPost, StateStore, ThreadState } from '../../bot/thread-state.js';
import { auditEntry } from '../helpers/audit-entry.js';
import { describeWithPostgres, uniqueName, withClient } from '../helpers/postgres.js';

const entry = auditEntry;

// Only the common fields: the stores keep a state as they are given it, whatever its stage.
const state = (threadId: string, stage: ThreadState['stage'], requester: string, updatedAt: string): ThreadState =>
  ({
    threadId,
    requester,
    channel: 'local',
    stage,
    brief: { requestText: `request of ${threadId}`, metrics: ['revenue'], dimensions: [] } as unknown as ThreadState['brief'],
    turn: 3,
    updatedAt,
  }) as ThreadState;

const keyed = (key: string, threadId = 't1'): KeyedPost => ({
  key,
  threadId,
  audit: [entry(threadId, '2026-12-01T09:00:00.000Z', 'post', { key, text: 'hello', files: [] })],
});

interface Kind {
  name: string;
  /** Opens the store; `again` reopens the same one (for what must outlive a process). */
  open: () => Promise<{ store: StateStore; again: () => Promise<StateStore> }>;
}

const dir = mkdtempSync(join(tmpdir(), 'tc-store-'));
const kinds: Kind[] = [
  {
    name: 'memory',
    open: async () => {
      const store = new MemoryStateStore();
      return { store, again: async () => store };
    },
  },
  {
    name: 'DuckDB file',
    open: async () => {
      const path = join(dir, `${uniqueName('s')}.duckdb`);
      const store = await DuckDbStateStore.open(path);
      return { store, again: async () => (await store.close(), DuckDbStateStore.open(path)) };
    },
  },
];

function contract(kind: Kind): void {
  describe(`the ${kind.name} store`, () => {
    it('keeps threads, lists them by stage and requester in update order, and outlives a reopen', async () => {
      const { store, again } = await kind.open();
      await store.put(state('t2', 'running', 'ola', '2026-12-01T10:00:00.000Z'));
      await store.put(state('t1', 'clarifying', 'maren', '2026-12-01T09:00:00.000Z'));
      await store.put(state('t3', 'done', 'maren', '2026-12-01T11:00:00.000Z'));
      // A put replaces the thread's earlier state.
      await store.put({ ...state('t3', 'running', 'maren', '2026-12-01T12:00:00.000Z'), turn: 4 });
      const reopened = await again();
      expect(await reopened.get('t3')).toEqual({ ...state('t3', 'running', 'maren', '2026-12-01T12:00:00.000Z'), turn: 4 });
      expect(await reopened.get('nope')).toBeUndefined();
      expect((await reopened.list()).map((s) => s.threadId)).toEqual(['t1', 't2', 't3']);
      expect((await reopened.list({ stages: ['running'] })).map((s) => s.threadId)).toEqual(['t2', 't3']);
      expect((await reopened.list({ stages: ['running'], requester: 'maren' })).map((s) => s.threadId)).toEqual(['t3']);
      expect(await reopened.list({ stages: ['cancelled'] })).toEqual([]);
      await reopened.close();
    });

    it('posts once under a key: a second call returns the first reference and sends nothing', async () => {
      const { store, again } = await kind.open();
      let sent = 0;
      const send = async () => `ref-${++sent}`;
      expect(await store.postOnce(keyed('t1:ack:0'), send)).toBe('ref-1');
      expect(await store.postOnce(keyed('t1:ack:0'), send)).toBe('ref-1');
      expect(await store.postOnce(keyed('t1:plan:1'), send)).toBe('ref-2');
      const reopened = await again();
      expect(await reopened.postOnce(keyed('t1:ack:0'), send)).toBe('ref-1');
      expect(sent).toBe(2);
      expect(await reopened.postRef('t1:plan:1')).toBe('ref-2');
      // One audit entry per post made.
      expect((await reopened.listAudit()).map((e) => e.detail.key)).toEqual(['t1:ack:0', 't1:plan:1']);
      await reopened.close();
    });

    it('records nothing for a post whose sending failed, so the next attempt sends it', async () => {
      const { store } = await kind.open();
      await expect(store.postOnce(keyed('t1:answer:q1'), async () => Promise.reject(new Error('platform down')))).rejects.toThrow('platform down');
      expect(await store.postRef('t1:answer:q1')).toBeUndefined();
      expect(await store.listAudit()).toEqual([]);
      expect(await store.postOnce(keyed('t1:answer:q1'), async () => 'ref-ok')).toBe('ref-ok');
      await store.recordPost('t1:other', 't1', 'r9');
      expect(await store.postRef('t1:other')).toBe('r9');
      await store.close();
    });

    it('keeps the audit log in the order written and filters it by thread and time', async () => {
      const entries = [
        entry('t1', '2026-11-30T23:59:59.000Z', 'request', { text: 'revenue trend' }),
        entry('t2', '2026-12-01T08:00:00.000Z', 'request', { text: 'bookings trend' }),
        entry('t1', '2026-12-01T09:00:00.000Z', 'sql', { subQuestion: 'q1', sql: 'SELECT $1', params: ['2024-01-01', 3, true] }),
        entry('t1', '2026-12-01T09:00:01.000Z', 'run', { event: 'finished', number: 1, replica: 'host:1' }),
      ];
      const { store, again } = await kind.open();
      for (const e of entries.slice(0, 2)) await store.appendAudit(e);
      const reopened = await again();
      for (const e of entries.slice(2)) await reopened.appendAudit(e);
      expect(await reopened.listAudit()).toEqual(entries);
      expect(await reopened.listAudit({ threadId: 't1' })).toEqual([entries[0], entries[2], entries[3]]);
      // A bare date sorts before that day's timestamps.
      expect(await reopened.listAudit({ since: '2026-12-01' })).toEqual(entries.slice(1));
      expect(await reopened.listAudit({ threadId: 't1', since: '2026-12-01T09:00:01.000Z' })).toEqual([entries[3]]);
      await reopened.close();
    });

    it('runs work under a thread lock and hands back its result', async () => {
      const { store } = await kind.open();
      expect(await store.withThreadLock('t1', async () => 42)).toBe(42);
      await expect(store.withThreadLock('t1', async () => Promise.reject(new Error('boom')))).rejects.toThrow('boom');
      // The lock is free again after a failure.
      expect(await store.withThreadLock('t1', async () => 'again')).toBe('again');
      await store.close();
    });
  });
}

for (const kind of kinds) contract(kind);

describe('the DuckDB store under a burst (group commit)', () => {
  const openFresh = () => DuckDbStateStore.open(join(mkdtempSync(join(tmpdir(), 'tc-store-burst-')), 'state.duckdb'));

  it('keeps every write of many at once, in order, and they outlive a reopen', async () => {
    const path = join(mkdtempSync(join(tmpdir(), 'tc-store-burst-')), 'state.duckdb');
    const store = await DuckDbStateStore.open(path);
    const n = 150;
    await Promise.all(
      Array.from({ length: n }, (_, i) =>
        Promise.all([
          store.put(state(`t${i}`, 'clarifying', 'maren', `2026-12-01T09:00:${String(i % 60).padStart(2, '0')}.000Z`)),
          store.appendAudit(entry(`t${i}`, '2026-12-01T09:00:00.000Z', 'request', { n: i })),
          store.recordPost(`t${i}:ack:0`, `t${i}`, `ref-${i}`),
        ]),
      ),
    );
    // Written again, now as updates of existing rows.
    await Promise.all(Array.from({ length: n }, (_, i) => store.put(state(`t${i}`, 'planning', 'maren', '2026-12-01T10:00:00.000Z'))));
    await Promise.all(Array.from({ length: n }, (_, i) => store.recordPost(`t${i}:ack:0`, `t${i}`, `ref-${i}-again`)));
    await store.close();
    const reopened = await DuckDbStateStore.open(path);
    expect((await reopened.list()).map((s) => s.stage)).toEqual(new Array(n).fill('planning'));
    expect((await reopened.listAudit()).map((e) => e.detail.n)).toEqual(Array.from({ length: n }, (_, i) => i));
    expect(await reopened.postRef('t7:ack:0')).toBe('ref-7-again');
    await reopened.close();
  });

  it('a write that fails among others fails alone: the rest of its batch is kept', async () => {
    const store = await openFresh();
    // Two ways to fail inside a batch: the database refuses the row (requester is NOT NULL), or
    // the work throws before its statement (a BigInt cannot be written as JSON).
    const refused = state('bad-row', 'clarifying', null as unknown as string, '2026-12-01T09:00:00.000Z');
    const unwritable = entry('bad-json', '2026-12-01T09:00:00.000Z', 'request', { n: 10n });
    const outcomes = await Promise.allSettled([
      ...Array.from({ length: 20 }, (_, i) => store.put(state(`t${i}`, 'clarifying', 'maren', '2026-12-01T09:00:00.000Z'))),
      store.put(refused),
      store.appendAudit(entry('t0', '2026-12-01T09:00:01.000Z', 'request', { n: 1 })),
      store.appendAudit(unwritable),
      store.appendAudit(entry('t0', '2026-12-01T09:00:02.000Z', 'request', { n: 2 })),
    ]);
    expect(outcomes.map((o) => o.status)).toEqual([...new Array<string>(20).fill('fulfilled'), 'rejected', 'fulfilled', 'rejected', 'fulfilled']);
    expect(await store.list()).toHaveLength(20);
    expect(await store.get('bad-row')).toBeUndefined();
    expect((await store.listAudit()).map((e) => e.detail.n)).toEqual([1, 2]);
    // The store goes on working after the failures.
    await store.appendAudit(entry('t0', '2026-12-01T09:00:03.000Z', 'request', { n: 3 }));
    expect((await store.listAudit()).map((e) => e.detail.n)).toEqual([1, 2, 3]);
    await store.close();
  });
});

describeWithPostgres('the PostgreSQL store', (url) => {
  const schemas: string[] = [];
  const open = (schema: string) => PostgresStateStore.open({ url, schema, poolSize: 4, lockPoolSize: 4 });
  afterAll(async () => {
    await withClient(url, async (c) => {
      for (const s of schemas) await c.query(`DROP SCHEMA IF EXISTS ${pg.escapeIdentifier(s)} CASCADE`);
    });
  });
  const fresh = () => {
    const schema = uniqueName('tc_store');
    schemas.push(schema);
    return schema;
  };

  contract({
    name: 'PostgreSQL',
    open: async () => {
      const schema = fresh();
      const store = await open(schema);
      return { store, again: async () => (await store.close(), open(schema)) };
    },
  });

  it('writes a post and its key in one transaction: a post that fails after writing leaves nothing', async () => {
    const schema = fresh();
    const store = await open(schema);
    const outbox = `${pg.escapeIdentifier(schema)}.outbox`;
    await store.pool.query(`CREATE TABLE ${outbox} (key text, body text)`);
    const write = (fail: boolean) => async (session?: { query: (t: string, v?: unknown[]) => Promise<unknown> }) => {
      await session!.query(`INSERT INTO ${outbox} VALUES ($1, $2)`, ['t1:answer:q1', 'the chart']);
      if (fail) throw new Error('died before the key was recorded');
      return 'msg-1';
    };
    await expect(store.postOnce(keyed('t1:answer:q1'), write(true))).rejects.toThrow('died');
    expect((await store.pool.query(`SELECT * FROM ${outbox}`)).rows).toEqual([]);
    expect(await store.postRef('t1:answer:q1')).toBeUndefined();
    expect(await store.postOnce(keyed('t1:answer:q1'), write(false))).toBe('msg-1');
    expect(await store.postOnce(keyed('t1:answer:q1'), write(false))).toBe('msg-1');
    expect((await store.pool.query(`SELECT key FROM ${outbox}`)).rows).toEqual([{ key: 't1:answer:q1' }]);
    await store.close();
  });

  it('two processes racing on the same keys post each once', async () => {
    const schema = fresh();
    // Two stores with their own pools stand in for two replicas.
    const [a, b] = [await open(schema), await open(schema)];
    const sent: string[] = [];
    const send = (who: string, key: string) => async () => {
      sent.push(key);
      // Long enough that the other process arrives while this one is still sending.
      await new Promise((r) => setTimeout(r, 20));
      return `${who}:${key}`;
    };
    const keys = Array.from({ length: 20 }, (_, i) => `t${i % 4}:answer:q${i}`);
    const refs = await Promise.all(keys.flatMap((k) => [a.postOnce(keyed(k), send('a', k)), b.postOnce(keyed(k), send('b', k))]));
    expect(sent.sort()).toEqual([...keys].sort());
    // Both callers of a key get the same reference.
    for (let i = 0; i < keys.length; i++) expect(refs[2 * i]).toBe(refs[2 * i + 1]);
    expect((await a.listAudit()).filter((e) => e.kind === 'post')).toHaveLength(keys.length);
    await Promise.all([a.close(), b.close()]);
  });

  it("never overlaps one thread's work across processes; other threads go on meanwhile", async () => {
    const schema = fresh();
    const [a, b] = [await open(schema), await open(schema)];
    const inside = new Map<string, number>();
    let overlaps = 0;
    let maxTogether = 0;
    const work = (threadId: string) => async () => {
      const n = (inside.get(threadId) ?? 0) + 1;
      inside.set(threadId, n);
      if (n > 1) overlaps++;
      maxTogether = Math.max(maxTogether, [...inside.values()].reduce((x, y) => x + y, 0));
      await new Promise((r) => setTimeout(r, 5));
      inside.set(threadId, n - 1);
    };
    await Promise.all(Array.from({ length: 40 }, (_, i) => (i % 2 ? a : b).withThreadLock(`t${i % 3}`, work(`t${i % 3}`))));
    expect(overlaps).toBe(0);
    // Different threads did run side by side: the lock is per thread, not global.
    expect(maxTogether).toBeGreaterThan(1);
    await Promise.all([a.close(), b.close()]);
  });

  it("releases the thread lock of a process whose connection dies", async () => {
    const schema = fresh();
    const store = await open(schema);
    let release!: () => void;
    const held = new Promise<void>((r) => (release = r));
    let pid = 0;
    // A "process" that takes the lock and never lets go; its backend is then terminated.
    const dying = store.withThreadLock('t-dead', async () => {
      await held;
    });
    await withClient(url, async (c) => {
      for (let i = 0; i < 200 && !pid; i++) {
        const r = await c.query<{ pid: number }>(`SELECT pid FROM pg_locks WHERE locktype = 'advisory' AND granted AND classid = $1`, [0x7c02]);
        pid = r.rows[0]?.pid ?? 0;
        if (!pid) await new Promise((res) => setTimeout(res, 25));
      }
      expect(pid).toBeGreaterThan(0);
      await c.query('SELECT pg_terminate_backend($1)', [pid]);
    });
    const other = await open(schema);
    expect(await other.withThreadLock('t-dead', async () => 'taken over')).toBe('taken over');
    release();
    await expect(dying).rejects.toThrow();
    await Promise.all([store.close(), other.close()]);
  });
});
