// The brief card on the local channel (issue 14 item 1, issue 17 items 1, 4, 5): the card's
// controls over the HTTP API and on the page in Debian's chromium. The card is posted through the
// channel's ThreadPort as the bot posts it; what a click sends is what the channel delivers.
import { existsSync, mkdirSync } from 'node:fs';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { LocalChannel, localBotThreadId } from '../../adapters/local-channel/LocalChannel.js';
import type { LocalMessage } from '../../adapters/local-channel/LocalThreads.js';
import type { IncomingMessage } from '../../bot/port.js';
import { agreedCardPost, briefCardPost, CARD_PLAN_LINES, correctedCardPost } from '../helpers/brief-card-post.js';
import { SseClient } from '../helpers/sse-client.js';
import { waitFor } from '../helpers/wait-for.js';

const CHROMIUM = '/usr/bin/chromium';
const SHOTS = '/tmp/local-card';
const REQUEST = 'How has revenue moved over time, month by month? We want to see the busiest and quietest months, by next Thursday.';

let channel: LocalChannel;
const delivered: IncomingMessage[] = [];

beforeAll(async () => {
  channel = new LocalChannel({ port: 0, deliver: (m) => delivered.push(m) });
  await channel.start();
});
afterAll(async () => channel?.stop());

async function postJson(path: string, body: unknown): Promise<Response> {
  return fetch(`${channel.url}${path.replace(/^\//, '')}`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) });
}

async function newCardThread(): Promise<{ id: string; cardId: string }> {
  const { thread } = await channel.threads.createThread('maren', REQUEST);
  const cardId = await channel.post(localBotThreadId(thread.id), briefCardPost());
  return { id: thread.id, cardId };
}

async function threadList(): Promise<{ id: string; waiting: boolean }[]> {
  return ((await (await fetch(`${channel.url}api/threads`)).json()) as { threads: { id: string; waiting: boolean }[] }).threads;
}

describe('the brief card over the local API', () => {
  it('carries the card\'s controls, shows a click by its label, and edits the card in place through the event stream', async () => {
    const { id, cardId } = await newCardThread();
    const sse = new SseClient();
    await sse.open(`${channel.url}api/threads/${id}/events`);
    const card = (await channel.threads.get(id))!.messages[1]!;
    expect(card).toMatchObject({ id: cardId, fromBot: true, quickReplies: [{ value: 'go' }, { value: 'cancel' }] });
    expect(card.controls!.map((c) => [c.topic, c.current])).toEqual([
      ['audience', 'for managers'],
      ['deadline', '2026-12-10'],
      ['grain', 'monthly'],
      ['period', 'since march 2024'],
      ['breakdowns', 'by route'],
    ]);

    // A click: the value for the bot, the label for the thread.
    const res = await postJson(`/api/threads/${id}/messages`, { author: 'maren', text: 'weekly', label: 'Grain: Weekly' });
    expect(res.status).toBe(201);
    expect(delivered.at(-1)).toMatchObject({ threadId: localBotThreadId(id), text: 'weekly', label: 'Grain: Weekly' });
    const click = (await channel.threads.get(id))!.messages.at(-1)!;
    expect(click).toMatchObject({ fromBot: false, text: 'weekly', label: 'Grain: Weekly' });

    // An informational message after the card (a reminder, help) leaves it waiting for an answer.
    await channel.post(localBotThreadId(id), { key: 'reminder', text: 'Your deadline (Thursday 10 December) is close.' });
    expect((await threadList()).find((t) => t.id === id)).toMatchObject({ waiting: true });

    // The bot's edit replaces the card in place: same message, new controls, one message.updated.
    const corrected = correctedCardPost();
    await channel.update(localBotThreadId(id), cardId, corrected.text, corrected);
    const updated = await waitFor('the card edited', () => sse.events.find((e) => e.event === 'message.updated'));
    const edited = JSON.parse(updated.data) as LocalMessage;
    expect(edited.id).toBe(cardId);
    expect(edited.text).toContain('*Grain:* weekly (you changed it)');
    expect(edited.controls!.find((c) => c.topic === 'grain')!.current).toBe('weekly');
    expect(edited.quickReplies!.map((q) => q.value)).toEqual(['go', 'cancel']);
    expect((await channel.threads.get(id))!.messages).toHaveLength(4);

    // Agreed: the card keeps its words and loses its controls, and nothing waits any more.
    const agreed = agreedCardPost();
    await channel.update(localBotThreadId(id), cardId, agreed.text, agreed);
    const inert = (await channel.threads.get(id))!.messages[1]!;
    expect(inert.text).toContain(CARD_PLAN_LINES[15]);
    expect(inert).not.toHaveProperty('controls');
    expect(inert).not.toHaveProperty('quickReplies');
    expect((await threadList()).find((t) => t.id === id)).toMatchObject({ waiting: false });
    await sse.close();
  });

  it('waits for nothing once the request is cancelled, whatever the words ("never mind" answers no prompt option)', async () => {
    const { thread } = await channel.threads.createThread('maren', 'How has it moved?');
    await channel.post(localBotThreadId(thread.id), { key: `${thread.id}:prompt:1`, text: 'Which measure?', prompt: { topic: 'metrics', question: 'Which measure?', options: [{ value: 'revenue', label: 'Revenue' }], recommended: { value: 'revenue', label: 'Revenue' } } } as never);
    expect((await threadList()).find((t) => t.id === thread.id)).toMatchObject({ waiting: true });
    await postJson(`/api/threads/${thread.id}/messages`, { author: 'maren', text: 'never mind' });
    await channel.post(localBotThreadId(thread.id), { key: `${thread.id}:cancelled:2`, text: 'Cancelled.' });
    expect((await threadList()).find((t) => t.id === thread.id)).toMatchObject({ waiting: false });
  });

  it('refuses a label that is not text', async () => {
    const { id } = await newCardThread();
    expect((await postJson(`/api/threads/${id}/messages`, { text: 'weekly', label: 7 })).status).toBe(400);
    expect((await postJson(`/api/threads/${id}/messages`, { text: 'weekly', label: 'x'.repeat(401) })).status).toBe(400);
  });
});

