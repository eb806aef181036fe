// A request's stage on the local page (issue 17 item 21): asking, plan, running, done, closed, read
// from the bot's post keys as the bot writes them (bot/Step.ts "<thread>:<name>:<n>",
// bot/RunOrchestrator.ts "<thread>:run<n>:<name>") and from what a post offers to click. Checked
// through both thread logs' list(): in memory, and in PostgreSQL, whose list reads only a tail.
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { LocalThreads } from '../../adapters/local-channel/LocalThreads.js';
import type { LocalThreadLog } from '../../adapters/local-channel/local-thread-log.js';
import { PostgresThreadLog } from '../../adapters/local-channel/PostgresThreadLog.js';
import { postKind } from '../../adapters/local-channel/thread-stage.js';
import type { OutgoingPost, QuickReply } from '../../bot/port.js';
import { describeWithPostgres, uniqueName, withClient } from '../helpers/postgres.js';

const go: QuickReply[] = [{ value: 'go', label: 'Go: run it', primary: true }, { value: 'cancel', label: 'Cancel', primary: false }];
const control = { topic: 'grain', label: 'Grain', kind: 'select' as const, choices: [{ value: 'weekly', label: 'Weekly' }] };
const prompt = { topic: 'metrics', question: 'Which measure?', options: [{ value: 'revenue', label: 'Revenue' }], recommended: { value: 'revenue', label: 'Revenue', reason: 'the headline one' }, many: false } as unknown as OutgoingPost['prompt'];

/** Walks one thread through its stages, checking list() after each step. */
async function walk(log: LocalThreadLog, cancelInstead = false): Promise<string[]> {
  const seen: string[] = [];
  const { thread } = await log.createThread('maren', 'How have things moved?');
  const t = `local:${thread.id}`;
  const stage = async () => seen.push((await log.list()).find((s) => s.id === thread.id)!.stage);
  await stage();
  await log.addBotPost(thread.id, { key: `${t}:prompt:0`, text: 'Which measure?', prompt });
  await stage();
  await log.addPersonMessage(thread.id, 'maren', 'revenue');
  const card = await log.addBotPost(thread.id, { key: `${t}:card:1`, text: 'Here is what I understood.', controls: [control], quickReplies: go });
  await stage();
  // Asides leave it where it was.
  await log.addPersonMessage(thread.id, 'maren', 'help');
  await log.addBotPost(thread.id, { key: `${t}:help:2`, text: 'I answer data questions…' });
  await log.addBotPost(thread.id, { key: `${t}:reminder:3`, text: 'A reminder: I am waiting on the plan above.' });
  await stage();
  if (cancelInstead) {
    await log.addPersonMessage(thread.id, 'maren', 'cancel');
    await log.addBotPost(thread.id, { key: `${t}:cancelled:4`, text: 'Cancelled.' });
    await stage();
    return seen;
  }
  await log.addPersonMessage(thread.id, 'maren', 'go');
  // The card agreed: the bot edits its controls away.
  await log.updateText(thread.id, card.id, 'Agreed: running the plan.', { text: 'Agreed: running the plan.' });
  await stage();
  await log.addBotPost(thread.id, { key: `${t}:run1:progress`, text: '0 of 4 done.' });
  await log.addBotPost(thread.id, { key: `${t}:run1:answer:q1`, text: '1. Revenue peaked in July.' });
  await stage();
  await log.addBotPost(thread.id, { key: `${t}:run1:summary`, text: 'Summary' });
  await stage();
  // A note after the summary ("that one is finished") does not reopen it.
  await log.addBotPost(thread.id, { key: `${t}:note:5`, text: 'This request is finished.' });
  await stage();
  return seen;
}

const WHOLE = ['asking', 'asking', 'plan', 'plan', 'running', 'running', 'done', 'done'];
const CANCELLED = ['asking', 'asking', 'plan', 'plan', 'closed'];

describe('thread stages', () => {
  it('names what a post is from its key, and nothing for a note', () => {
    expect(postKind('local:abc:card:3')).toBe('card');
    expect(postKind('local:abc:run2:summary')).toBe('summary');
    expect(postKind('local:abc:run1:answer:q7')).toBe('answer');
    expect(postKind('local:abc:note:4')).toBeUndefined();
    expect(postKind('local:abc:reminder:4')).toBeUndefined();
    expect(postKind(undefined)).toBeUndefined();
  });

  it('moves through asking, plan, running, done in memory, and closes on cancel', async () => {
    expect(await walk(new LocalThreads('threadcount'))).toEqual(WHOLE);
    expect(await walk(new LocalThreads('threadcount'), true)).toEqual(CANCELLED);
  });
});

describeWithPostgres('thread stages in PostgreSQL', (url) => {
  const schema = uniqueName('tc_stage');
  const pool = new pg.Pool({ connectionString: url, max: 3 });
  let log: PostgresThreadLog | undefined;
  afterAll(async () => {
    await log?.close();
    await withClient(url, (c) => c.query(`DROP SCHEMA IF EXISTS ${pg.escapeIdentifier(schema)} CASCADE`));
    await pool.end();
  });
  it('reads the same stages from the tail it lists', async () => {
    await withClient(url, (c) => c.query(`CREATE SCHEMA IF NOT EXISTS ${pg.escapeIdentifier(schema)}`));
    log = await PostgresThreadLog.open({ url, pool, schema });
    expect(await walk(log)).toEqual(WHOLE);
    expect(await walk(log, true)).toEqual(CANCELLED);
  });
});
