// With the state in PostgreSQL, a message a replica accepted but never handled (it died first)
// is delivered again by another replica's sweep, handled once, and never out of turn. The real
// bot, store, thread log and demo data (invented); "accepted but never handled" is a message
// written to the thread log without being delivered, as a replica dying after its 201 leaves it.
import pg from 'pg';
import pLimit from 'p-limit';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { LocalChannel } from '../../adapters/local-channel/LocalChannel.js';
import { PostgresThreadLog } from '../../adapters/local-channel/PostgresThreadLog.js';
import { sweepUnhandled } from '../../adapters/local-channel/unhandled-sweep.js';
import { ThreadInbox } from '../../adapters/ThreadInbox.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { Bot } from '../../bot/Bot.js';
import { presentAnswer, presentSummary } from '../../bot/present-answer.js';
import { PostgresStateStore } from '../../bot/stores/PostgresStateStore.js';
import { loadConfig } from '../../config/load.js';
import { demoFixture } from '../helpers/demo-fixture.js';
import { describeWithPostgres, uniqueName, withClient } from '../helpers/postgres.js';

const REQUEST = 'How has revenue moved over time, month by month?';

describeWithPostgres('the sweep for accepted but unhandled messages', (url) => {
  const schema = uniqueName('tc_sweep');
  let store: PostgresStateStore;
  let threads: PostgresThreadLog;
  let channel: LocalChannel;
  let ws: Workspace;
  let bot: Bot;
  let inbox: ThreadInbox;
  const minute = 60_000;
  const later = () => new Date(Date.now() + 2 * minute);
  const sweep = (now: Date) => sweepUnhandled({ threads, store, deliver: inbox.deliver, now, minAgeMs: minute, maxAgeMs: 24 * 60 * minute });
  const settle = async () => {
    await inbox.idle();
    await bot.idle();
  };
  const received = async (localId: string) => (await store.listAudit({ threadId: `local:${localId}` })).filter((e) => e.kind === 'request' || e.kind === 'message');
  const botMessages = async (localId: string) => (await threads.get(localId))!.messages.filter((m) => m.fromBot);

  beforeAll(async () => {
    store = await PostgresStateStore.open({ url, schema, poolSize: 4, lockPoolSize: 2 });
    threads = await PostgresThreadLog.open({ url, pool: store.pool, schema });
    ws = await openWorkspace(loadConfig((await demoFixture()).configPath));
    channel = new LocalChannel({ port: 0, deliver: (m) => inbox.deliver(m), threads });
    bot = new Bot({ workspace: ws, port: channel, store, now: () => new Date(), presentAnswer, presentSummary, jobs: pLimit(2) });
    inbox = new ThreadInbox(
      (m) => bot.handle(m),
      (err) => {
        throw err;
      },
    );
  });
  afterAll(async () => {
    await threads?.close();
    await store?.close();
    await ws?.source.close();
    await withClient(url, (c) => c.query(`DROP SCHEMA IF EXISTS ${pg.escapeIdentifier(schema)} CASCADE`));
  });

  it('delivers a lost request once, and a second delivery of it changes nothing', async () => {
    const lost = await threads.createThread('maren', REQUEST);
    const handled = await threads.createThread('olu', REQUEST);
    inbox.deliver({ threadId: `local:${handled.thread.id}`, author: 'olu', text: REQUEST, channel: 'local', messageId: handled.message.id });
    await settle();
    expect(await botMessages(lost.thread.id)).toHaveLength(0);
    const handledBefore = (await botMessages(handled.thread.id)).length;
    expect(handledBefore).toBeGreaterThan(0);

    // Too young: a live replica may still be on its way to it.
    expect(await sweep(new Date())).toBe(0);
    expect(await sweep(later())).toBe(1);
    await settle();
    const answered = await botMessages(lost.thread.id);
    expect(answered.length).toBeGreaterThan(0);
    expect(answered[0]!.text).toMatch(/^\*Here is what I understood\.\*/);
    expect((await received(lost.thread.id)).map((e) => e.detail.messageId)).toEqual([lost.message.id]);

    // Nothing left to sweep; the same message delivered again (a late first delivery) is skipped.
    expect(await sweep(later())).toBe(0);
    inbox.deliver({ threadId: `local:${lost.thread.id}`, author: 'maren', text: REQUEST, channel: 'local', messageId: lost.message.id });
    await settle();
    expect(await botMessages(lost.thread.id)).toHaveLength(answered.length);
    expect(await received(lost.thread.id)).toHaveLength(1);
    expect(await botMessages(handled.thread.id)).toHaveLength(handledBefore);
  }, 60_000);

  it('leaves a lost message alone once a later one in its thread was handled (it would be read out of turn)', async () => {
    const t = await threads.createThread('maren', REQUEST);
    inbox.deliver({ threadId: `local:${t.thread.id}`, author: 'maren', text: REQUEST, channel: 'local', messageId: t.message.id });
    await settle();
    const lostReply = await threads.addPersonMessage(t.thread.id, 'maren', 'managers');
    const nextReply = await threads.addPersonMessage(t.thread.id, 'maren', 'ok');
    inbox.deliver({ threadId: `local:${t.thread.id}`, author: 'maren', text: 'ok', channel: 'local', messageId: nextReply!.id });
    await settle();
    const before = await received(t.thread.id);
    expect(before.map((e) => e.detail.messageId)).toEqual([t.message.id, nextReply!.id]);
    expect(await sweep(later())).toBe(0);
    expect(lostReply).toBeDefined();
  }, 60_000);
});
