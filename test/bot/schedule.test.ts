// Scheduled reruns of a finished thread: set, told, run when due into the same thread, once, by
// one of two bots sharing one state store (the embedded DuckDB file in one process; two stores on
// one PostgreSQL, as two replicas have), stopped. The clock is the test's; due times are
// calendar facts (4 December 2026 is a Friday; Europe/Dublin, the demo's zone, is UTC+0 in winter).
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pLimit from 'p-limit';
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { Bot } from '../../bot/Bot.js';
import { presentAnswer, presentSummary } from '../../bot/present-answer.js';
import { DuckDbStateStore } from '../../bot/stores/DuckDbStateStore.js';
import { PostgresStateStore } from '../../bot/stores/PostgresStateStore.js';
import type { StateStore } from '../../bot/thread-state.js';
import { useDemoWorkspace } from '../helpers/demo-fixture.js';
import { describeWithPostgres, uniqueName, withClient } from '../helpers/postgres.js';
import { RecordingPort } from '../helpers/recording-port.js';

const demoWorkspace = useDemoWorkspace();

function scheduled(kindName: string, open: () => Promise<StateStore[]>): void {
  it(`reruns a finished thread when due, once, in the same thread, until stopped (${kindName})`, async () => {
    const stores = await open();
    const port = new RecordingPort();
    let clock = new Date('2026-12-04T15:00:00Z');
    const bots = stores.map((store, i) => new Bot({ workspace: demoWorkspace(), port, store, now: () => clock, presentAnswer, presentSummary, jobs: pLimit(2), replica: `r${i}` }));
    const [first] = bots;
    const say = async (text: string) => {
      await first!.handle({ threadId: 't1', author: 'maren', text });
      await first!.idle();
    };
    const thread = () => port.inThread('t1');
    const settle = async () => Promise.all(bots.map((b) => b.idle()));
    try {
      await say('How has revenue moved over time, month by month?');
      await say('go');
      expect(thread().filter((m) => m.key.endsWith(':run1:summary'))).toHaveLength(1);

      await say('every Monday at 9');
      expect(thread().at(-1)!.text).toBe(
        'I will rerun this every Monday at 09:00 Europe/Dublin on fresh data and post the answers in this thread; the first is due Mon 7 Dec 2026, 09:00. Say "stop the schedule" to end it.\n_Assumed: time zone Europe/Dublin, the dataset\'s configured one._',
      );
      await say('when does it run?');
      expect(thread().at(-1)!.text).toMatch(/^This thread reruns every Monday at 09:00 Europe\/Dublin; the next is due Mon 7 Dec 2026, 09:00\./);

      // Not yet due: nothing happens.
      clock = new Date('2026-12-07T08:59:00Z');
      await Promise.all(bots.map((b) => b.tick()));
      await settle();
      expect(thread().some((m) => m.text.startsWith('Scheduled rerun'))).toBe(false);

      // Due: every bot checks at once; the rerun starts once and posts into the same thread.
      clock = new Date('2026-12-07T09:00:30Z');
      await Promise.all(bots.map((b) => b.tick()));
      // While it runs, the schedule can be asked about (its next due time has already moved on).
      expect((await stores[0]!.get('t1'))!.stage).toBe('running');
      await first!.handle({ threadId: 't1', author: 'maren', text: 'when does it run?' });
      expect(thread().at(-1)!.text).toMatch(/^This thread reruns every Monday at 09:00 Europe\/Dublin; the next is due Mon 14 Dec 2026, 09:00\./);
      await settle();
      expect(thread().filter((m) => m.text.startsWith('Scheduled rerun (every Monday at 09:00 Europe/Dublin)'))).toHaveLength(1);
      expect(thread().filter((m) => m.key.endsWith(':run2:summary'))).toHaveLength(1);
      expect(thread().filter((m) => m.key.endsWith(':run2:bundle'))).toHaveLength(1);
      expect(port.messages.every((m) => m.threadId === 't1')).toBe(true);
      const state = await stores[0]!.get('t1');
      expect(state).toMatchObject({ stage: 'done', run: { number: 2 }, schedule: { nextDue: '2026-12-14T09:00:00.000Z' } });

      // Checked again the same minute: nothing more.
      const count = thread().length;
      await Promise.all(bots.map((b) => b.tick()));
      await settle();
      expect(thread()).toHaveLength(count);

      await say('stop the schedule');
      expect(thread().at(-1)!.text).toBe('Stopped: this thread no longer reruns every Monday at 09:00 Europe/Dublin. Say "rerun" to run it once more now.');
      clock = new Date('2026-12-14T09:01:00Z');
      await Promise.all(bots.map((b) => b.tick()));
      await settle();
      expect(thread().filter((m) => m.key.includes(':run3:'))).toHaveLength(0);
      await say('when does it run?');
      expect(thread().at(-1)!.text).toMatch(/^This thread has no schedule\./);
      const keys = port.messages.map((m) => m.key);
      expect(new Set(keys).size).toBe(keys.length);
    } finally {
      for (const s of stores) await s.close();
    }
  });
}

describe('scheduled reruns', () => {
  scheduled('DuckDB file', async () => [await DuckDbStateStore.open(join(mkdtempSync(join(tmpdir(), 'tc-sched-')), 'state.duckdb'))]);
});

describeWithPostgres('scheduled reruns on PostgreSQL', (url) => {
  const schema = uniqueName('tc_sched');
  afterAll(async () => {
    await withClient(url, (c) => c.query(`DROP SCHEMA IF EXISTS ${pg.escapeIdentifier(schema)} CASCADE`));
  });
  // Two stores with pools of their own on one database: two replicas' view of it.
  scheduled('two bots on one PostgreSQL', async () => [
    await PostgresStateStore.open({ url, schema, poolSize: 4, lockPoolSize: 2 }),
    await PostgresStateStore.open({ url, schema, poolSize: 4, lockPoolSize: 2 }),
  ]);
});