/** A screenshot after two animation frames, so the page has painted what the test just did. */
async function shot(page: Page, name: string, fullPage = false): Promise<void> {
  await page.evaluate(() => new Promise<void>((resolve) => requestAnimationFrame(() => requestAnimationFrame(() => resolve()))));
  await page.screenshot({ path: `${SHOTS}/${name}`, fullPage });
}

describe('the brief card on the page', () => {
  const haveChromium = existsSync(CHROMIUM);
  if (!haveChromium && process.env.CI !== 'true') {
    it.skip(`needs Debian's chromium at ${CHROMIUM} (apt-get install chromium; .ci/run installs it)`, () => undefined);
    return;
  }

  it('shows the card with its controls, sends a choice by value with its label shown, keeps them live after a reminder, and takes the edit in place', async () => {
    expect(existsSync(CHROMIUM), `chromium not found at ${CHROMIUM}; .ci/run should have installed it`).toBe(true);
    const { chromium } = await import('playwright-core');
    mkdirSync(SHOTS, { recursive: true });
    const browser = await chromium.launch({
      executablePath: CHROMIUM,
      headless: true,
      args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'],
    });
    try {
      for (const width of [1280, 390]) {
        const { id, cardId } = await newCardThread();
        const page = await browser.newPage({ viewport: { width, height: width > 400 ? 900 : 844 }, reducedMotion: 'reduce' });
        const errors: string[] = [];
        page.on('pageerror', (e) => errors.push(e.message));
        page.on('console', (m) => m.type() === 'error' && errors.push(m.text()));
        await page.goto(`${channel.url}#/t/${encodeURIComponent(id)}`);
        const card = page.locator(`article[data-id="${cardId}"]`);
        await card.locator('.controls').waitFor();

        // The wording survives whole, and each control shows the choice in force.
        const text = await card.locator('.text').innerText();
        for (const line of CARD_PLAN_LINES) expect(text).toContain(line.replace(/^\d+\. /, ''));
        expect(text).toContain('Say go to run it');
        expect(await card.locator('.control label').allInnerTexts()).toEqual(['AUDIENCE', 'DEADLINE', 'GRAIN', 'PERIOD', 'BREAKDOWNS']);
        expect(await card.locator('select[data-topic="audience"]').inputValue()).toBe('for managers');
        expect(await card.locator('select[data-topic="grain"]').inputValue()).toBe('monthly');
        expect(await card.locator('select[data-topic="breakdowns"]').inputValue()).toBe('by route');
        // A current value that is none of the choices shows "Choose…", not a wrong choice.
        expect(await card.locator('select[data-topic="period"] option:checked').innerText()).toBe('Choose…');
        expect(await card.locator('input[type="date"][data-topic="deadline"]').inputValue()).toBe('2026-12-10');
        expect(await card.locator('.quick button').allInnerTexts()).toEqual(['Go: run the plan', 'Cancel']);
        await card.locator('.controls').scrollIntoViewIfNeeded();
        await shot(page, `card-${width}.png`);
        await shot(page, `card-${width}-full.png`, true);
        // Nothing wider than the screen at phone width.
        expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(width);

        // A reminder after the card leaves its controls live (issue 17 item 1).
        await channel.post(localBotThreadId(id), { key: 'reminder', text: 'Your deadline (Thursday 10 December) is close.' });
        await page.locator('#messages article.msg').nth(2).waitFor();
        expect(await card.locator('select[data-topic="grain"]').isEnabled()).toBe(true);
        expect(await card.locator('.quick button').first().isEnabled()).toBe(true);

        // Choosing sends the value; the thread shows the label as the requester's reply.
        const before = delivered.length;
        await card.locator('select[data-topic="grain"]').selectOption('weekly');
        const sent = await waitFor('the choice delivered', () => delivered[before]);
        expect(sent).toMatchObject({ threadId: localBotThreadId(id), text: 'weekly', label: 'Grain: Weekly' });
        const reply = page.locator('#messages article.person').last();
        await reply.locator('.text', { hasText: 'Grain: Weekly' }).waitFor();
        expect(await reply.locator('.text').innerText()).toBe('Grain: Weekly');
        await card.locator('input[type="date"][data-topic="deadline"]').fill('2026-12-18');
        expect(await waitFor('the day delivered', () => delivered[before + 1])).toMatchObject({ text: 'deadline 2026-12-18', label: 'Deadline: Fri 18 Dec 2026' });
        expect(await card.locator('select[data-topic="grain"]').isEnabled()).toBe(true);

        // The bot's edit replaces the card in place: the same article, the new choice in force.
        const corrected = correctedCardPost();
        await channel.update(localBotThreadId(id), cardId, corrected.text, corrected);
        await card.locator('.text', { hasText: 'weekly (you changed it)' }).waitFor();
        expect(await page.locator(`article[data-id="${cardId}"]`).count()).toBe(1);
        expect(await card.locator('select[data-topic="grain"]').inputValue()).toBe('weekly');
        expect(await card.locator('select[data-topic="grain"]').isEnabled()).toBe(true);
        await card.locator('.controls').scrollIntoViewIfNeeded();
        await shot(page, `card-${width}-edited.png`);

        // Go: its label shows, and once the bot edits the card to its agreed form no control is left.
        await card.getByRole('button', { name: 'Go: run the plan' }).click();
        expect(await waitFor('go delivered', () => delivered[before + 2])).toMatchObject({ text: 'go', label: 'Go: run the plan' });
        const agreed = agreedCardPost();
        await channel.update(localBotThreadId(id), cardId, agreed.text, agreed);
        await card.locator('.text', { hasText: 'Agreed: running the plan.' }).waitFor();
        expect(await card.locator('.controls, .quick').count()).toBe(0);
        await shot(page, `card-${width}-agreed.png`);
        expect(errors).toEqual([]);
        await page.close();
      }
    } finally {
      await browser.close();
    }
  });

  it('takes several choices with the recommendation already picked: one click sends it, its label shown', async () => {
    const { chromium } = await import('playwright-core');
    const browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: ['--no-sandbox', '--disable-gpu', '--no-first-run'] });
    try {
      const { thread } = await channel.threads.createThread('maren', 'Which routes drove the change in bookings this summer?');
      const options = [
        { value: 'route', label: 'Route' },
        { value: 'channel', label: 'Booking channel' },
        { value: 'fare_class', label: 'Fare class' },
        { value: 'none', label: 'No breakdown' },
      ];
      const promptId = await channel.post(localBotThreadId(thread.id), {
        key: 'dims',
        text: 'Which breakdown should explain the change?',
        prompt: { topic: 'dimensions', question: 'Which breakdown should explain the change?', options, recommended: { value: 'route', label: 'Route', reason: 'the first breakdown in the catalog' }, many: true },
      });
      const page = await browser.newPage({ viewport: { width: 390, height: 844 } });
      await page.goto(`${channel.url}#/t/${encodeURIComponent(thread.id)}`);
      const prompt = page.locator(`article[data-id="${promptId}"] .prompt`);
      await prompt.waitFor();
      expect(await prompt.locator('button[aria-pressed="true"]').allInnerTexts()).toEqual([expect.stringMatching(/^Route/)]);
      const before = delivered.length;
      await prompt.locator('.send-choices').click();
      expect(await waitFor('the recommendation delivered', () => delivered[before])).toMatchObject({ text: 'route', label: 'Route' });
      await page.locator('#messages article.person').last().locator('.text', { hasText: /^Route$/ }).waitFor();
      // Answered: the prompt goes inert, its choice marked.
      await page.waitForFunction((id) => document.querySelector(`article[data-id="${id}"] .prompt.answered`) !== null, promptId);
      await shot(page, 'several-390.png');
    } finally {
      await browser.close();
    }
  });
});
