// Issue 17 items 1, 6, 17 and 21 on the local page, in Debian's chromium driven by playwright-core,
// at a desktop width (1280 px) and a phone width (390 px, a common phone's CSS width):
// - the request's card on the desk shows its stage as the thread moves: asking (the measure is
//   asked first), plan (the brief card waits for go), running, done;
// - the brief card (the second thing to answer) keeps its controls live after the bot's own
//   reminder, a "help" and a "status" reply;
// - nothing is wider than the screen (document.documentElement.scrollWidth <= innerWidth);
// - a chart opens full-screen on a tap, and closes with its button and with Escape.
// The real server (cli/serve) on the demo data (invented), reminders after 1 minute.
import { existsSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { serve, type Serving } from '../../cli/serve.js';
import { demoFixture } from '../helpers/demo-fixture.js';

const CHROMIUM = '/usr/bin/chromium';
const SHOTS = '/tmp/local-page-desk';
// Names no measure, so the bot asks for one before its brief card.
const REQUEST = 'How have things moved over time, month by month? We want to see the busiest and quietest months.';

let serving: Serving;
beforeAll(async () => {
  const demo = await demoFixture();
  // The demo config with a reminder after a minute, beside it so its data paths still resolve.
  const config = readFileSync(demo.configPath, 'utf8').replace(/remind_after_minutes: \d+/, 'remind_after_minutes: 1');
  expect(config).toContain('remind_after_minutes: 1');
  const configFile = join(dirname(demo.configPath), 'threadcount-remind-soon.yaml');
  writeFileSync(configFile, config);
  serving = await serve({
    configFile,
    statePath: join(mkdtempSync(join(tmpdir(), 'tc-desk-')), 'state.duckdb'),
    environment: { local: { host: '127.0.0.1', port: 0 } },
    log: () => undefined,
    tickMs: 1_000,
  });
}, 300_000);
afterAll(async () => serving?.stop());

const shot = (page: Page, name: string, fullPage = false) => page.screenshot({ path: join(SHOTS, name), fullPage });
const overflow = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
const botCount = (page: Page) => page.locator('#messages article.bot').count();

/** The open request's stage, on its card on the desk and above the thread (the same). */
async function waitForStage(page: Page, stage: string, timeout = 60_000): Promise<void> {
  // On a phone the desk is hidden in a thread; its card carries the stage all the same.
  await page.waitForFunction(
    (s) =>
      document.querySelector('#thread-stage')?.getAttribute('data-stage') === s &&
      document.querySelector('#thread-stage li[aria-current="step"]')?.textContent === s &&
      document.querySelector('#thread-list a.req[aria-current="page"]')?.getAttribute('data-stage') === s,
    stage,
    { timeout },
  );
}

/** Records each stage the open request's card shows, from now on. */
async function watchStages(page: Page): Promise<() => Promise<string[]>> {
  await page.evaluate(() => {
    const seen: string[] = [];
    (window as unknown as { seenStages: string[] }).seenStages = seen;
    const note = () => {
      const s = document.querySelector('#thread-list a.req[aria-current="page"]')?.getAttribute('data-stage');
      if (s && seen.at(-1) !== s) seen.push(s);
    };
    note();
    new MutationObserver(note).observe(document.querySelector('#thread-list')!, { subtree: true, childList: true, attributes: true });
  });
  return () => page.evaluate(() => (window as unknown as { seenStages: string[] }).seenStages);
}

async function say(page: Page, text: string): Promise<void> {
  const before = await botCount(page);
  await page.fill('#reply-text', text);
  await page.locator('#reply-form button[type=submit]').click();
  await page.waitForFunction((n) => document.querySelectorAll('#messages article.bot').length > n, before, { timeout: 60_000 });
}

async function walk(browser: Browser, width: number): Promise<void> {
  const tag = `${width}`;
  const page = await browser.newPage({ viewport: { width, height: width > 400 ? 900 : 844 }, reducedMotion: 'reduce', ...(width < 400 ? { isMobile: true, hasTouch: true, deviceScaleFactor: 2 } : {}) });
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  page.on('console', (m) => m.type() === 'error' && errors.push(m.text()));
  try {
    await page.goto(serving.localUrl);
    // Our own heading, not the question box of other tools (issue 17 item 17).
    expect(await page.locator('h1').innerText()).not.toMatch(/ask a data question/i);
    await shot(page, `${tag}-01-compose.png`);
    expect(await overflow(page), 'the compose view is wider than the screen').toBeLessThanOrEqual(0);

    await page.fill('#request-text', REQUEST);
    await page.getByRole('button', { name: 'Post request' }).click();
    await page.waitForSelector('#messages article.request');
    // Asked first: which measure.
    const prompt = page.locator('#messages article.bot', { has: page.locator('.prompt') }).first();
    await prompt.locator('.prompt button.recommended:not(:disabled)').waitFor({ timeout: 60_000 });
    await waitForStage(page, 'asking');
    await shot(page, `${tag}-02-asking.png`);
    expect(await overflow(page)).toBeLessThanOrEqual(0);
    if (await prompt.locator('.send-choices').count()) await prompt.locator('.send-choices').click();
    else await prompt.locator('.prompt button.recommended').click();

    // The brief card: the second thing to answer.
    const card = page.locator('#messages article.bot', { has: page.locator('.controls') }).last();
    await card.locator('.controls select').first().waitFor({ timeout: 60_000 });
    await waitForStage(page, 'plan');
    await card.locator('.controls').scrollIntoViewIfNeeded();
    await shot(page, `${tag}-03-card.png`);
    expect(await overflow(page), 'the card is wider than the screen').toBeLessThanOrEqual(0);
    // Every select shows its choice whole: no label wider than its box.
    const clipped = await card.locator('.controls select').evaluateAll((all) =>
      (all as HTMLSelectElement[]).filter((s) => {
        const probe = document.createElement('span');
        probe.style.cssText = `font: ${getComputedStyle(s).font}; position: absolute; visibility: hidden; white-space: nowrap`;
        probe.textContent = s.selectedOptions[0]?.textContent ?? '';
        document.body.append(probe);
        const wide = probe.getBoundingClientRect().width > s.clientWidth - 30; // less the arrow and padding
        probe.remove();
        return wide;
      }).map((s) => `${s.dataset.topic}: ${s.selectedOptions[0]?.textContent}`),
    );
    expect(clipped, 'select labels clipped').toEqual([]);

    // Help, status and the bot's own reminder are said while the card waits: it stays live.
    await say(page, 'help');
    await say(page, 'status');
    await page.waitForFunction(() => [...document.querySelectorAll('#messages article.bot .text')].some((t) => /remind/i.test(t.textContent ?? '')), undefined, { timeout: 150_000 });
    const last = page.locator('#messages article.bot').last();
    expect(await last.locator('.controls').count()).toBe(0);
    expect(await card.locator('.controls select[data-topic="grain"]').isEnabled()).toBe(true);
    expect(await card.getByRole('button', { name: /^Go/ }).isEnabled()).toBe(true);
    expect(await card.getByRole('button', { name: 'Cancel' }).isEnabled()).toBe(true);
    expect(await page.locator('#thread-list a.req[aria-current="page"] .t-waiting').count()).toBe(1);
    await waitForStage(page, 'plan');
    await card.scrollIntoViewIfNeeded();
    await shot(page, `${tag}-04-card-after-asides.png`);
    expect(await overflow(page)).toBeLessThanOrEqual(0);

    // Go: running, then done.
    const stages = await watchStages(page);
    await card.getByRole('button', { name: /^Go/ }).click();
    await page.waitForFunction(() => [...document.querySelectorAll<HTMLImageElement>('.charts img')].some((img) => img.complete && img.naturalWidth > 0), undefined, { timeout: 180_000 });
    await waitForStage(page, 'done', 240_000);
    expect(await card.getByRole('button', { name: /^Go/ }).count()).toBe(0);
    expect(await stages()).toEqual(['plan', 'running', 'done']);
    await shot(page, `${tag}-05-done-full.png`, true);
    expect(await overflow(page), 'the finished thread is wider than the screen').toBeLessThanOrEqual(0);

    // A chart opens full-screen on a tap and closes again, by its button and by Escape.
    const figure = page.locator('.charts figure').first();
    await figure.scrollIntoViewIfNeeded();
    await shot(page, `${tag}-06-chart.png`);
    const open = figure.locator('button.open-chart');
    if (width < 400) await open.tap();
    else await open.click();
    const view = page.locator('#chart-view');
    await view.locator('img').waitFor();
    await page.waitForFunction(() => (document.querySelector('#chart-view img') as HTMLImageElement).complete);
    expect(await view.evaluate((d: HTMLDialogElement) => d.open)).toBe(true);
    const box = (await view.boundingBox())!;
    expect(box.width).toBeGreaterThanOrEqual(width - 1);
    // Drawn at least twice the area it has in the thread (on a phone, turned a quarter to use the
    // screen's height), and inside the screen.
    const img = (await view.locator('img').boundingBox())!;
    const inThread = (await figure.locator('img').boundingBox())!;
    expect(img.width * img.height).toBeGreaterThanOrEqual(2 * inThread.width * inThread.height);
    expect(img.x).toBeGreaterThanOrEqual(0);
    expect(img.x + img.width).toBeLessThanOrEqual(width + 0.5);
    expect(await view.locator('.turn-hint').isVisible()).toBe(width < 400);
    await shot(page, `${tag}-07-chart-full.png`);
    await page.keyboard.press('Escape');
    await page.waitForFunction(() => !(document.querySelector('#chart-view') as HTMLDialogElement).open);
    await open.click();
    await view.getByRole('button', { name: 'Close' }).click();
    expect(await view.evaluate((d: HTMLDialogElement) => d.open)).toBe(false);
    expect(errors).toEqual([]);
  } finally {
    await page.close();
  }
}

describe('the local page at desktop and phone width', () => {
  const haveChromium = existsSync(CHROMIUM);
  if (!haveChromium && process.env.CI !== 'true') {
    it.skip(`needs Debian's chromium at ${CHROMIUM} (apt-get install chromium; .ci/run installs it)`, () => undefined);
    return;
  }
  it('moves a request through its stages, keeps the card live through asides, fits the screen, opens a chart full-screen', async () => {
    expect(existsSync(CHROMIUM), `chromium not found at ${CHROMIUM}`).toBe(true);
    const { chromium } = await import('playwright-core');
    mkdirSync(SHOTS, { recursive: true });
    const browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'] });
    try {
      // Both widths at once: each waits a minute for its reminder.
      await Promise.all([walk(browser, 1280), walk(browser, 390)]);
    } finally {
      await browser.close();
    }
  }, 600_000);
});
