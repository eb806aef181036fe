// A follow-up sent while a run is under way ("rerun it quarterly", a new question) is kept and
// taken up when the run finishes, in the order sent: found lost by a newcomer, who got "Still
// working on it" and then a thread that ended without the run asked for. The real bot on the
// demo data (invented), with the first answer held back until the follow-ups are in.
import pLimit from 'p-limit';
import { describe, expect, it } from 'vitest';
import { Bot } from '../../bot/Bot.js';
import { presentAnswer, presentSummary } from '../../bot/present-answer.js';
import type { AnswerPresenter } from '../../bot/presenters.js';
import { MemoryStateStore } from '../../bot/stores/MemoryStateStore.js';
import { useDemoWorkspace } from '../helpers/demo-fixture.js';
import { RecordingPort } from '../helpers/recording-port.js';

const demoWorkspace = useDemoWorkspace();

/** A bot whose first answer waits for `release()`, so messages can arrive mid-run. */
function setUp() {
  const port = new RecordingPort();
  const store = new MemoryStateStore();
  let release!: () => void;
  const gate = new Promise<void>((r) => (release = r));
  let first = true;
  const held: AnswerPresenter = async (answer, ctx) => {
    if (first) {
      first = false;
      await gate;
    }
    return presentAnswer(answer, ctx);
  };
  const bot = new Bot({ workspace: demoWorkspace(), port, store, now: () => new Date('2026-12-01T09:00:00Z'), presentAnswer: held, presentSummary, jobs: pLimit(1) });
  return { port, store, bot, release };
}

const summaries = (port: RecordingPort, thread: string) => port.inThread(thread).filter((m) => m.text.startsWith('*Summary*'));

describe('a follow-up sent during a run', () => {
  it('is kept, said so, and run after the first run ends; a second one after that', async () => {
    const { port, store, bot, release } = setUp();
    await bot.handle({ threadId: 'h1', author: 'maren', text: 'How has revenue moved month by month since 2023? For the managers.' });
    await bot.handle({ threadId: 'h1', author: 'maren', text: 'go' });
    expect((await store.get('h1'))!.stage).toBe('running');
    await bot.handle({ threadId: 'h1', author: 'maren', text: 'rerun it quarterly' });
    await bot.handle({ threadId: 'h1', author: 'maren', text: 'now split that by booking channel' });
    const notes = port.inThread('h1').filter((m) => m.text.startsWith('Noted: '));
    expect(notes.map((m) => m.text)).toEqual([
      expect.stringMatching(/^Noted: I'll take up "rerun it quarterly" when this run finishes \(0 of \d+ done\)\./),
      expect.stringMatching(/^Noted: I'll take up "now split that by booking channel" when this run finishes/),
    ]);
    // Chatter is not a follow-up: it gets the progress line and is not held.
    await bot.handle({ threadId: 'h1', author: 'maren', text: 'thanks!' });
    expect(port.inThread('h1').at(-1)!.text).toMatch(/^Still working on it/);
    expect((await store.get('h1'))!.held).toHaveLength(2);
    release();
    await bot.idle();
    // Three runs: the one agreed, then each follow-up in the order sent, each ending in a summary.
    expect(summaries(port, 'h1')).toHaveLength(3);
    const texts = port.inThread('h1').map((m) => m.text);
    const first = texts.findIndex((t) => t.startsWith('Now taking up what you asked during the run: "rerun it quarterly"'));
    const second = texts.findIndex((t) => t.startsWith('Now taking up what you asked during the run: "now split that by booking channel"'));
    expect(first).toBeGreaterThan(texts.findIndex((t) => t.startsWith('*Summary*')));
    expect(second).toBeGreaterThan(first);
    expect(texts[first + 1]).toMatch(/^Running it again with grain: quarterly\./);
    expect(texts[second + 1]).toMatch(/^Running it again with breakdown added: booking channel\./);
    const end = (await store.get('h1'))!;
    expect(end.stage).toBe('done');
    expect(end.held).toBeUndefined();
  }, 600_000);

  it('goes with the run when the run is cancelled', async () => {
    const { port, store, bot, release } = setUp();
    await bot.handle({ threadId: 'h2', author: 'maren', text: 'How has revenue moved month by month since 2023? For the managers.' });
    await bot.handle({ threadId: 'h2', author: 'maren', text: 'go' });
    await bot.handle({ threadId: 'h2', author: 'maren', text: 'rerun it weekly' });
    await bot.handle({ threadId: 'h2', author: 'maren', text: 'cancel' });
    release();
    await bot.idle();
    const end = (await store.get('h2'))!;
    expect(end.stage).toBe('cancelled');
    expect(end.held).toBeUndefined();
    expect(port.inThread('h2').some((m) => m.text.startsWith('Now taking up'))).toBe(false);
  }, 600_000);
});
