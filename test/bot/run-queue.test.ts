// The shared run queue on pg-boss 10: a run asked for several times is carried out once, a run
// that fails is retried, and a run whose worker stops answering is given to another worker
// after its expiry. Run ids are name-based UUIDs (RFC 9562, version 5).
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { PgBossRunQueue, type PgBossRunQueueOptions } from '../../bot/queue/PgBossRunQueue.js';
import { runJobId, uuidV5 } from '../../bot/queue/run-job-id.js';
import type { RunRef } from '../../bot/queue/RunQueue.js';
import { describeWithPostgres, uniqueName, withClient } from '../helpers/postgres.js';
import { waitFor } from '../helpers/wait-for.js';

describe('run ids', () => {
  it('are RFC 9562 version-5 UUIDs', () => {
    // RFC 9562, Appendix A.4: the DNS namespace and "www.example.com" (also what Python's
    // uuid.uuid5(uuid.NAMESPACE_DNS, 'www.example.com') returns).
    expect(uuidV5('www.example.com', '6ba7b810-9dad-11d1-80b4-00c04fd430c8')).toBe('2ed6657d-e927-568b-95e1-2665a8aea6a2');
  });

  it('are the same for the same run and differ between runs and threads', () => {
    const id = runJobId({ threadId: 'local:abc', number: 1 });
    expect(runJobId({ threadId: 'local:abc', number: 1 })).toBe(id);
    expect(id).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-5[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
    const others = [runJobId({ threadId: 'local:abc', number: 2 }), runJobId({ threadId: 'local:ab', number: 11 }), runJobId({ threadId: 'local:abc1', number: 1 })];
    expect(new Set([id, ...others]).size).toBe(4);
  });
});

describeWithPostgres('the run queue on pg-boss', (url) => {
  const schemas: string[] = [];
  const queues: PgBossRunQueue[] = [];
  afterAll(async () => {
    for (const q of queues) await q.stop().catch(() => undefined);
    await withClient(url, async (c) => {
      for (const s of schemas) await c.query(`DROP SCHEMA IF EXISTS ${pg.escapeIdentifier(s)} CASCADE`);
    });
  });
  const open = async (schema: string, opts: Partial<PgBossRunQueueOptions> = {}) => {
    const q = await PgBossRunQueue.open({ url, schema, workers: 2, expireSeconds: 60, retries: 2, checkSeconds: 1, pollSeconds: 0.5, ...opts });
    queues.push(q);
    return q;
  };
  const fresh = () => {
    const s = uniqueName('tc_queue');
    schemas.push(s);
    return s;
  };

  it('carries out a run asked for several times once, and each run of a thread separately', async () => {
    const schema = fresh();
    const [a, b] = await Promise.all([open(schema), open(schema)]);
    const done: string[] = [];
    const handler = (who: string) => async (run: RunRef) => void done.push(`${who}:${run.threadId}#${run.number}`);
    const runs = [1, 2, 3].flatMap((t) => [{ threadId: `t${t}`, number: 1 }]).concat([{ threadId: 't1', number: 2 }]);
    // Asked for from both replicas, twice each, before any worker runs.
    for (const r of runs) await Promise.all([a.enqueue(r), b.enqueue(r), a.enqueue(r), b.enqueue(r)]);
    await Promise.all([a.work(handler('a')), b.work(handler('b'))]);
    await waitFor('the four runs', () => done.length >= runs.length);
    // Nothing more arrives: each run was queued once.
    await a.enqueue(runs[0]!);
    await new Promise((r) => setTimeout(r, 1500));
    expect(done.map((d) => d.split(':')[1]).sort()).toEqual(['t1#1', 't1#2', 't2#1', 't3#1']);
  });

  it('retries a run that failed', async () => {
    const q = await open(fresh());
    const attempts: number[] = [];
    await q.work(async (run) => {
      attempts.push(run.number);
      if (attempts.length === 1) throw new Error('the warehouse was down');
    });
    await q.enqueue({ threadId: 't1', number: 1 });
    await waitFor('the retry', () => attempts.length >= 2);
    expect(attempts).toEqual([1, 1]);
  });

  it('gives a run out again once it expires when the worker that took it stops answering', async () => {
    // A process that is frozen still holds its job; the retry after expiry may go to any worker
    // that asks (a killed replica asks no more: test/deploy covers that with real processes).
    const schema = fresh();
    const [first, second] = [await open(schema, { workers: 1, expireSeconds: 5 }), await open(schema, { workers: 1, expireSeconds: 5 })];
    const got: string[] = [];
    let hung = false;
    const handler = (who: string) => (run: RunRef) => {
      got.push(`${who}:${run.threadId}`);
      if (hung) return Promise.resolve();
      hung = true;
      return new Promise<void>(() => undefined);
    };
    await first.enqueue({ threadId: 't-stuck', number: 1 });
    await Promise.all([first.work(handler('first')), second.work(handler('second'))]);
    await waitFor('the run to be given out again', () => got.length >= 2, 60_000);
    expect(got.map((g) => g.split(':')[1])).toEqual(['t-stuck', 't-stuck']);
  });
});
