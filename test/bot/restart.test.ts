// Restarts: the bot is stopped while clarifying, while the plan waits, and part-way through a
// run; a new bot on the same state carries on. Nothing is lost and nothing posted twice. Run on
// the embedded DuckDB file and on the shared PostgreSQL store.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pLimit from 'p-limit';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig } from '../../config/load.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { Bot } from '../../bot/Bot.js';
import { presentAnswer, presentSummary } from '../../bot/present-answer.js';
import { DuckDbStateStore } from '../../bot/stores/DuckDbStateStore.js';
import { PostgresStateStore } from '../../bot/stores/PostgresStateStore.js';
import type { StateStore } from '../../bot/thread-state.js';
import { demoFixture } from '../helpers/demo-fixture.js';
import { describeWithPostgres, uniqueName, withClient } from '../helpers/postgres.js';
import { RecordingPort } from '../helpers/recording-port.js';
import { inStage } from '../helpers/thread-stage.js';

let ws: Workspace;
const now = new Date('2026-12-01T09:00:00Z');

beforeAll(async () => {
  ws = await openWorkspace(loadConfig((await demoFixture()).configPath));
});
afterAll(async () => ws?.source.close());

/** Opens the same state each time it is called, as a restarted process would. */
type Reopen = () => Promise<StateStore>;

async function start(open: Reopen, port: RecordingPort) {
  const store = await open();
  const bot = new Bot({ workspace: ws, port, store, now: () => now, presentAnswer, presentSummary, jobs: pLimit(2) });
  return { bot, store };
}

function expectNoRepeatedKeys(port: RecordingPort) {
  const keys = port.messages.map((m) => m.key);
  expect(new Set(keys).size).toBe(keys.length);
}

