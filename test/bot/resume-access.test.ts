// A run resumed after a restart meets the access rules as they are now: a channel that has lost
// the dataset since the plan was agreed gets the refusal in the thread, the run is cancelled and
// the audit log says why; with the rules unchanged the run carries on.
import pLimit from 'p-limit';
import { describe, expect, it } from 'vitest';
import { Bot } from '../../bot/Bot.js';
import { presentAnswer, presentSummary } from '../../bot/present-answer.js';
import { MemoryStateStore } from '../../bot/stores/MemoryStateStore.js';
import type { AccessConfig } from '../../config/schema.js';
import { useDemoWorkspace } from '../helpers/demo-fixture.js';
import { RecordingPort } from '../helpers/recording-port.js';

const demoWorkspace = useDemoWorkspace();

const now = new Date('2026-12-01T09:00:00Z');
const open: AccessConfig = { channels: [{ match: 'local', datasets: ['bookings'] }], default_datasets: [] };
const closed: AccessConfig = { channels: [{ match: 'slack:*', datasets: ['bookings'] }], default_datasets: [] };

async function stoppedPartWay(store: MemoryStateStore, port: RecordingPort, threadId: string): Promise<number> {
  const bot = new Bot({ workspace: demoWorkspace(), access: open, port, store, now: () => now, presentAnswer, presentSummary, jobs: pLimit(1) });
  const say = async (text: string) => {
    await bot.handle({ threadId, author: 'maren', text, channel: 'local' });
    await bot.idle();
  };
  await say('How have revenue, bookings and passengers moved over time?');
  for (const answer of ['analysts', 'none', 'monthly', 'all']) await say(answer);
  // The platform fails on the second answer, as if the process had died there.
  port.failOnPost = port.messages.length + 3;
  await expect(say('go')).rejects.toThrow('process stopped');
  port.failOnPost = null;
  expect((await store.get(threadId))!.stage).toBe('running');
  return port.inThread(threadId).filter((m) => m.key.includes(':answer:')).length;
}

describe('a run resumed after a restart', () => {
  it('is cancelled with the refusal when its channel may no longer use the dataset', async () => {
    const [store, port] = [new MemoryStateStore(), new RecordingPort()];
    const answersBefore = await stoppedPartWay(store, port, 'local:r1');
    const restarted = new Bot({ workspace: demoWorkspace(), access: closed, port, store, now: () => now, presentAnswer, presentSummary, jobs: pLimit(1) });
    await restarted.resume();
    await restarted.idle();
    const thread = port.inThread('local:r1');
    expect(thread.filter((m) => m.key.includes(':answer:'))).toHaveLength(answersBefore);
    expect(thread.some((m) => m.key.endsWith(':summary'))).toBe(false);
    expect(thread.at(-1)!.text).toMatch(/^This request uses .*, which this channel may no longer use; nothing more will run here\./);
    expect((await store.get('local:r1'))!.stage).toBe('cancelled');
    const audit = await store.listAudit({ threadId: 'local:r1' });
    expect(audit.filter((e) => e.kind === 'denied').map((e) => e.detail)).toEqual([{ reason: 'dataset_not_allowed', run: 1, dataset: 'bookings' }]);
    // It was started once, before the restart, and never again.
    expect(audit.filter((e) => e.kind === 'run').map((e) => e.detail.event)).toEqual(['started']);
  });

  it('carries on when the rules still allow it', async () => {
    const [store, port] = [new MemoryStateStore(), new RecordingPort()];
    await stoppedPartWay(store, port, 'local:r2');
    const restarted = new Bot({ workspace: demoWorkspace(), access: open, port, store, now: () => now, presentAnswer, presentSummary, jobs: pLimit(1) });
    await restarted.resume();
    await restarted.idle();
    expect((await store.get('local:r2'))!.stage).toBe('done');
    const runs = (await store.listAudit({ threadId: 'local:r2' })).filter((e) => e.kind === 'run').map((e) => e.detail.event);
    expect(runs).toEqual(['started', 'started', 'finished']);
  });
});
