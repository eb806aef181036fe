// The local channel with its threads in PostgreSQL: two channels on one database stand in for
// two replicas. A thread made through one is read, answered and streamed through the other; a
// bot post written in the store's post transaction appears once, or not at all if the
// transaction fails; and an event stream survives its LISTEN connection being cut.
import pg from 'pg';
import { afterAll, beforeAll, expect, it } from 'vitest';
import type { LocalMessage } from '../../adapters/local-channel/local-thread-log.js';
import { LocalChannel } from '../../adapters/local-channel/LocalChannel.js';
import { PostgresThreadLog } from '../../adapters/local-channel/PostgresThreadLog.js';
import type { IncomingMessage } from '../../bot/port.js';
import { PostgresStateStore } from '../../bot/stores/PostgresStateStore.js';
import type { AuditEntry } from '../../bot/thread-state.js';
import { describeWithPostgres, uniqueName, withClient } from '../helpers/postgres.js';
import { SseClient } from '../helpers/sse-client.js';
import { waitFor } from '../helpers/wait-for.js';

describeWithPostgres('the local channel on PostgreSQL', (url) => {
  const schema = uniqueName('tc_local');
  interface Side {
    store: PostgresStateStore;
    channel: LocalChannel;
    delivered: IncomingMessage[];
    base: string;
  }
  const sides: Side[] = [];

  async function side(): Promise<Side> {
    const store = await PostgresStateStore.open({ url, schema, poolSize: 4, lockPoolSize: 2 });
    const threads = await PostgresThreadLog.open({ url, pool: store.pool, schema });
    const delivered: IncomingMessage[] = [];
    const channel = new LocalChannel({ port: 0, deliver: (m) => delivered.push(m), threads });
    await channel.start();
    return { store, channel, delivered, base: channel.url.replace(/\/$/, '') };
  }

  beforeAll(async () => {
    // Opened together, as replicas start: the tables are created once without a clash.
    sides.push(...(await Promise.all([side(), side()])));
  });
  afterAll(async () => {
    for (const s of sides) {
      await s.channel.stop();
      await s.store.close();
    }
    await withClient(url, (c) => c.query(`DROP SCHEMA IF EXISTS ${pg.escapeIdentifier(schema)} CASCADE`));
  });

  const postJson = (base: string, path: string, body: unknown) =>
    fetch(`${base}${path}`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) });
  const threadOn = async (base: string, id: string) => (await (await fetch(`${base}/api/threads/${id}`)).json()) as { messages: LocalMessage[] };
  const postEntry = (threadId: string, key: string): AuditEntry => ({ at: '2026-12-01T09:00:00.000Z', threadId, requester: 'maren', channel: 'local', kind: 'post', detail: { key } });

  it("shows one replica's thread on the other, takes replies there, and streams the other's posts", async () => {
    const [a, b] = sides as [Side, Side];
    const created = await postJson(a.base, '/api/threads', { author: 'maren', text: 'Revenue by route?' });
    expect(created.status).toBe(201);
    const { threadId, messageId } = (await created.json()) as { threadId: string; messageId: string };
    expect(a.delivered.at(-1)).toEqual({ threadId: `local:${threadId}`, author: 'maren', text: 'Revenue by route?', channel: 'local', messageId });

    const sse = new SseClient();
    await sse.open(`${b.base}/api/threads/${threadId}/events`);
    await waitFor('the request replayed on B', () => sse.events.length >= 1);

    // The bot (on A) posts with a CSV file and updates the post; B's stream shows both.
    const ref = await a.channel.post(`local:${threadId}`, { key: 'k1', text: 'On it.', files: [{ name: 'table.csv', kind: 'table', content: 'route,revenue\nA,1\n' }] });
    await a.channel.update(`local:${threadId}`, ref, 'On it (1 of 2 done).');
    const reply = await postJson(b.base, `/api/threads/${threadId}/messages`, { author: 'maren', text: 'thanks' });
    expect(reply.status).toBe(201);
    expect(b.delivered.at(-1)).toMatchObject({ threadId: `local:${threadId}`, text: 'thanks' });

    await waitFor('four events on B', () => sse.events.length >= 4);
    expect(sse.events.map((e) => [Number(e.id), e.event])).toEqual([
      [1, 'message.created'],
      [2, 'message.created'],
      [3, 'message.updated'],
      [4, 'message.created'],
    ]);
    expect((JSON.parse(sse.events[2]!.data) as LocalMessage).text).toBe('On it (1 of 2 done).');
    await sse.close();

    // Both replicas read the same thread, and serve the file A stored.
    const [onA, onB] = [await threadOn(a.base, threadId), await threadOn(b.base, threadId)];
    expect(onB).toEqual(onA);
    expect(onB.messages.map((m) => [m.fromBot, m.text])).toEqual([
      [false, 'Revenue by route?'],
      [true, 'On it (1 of 2 done).'],
      [false, 'thanks'],
    ]);
    const file = onB.messages[1]!.files[0]!;
    const got = await fetch(`${b.base}${file.url}`);
    expect(got.headers.get('content-type')).toMatch(/^text\/csv/);
    expect(await got.text()).toBe('route,revenue\nA,1\n');
    // A reconnecting stream on A gets only what it missed.
    const again = new SseClient();
    await again.open(`${a.base}/api/threads/${threadId}/events`, { 'last-event-id': '3' });
    await waitFor('the missed event', () => again.events.length >= 1);
    expect(again.events.map((e) => Number(e.id))).toEqual([4]);
    await again.close();
    expect((await fetch(`${b.base}/api/threads/nope/events`)).status).toBe(404);
    expect((await postJson(b.base, '/api/threads/nope/messages', { text: 'hi' })).status).toBe(404);
  });

  it('writes a bot post in the post transaction: once, or not at all when the transaction fails', async () => {
    const [a, b] = sides as [Side, Side];
    const { threadId } = (await (await postJson(a.base, '/api/threads', { author: 'ola', text: 'Bookings this year?' })).json()) as { threadId: string };
    const botThread = `local:${threadId}`;
    const keyed = { key: `${botThread}:ack:0`, threadId: botThread, audit: [postEntry(botThread, `${botThread}:ack:0`)] };
    await expect(
      a.store.postOnce(keyed, async (session) => {
        await a.channel.post(botThread, { key: keyed.key, text: 'Half-made post' }, session);
        throw new Error('the process died before the key was recorded');
      }),
    ).rejects.toThrow('died');
    expect((await threadOn(b.base, threadId)).messages.map((m) => m.text)).toEqual(['Bookings this year?']);

    // Both replicas try the same post at once: it appears once.
    const send = (s: Side) => (session?: Parameters<Parameters<PostgresStateStore['postOnce']>[1]>[0]) => s.channel.post(botThread, { key: keyed.key, text: 'On it.' }, session);
    const [r1, r2] = await Promise.all([a.store.postOnce(keyed, send(a)), b.store.postOnce(keyed, send(b))]);
    expect(r1).toBe(r2);
    const texts = (await threadOn(a.base, threadId)).messages.map((m) => m.text);
    expect(texts).toEqual(['Bookings this year?', 'On it.']);
    expect((await a.store.listAudit({ threadId: botThread })).map((e) => e.detail.key)).toEqual([keyed.key]);
  });

  it('keeps streaming after its LISTEN connection is cut', async () => {
    const [a, b] = sides as [Side, Side];
    const { threadId } = (await (await postJson(a.base, '/api/threads', { author: 'ola', text: 'Refunds by month?' })).json()) as { threadId: string };
    const sse = new SseClient();
    await sse.open(`${b.base}/api/threads/${threadId}/events`);
    await waitFor('the request replayed', () => sse.events.length >= 1);
    // Every LISTEN connection on this schema's channel is terminated by the server.
    const cut = await withClient(url, async (c) => {
      const r = await c.query<{ n: string }>(
        `SELECT count(pg_terminate_backend(pid)) AS n FROM pg_stat_activity WHERE application_name = 'threadcount-events' AND query ILIKE $1`,
        [`%LISTEN%${schema}%`],
      );
      return Number(r.rows[0]!.n);
    });
    expect(cut).toBeGreaterThanOrEqual(2);
    await a.channel.post(`local:${threadId}`, { key: 'k-after-cut', text: 'Posted while B was not listening.' });
    await waitFor('the post made while disconnected', () => sse.events.length >= 2, 30_000);
    expect((JSON.parse(sse.events[1]!.data) as LocalMessage).text).toBe('Posted while B was not listening.');
    // And new notifications arrive on the new connection.
    await a.channel.post(`local:${threadId}`, { key: 'k-later', text: 'And one more.' });
    await waitFor('the next post', () => sse.events.length >= 3, 30_000);
    expect(sse.events.map((e) => Number(e.id))).toEqual([1, 2, 3]);
    await sse.close();
  });
});