function restarts(kindName: string, place: () => Promise<Reopen>): void {
describe(`restarts (${kindName})`, () => {
  it('resumes clarifying and planning where they were', async () => {
    const open = await place();
    const port = new RecordingPort();
    const say = async (bot: Bot, text: string) => {
      await bot.handle({ threadId: 't1', author: 'maren', text });
      await bot.idle();
    };

    let p = await start(open, port);
    await say(p.bot, 'How have things moved over time?');
    await p.store.close(); // stopped while clarifying: the request names no measure, so it is asked

    p = await start(open, port);
    expect(port.inThread('t1').at(-1)!.promptTopic).toBe('metrics');
    await say(p.bot, 'revenue');
    const card = port.inThread('t1').at(-1)!;
    expect(card.text).toMatch(/^\*Here is what I understood\.\*/);
    await say(p.bot, 'for leadership, quarterly');
    await p.store.close(); // stopped while the card waits, after a correction

    p = await start(open, port);
    // The card was corrected in place, and the correction survived the restart.
    expect(port.inThread('t1').filter((m) => m.text.startsWith('*Here is what I understood.*'))).toHaveLength(1);
    expect(port.inThread('t1').find((m) => m.key === card.key)!.text).toMatch(/Audience:\* Leadership[\s\S]*Grain:\* Quarterly/);
    await say(p.bot, 'go');
    const texts = port.inThread('t1').map((m) => m.text);
    expect(texts.some((t) => t.startsWith('*Summary*'))).toBe(true);
    expect(texts.filter((t) => t.startsWith('*1. '))).toHaveLength(1);
    expectNoRepeatedKeys(port);
    await p.store.close();
  });

  it('resumes a run stopped part-way without posting any answer twice', async () => {
    const open = await place();
    const port = new RecordingPort();
    const say = async (bot: Bot, text: string) => {
      await bot.handle({ threadId: 't2', author: 'maren', text });
      await bot.idle();
    };
    let p = await start(open, port);
    await say(p.bot, 'How have revenue, bookings and passengers moved over time?');
    for (const answer of ['analysts', 'none', 'monthly', 'all']) await say(p.bot, answer);
    const planned = inStage(await p.store.get('t2'), 'planning').plan.items.length;
    expect(planned).toBeGreaterThan(1);
    // The platform fails on the second answer: the process "dies" with one answer posted.
    port.failOnPost = port.messages.length + 3; // progress, answer 1, then answer 2 fails
    await expect(say(p.bot, 'go')).rejects.toThrow('process stopped');
    await p.store.close();
    port.failOnPost = null;

    p = await start(open, port);
    expect((await p.store.get('t2'))!.stage).toBe('running');
    await p.bot.resume();
    await p.bot.idle();
    const answers = port.inThread('t2').filter((m) => m.key.includes(':answer:'));
    expect(answers).toHaveLength(planned);
    expect(port.inThread('t2').filter((m) => m.key.endsWith(':summary'))).toHaveLength(1);
    // Each process shows its own progress: the first one's message is left as it was, the second's is new.
    const progress = port.inThread('t2').filter((m) => /:progress(:\d+)?$/.test(m.key));
    expect(progress.map((m) => m.key.replace(/^.*:run1:/, ''))).toEqual(['progress', 'progress:2']);
    expect(progress[0]!.text).toBe(`Working: 1 of ${planned} done.`);
    expect(progress[1]!.text).toBe(`All ${planned} done.`);
    expect((await p.store.get('t2'))!.stage).toBe('done');
    expectNoRepeatedKeys(port);
    await p.store.close();
  });

  it('answers commands: status, cancel, rerun, help, what can you measure', async () => {
    const open = await place();
    const port = new RecordingPort();
    const p = await start(open, port);
    const say = async (threadId: string, text: string) => {
      await p.bot.handle({ threadId, author: 'maren', text });
      await p.bot.idle();
    };
    await say('c1', 'What can you measure?');
    expect(port.inThread('c1')[0]!.text).toMatch(/Share of revenue refunded/);
    expect(port.inThread('c1')[0]!.text).not.toMatch(/Customer email/);
    await say('t3', 'revenue trend please');
    await say('t3', 'cancel');
    expect(port.inThread('t3').at(-1)!.text).toMatch(/^Cancelled/);
    await say('t3', 'status');
    expect(port.inThread('t3').at(-1)!.text).toMatch(/revenue trend please.*cancelled/);
    await say('t4', 'help');
    expect(port.inThread('t4')[0]!.text).toMatch(/Commands:/);
    await say('t3', 'rerun');
    // A rerun ends with its summary and the zip of the thread after it.
    expect(port.inThread('t3').at(-1)!.text).toMatch(/Only a finished or cancelled request can be rerun|^\*Everything above in one file\*/);
    await p.store.close();
  });

  it('reminds a requester who has not answered, once, and warns when the deadline nears', async () => {
    const open = await place();
    const port = new RecordingPort();
    let clock = new Date('2026-12-01T09:00:00Z');
    const store = await open();
    const bot = new Bot({
      workspace: ws, port, store, now: () => clock, presentAnswer, presentSummary, jobs: pLimit(1),
      timings: { remindAfterMs: 60 * 60_000, deadlineWarningMs: 24 * 3_600_000 },
    });
    await bot.handle({ threadId: 't5', author: 'maren', text: 'revenue trend for the board, needed by the 3rd' });
    await bot.tick();
    expect(port.inThread('t5').some((m) => m.text.startsWith('A reminder'))).toBe(false);
    clock = new Date('2026-12-01T10:30:00Z');
    await bot.tick();
    await bot.tick();
    expect(port.inThread('t5').filter((m) => m.text.startsWith('A reminder'))).toHaveLength(1);
    clock = new Date('2026-12-03T08:00:00Z');
    await bot.tick();
    expect(port.inThread('t5').filter((m) => /deadline .* is close/.test(m.text))).toHaveLength(1);
    await store.close();
  });

  it('stops a run when the requester cancels part-way, and says so', async () => {
    const open = await place();
    const port = new RecordingPort();
    const store = await open();
    let cancelSent = false;
    const bot: Bot = new Bot({
      workspace: ws, port, store, now: () => now, presentAnswer, presentSummary, jobs: pLimit(1),
      // The requester types "cancel" as soon as the first sub-question starts computing.
      onJobStart: (threadId) => {
        if (!cancelSent) {
          cancelSent = true;
          void bot.handle({ threadId, author: 'maren', text: 'cancel' });
        }
      },
    });
    const say = async (text: string) => {
      await bot.handle({ threadId: 't6', author: 'maren', text });
      await bot.idle();
    };
    await say('How have revenue, bookings and passengers moved over time?');
    for (const answer of ['managers', 'none', 'monthly', 'all']) await say(answer);
    const planned = inStage(await store.get('t6'), 'planning').plan.items.length;
    await say('go');
    const thread = port.inThread('t6');
    expect(thread.filter((m) => m.key.includes(':answer:')).length).toBeLessThan(planned);
    expect(thread.some((m) => m.key.endsWith(':summary'))).toBe(false);
    expect(thread.some((m) => m.text.startsWith('Cancelled'))).toBe(true);
    expect((await store.get('t6'))!.stage).toBe('cancelled');
    await store.close();
  });
});
}

restarts('DuckDB file', async () => {
  const statePath = join(mkdtempSync(join(tmpdir(), 'tc-state-')), 'state.duckdb');
  return () => DuckDbStateStore.open(statePath);
});

describeWithPostgres('restarts on PostgreSQL', (url) => {
  const schemas: string[] = [];
  afterAll(async () => {
    await withClient(url, async (c) => {
      for (const s of schemas) await c.query(`DROP SCHEMA IF EXISTS ${pg.escapeIdentifier(s)} CASCADE`);
    });
  });
  restarts('PostgreSQL', async () => {
    const schema = uniqueName('tc_restart');
    schemas.push(schema);
    return () => PostgresStateStore.open({ url, schema, poolSize: 4, lockPoolSize: 2 });
  });
});
