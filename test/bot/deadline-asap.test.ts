// Issue 17 item 1: "as soon as possible" is a deadline of today by choice, so no "your deadline is
// close" warning follows it, whether it was in the request or typed on the brief card; a dated
// deadline still gets its warning, also when it replaces an "asap". The real bot on the demo data
// (invented), state in memory; the reader's own checks on the example catalog.
import pLimit from 'p-limit';
import { describe, expect, it } from 'vitest';
import { Bot } from '../../bot/Bot.js';
import { presentAnswer, presentSummary } from '../../bot/present-answer.js';
import { readCorrection } from '../../bot/reading/corrections.js';
import { readRequest } from '../../bot/reading/read-request.js';
import { MemoryStateStore } from '../../bot/stores/MemoryStateStore.js';
import { useDemoWorkspace } from '../helpers/demo-fixture.js';
import { exampleFacts } from '../helpers/example-facts.js';
import { RecordingPort } from '../helpers/recording-port.js';

describe('reading "as soon as possible"', () => {
  const NOW = new Date('2025-06-20T09:00:00Z');
  it('marks the words for urgency, and not a date that happens to be today', () => {
    for (const text of ['revenue by month, asap please', 'revenue by month as soon as possible', 'I need revenue by month urgently']) {
      expect(readRequest(text, exampleFacts, { now: NOW }), text).toMatchObject({ deadline: '2025-06-20', deadlineAsap: true });
    }
    for (const text of ['revenue by month by end of day', 'revenue by month for today\'s board meeting', 'revenue by month by Friday']) {
      const b = readRequest(text, exampleFacts, { now: NOW });
      expect(b.deadline, text).toBeDefined();
      expect(b.deadlineAsap, text).toBeUndefined();
    }
  });
  it('reads it as a correction too', () => {
    expect(readCorrection('deadline asap', exampleFacts, NOW, 'en-IE')).toMatchObject({ deadline: '2025-06-20', deadlineAsap: true });
    expect(readCorrection('deadline 2025-06-27', exampleFacts, NOW, 'en-IE').deadlineAsap).toBeUndefined();
  });
});

const demoWorkspace = useDemoWorkspace();

function setUp() {
  const port = new RecordingPort();
  let clock = new Date('2026-12-01T09:00:00Z');
  const bot = new Bot({
    workspace: demoWorkspace(), port, store: new MemoryStateStore(), now: () => clock, presentAnswer, presentSummary, jobs: pLimit(1),
    timings: { remindAfterMs: 24 * 3_600_000, deadlineWarningMs: 24 * 3_600_000 },
  });
  const warnings = (thread: string) => port.inThread(thread).filter((m) => /deadline .* is close/i.test(m.text));
  return { port, bot, warnings, later: (ms: number) => (clock = new Date(clock.getTime() + ms)) };
}

describe('deadline warnings on the bot', () => {
  it('gives none for "asap" in the request, while the card waits', async () => {
    const { bot, port, warnings, later } = setUp();
    await bot.handle({ threadId: 'a1', author: 'maren', text: 'How has revenue moved month by month? For the managers, asap please.' });
    expect(port.inThread('a1').at(-1)!.text).toMatch(/as soon as possible/);
    later(60_000);
    await bot.tick();
    expect(warnings('a1')).toEqual([]);
  });

  it('gives none after "deadline asap" is typed on the card, and warns again once a dated deadline replaces it', async () => {
    const { bot, port, warnings, later } = setUp();
    await bot.handle({ threadId: 'a2', author: 'maren', text: 'How has revenue moved month by month? For the managers.' });
    await bot.handle({ threadId: 'a2', author: 'maren', text: 'deadline asap' });
    later(60_000);
    await bot.tick();
    expect(warnings('a2')).toEqual([]);
    // The 2nd of December, 20 hours on: the end of that day is within the 24-hour warning time.
    await bot.handle({ threadId: 'a2', author: 'maren', text: 'deadline 2026-12-02' });
    later(20 * 3_600_000);
    await bot.tick();
    expect(warnings('a2')).toHaveLength(1);
  });

  it('still warns for a dated deadline that nears', async () => {
    const { bot, warnings, later } = setUp();
    await bot.handle({ threadId: 'a3', author: 'maren', text: 'How has revenue moved month by month? For the managers, needed by the 2nd.' });
    later(20 * 3_600_000);
    await bot.tick();
    expect(warnings('a3')).toHaveLength(1);
  });
});
