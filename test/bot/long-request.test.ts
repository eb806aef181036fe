// A request far longer than a chat message (a pasted document): intake reads only its first
// REQUEST_READ_LIMIT characters, the thread is told so and where reading stopped, and nothing is
// lost: the whole text is in the audit log and in the thread's state. The limit of a few thousand
// characters is common practice for chat messages (Slack advises keeping a message's text under
// 4,000 characters and Discord caps a message at 2,000: both recalled from memory).
import pLimit from 'p-limit';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { Bot } from '../../bot/Bot.js';
import { readablePart, readRequest, REQUEST_READ_LIMIT } from '../../bot/reading/read-request.js';
import { exampleValues } from '../helpers/example-facts.js';
import { presentAnswer, presentSummary } from '../../bot/present-answer.js';
import { MemoryStateStore } from '../../bot/stores/MemoryStateStore.js';
import { loadConfig } from '../../config/load.js';
import { demoFixture } from '../helpers/demo-fixture.js';
import { EXAMPLE_CONFIG_PATH } from '../helpers/example-config.js';
import { RecordingPort } from '../helpers/recording-port.js';

const now = new Date('2025-06-20T09:00:00Z');
const REQUEST = 'How has revenue moved over time, month by month? It is for the ops review.';
// Filler that names no catalog term, then a tail that names a metric and personal data: read, they would change the brief.
const FILLER = 'Notes pasted from the meeting minutes follow here without any figures in them. ';
const TAIL = ' Also show passengers weekly, broken down by customer email.';

function longRequest(total: number): string {
  const body = FILLER.repeat(Math.ceil(total / FILLER.length));
  return (REQUEST + ' ' + body).slice(0, total - TAIL.length) + TAIL;
}

describe('readablePart', () => {
  it('leaves a request within the limit whole', () => {
    expect(readablePart(REQUEST)).toBe(REQUEST);
    const exact = 'a'.repeat(REQUEST_READ_LIMIT);
    expect(readablePart(exact)).toBe(exact);
  });

  it('cuts a longer one at or before the limit, between words', () => {
    const text = longRequest(100_000);
    const part = readablePart(text);
    expect(part.length).toBeLessThanOrEqual(REQUEST_READ_LIMIT);
    expect(part.length).toBeGreaterThan(REQUEST_READ_LIMIT - 200);
    expect(text.startsWith(part)).toBe(true);
    // The next character is a space: no word is half read.
    expect(text[part.length]).toMatch(/\s/);
  });

  it('never splits a character outside the Basic Multilingual Plane (a UTF-16 surrogate pair)', () => {
    const text = `${'x'.repeat(REQUEST_READ_LIMIT - 1)}\u{1F6A2}${'y'.repeat(10)}`;
    const part = readablePart(text);
    expect(part).toBe('x'.repeat(REQUEST_READ_LIMIT - 1));
    expect(() => encodeURIComponent(part)).not.toThrow();
  });

  it('a brief is read from the readable part only, and keeps the whole text', () => {
    const ds = loadConfig(EXAMPLE_CONFIG_PATH).datasets[0]!;
    const text = longRequest(100_000);
    const brief = readRequest(text, { dataset: ds, coverage: { firstDate: '2022-01-01', lastDate: '2025-06-18', rows: 1 }, values: exampleValues }, { now });
    expect(brief.requestText).toBe(text);
    expect(brief.metrics).toEqual(['revenue']);
    expect(brief.grain).toBe('month');
    expect(brief.personalData).toBeUndefined();
    // The control: the tail, within the limit, is read.
    const short = readRequest(REQUEST + TAIL, { dataset: ds, coverage: { firstDate: '2022-01-01', lastDate: '2025-06-18', rows: 1 }, values: exampleValues }, { now });
    expect(short.metrics).toContain('passengers');
    expect(short.personalData).toEqual(['customer_email']);
  });
});

describe('a 100,000-character request through the bot', () => {
  let ws: Workspace;
  beforeAll(async () => {
    ws = await openWorkspace(loadConfig((await demoFixture()).configPath));
  });
  afterAll(async () => {
    await ws?.source.close();
  });

  it('is acknowledged with a clear note of what was read; the audit log and the state keep all of it', async () => {
    const port = new RecordingPort();
    const store = new MemoryStateStore();
    const bot = new Bot({ workspace: ws, port, store, now: () => now, presentAnswer, presentSummary, jobs: pLimit(2) });
    const text = longRequest(100_000);
    await bot.handle({ threadId: 'local:long', author: 'maren', text, channel: 'local' });

    const posts = port.inThread('local:long');
    const ack = posts[0]!.text;
    const read = readablePart(text);
    // The brief card holds the note of what was read.
    expect(ack).toMatch(/^\*Here is what I understood\.\*/);
    expect(ack).toMatch(/Measure:\* Revenue/);
    expect(ack).toContain(`Your message is 100,000 characters long, more than I read in one request, so I read the first ${read.length.toLocaleString('en')} characters`);
    // Where reading stopped: the last words of the readable part, quoted.
    const lastWords = read.trimEnd().split(' ').slice(-3).join(' ');
    expect(ack).toContain(`${lastWords}".`);
    expect(ack).toContain('the whole message is kept in the request log');
    // The tail was not read: no refusal of personal data, no passengers, and the conversation goes on.
    expect(posts.map((p) => p.text).join('\n')).not.toMatch(/customer email|personal data/i);
    const state = await store.get('local:long');
    expect(state!.stage).toBe('planning');
    expect(state!.brief.requestText).toBe(text);
    expect(state!.brief.metrics).toEqual(['revenue']);
    // Nothing is lost: the audit log holds the whole message.
    const request = (await store.listAudit()).find((e) => e.kind === 'request')!;
    expect(request.detail.text).toBe(text);
  });

  it('a request within the limit gets the acknowledgement alone (the control)', async () => {
    const port = new RecordingPort();
    const store = new MemoryStateStore();
    const bot = new Bot({ workspace: ws, port, store, now: () => now, presentAnswer, presentSummary, jobs: pLimit(2) });
    await bot.handle({ threadId: 'local:short', author: 'maren', text: REQUEST, channel: 'local' });
    const ack = port.inThread('local:short')[0]!.text;
    expect(ack).toMatch(/^\*Here is what I understood\.\*/);
    expect(ack).toMatch(/Measure:\* Revenue/);
    expect(ack).not.toContain('characters long');
  });
});
