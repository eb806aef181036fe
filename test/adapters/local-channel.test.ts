// The local channel: its HTTP API driven over loopback through a whole request (the real bot on
// the demo data), the fast acknowledgement, and the page itself in Debian's chromium.
import { existsSync, mkdirSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pLimit from 'p-limit';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { LocalChannel } from '../../adapters/local-channel/LocalChannel.js';
import type { LocalMessage } from '../../adapters/local-channel/LocalThreads.js';
import { findPageDir } from '../../adapters/local-channel/page-files.js';
import { ThreadInbox } from '../../adapters/ThreadInbox.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { Bot } from '../../bot/Bot.js';
import { presentAnswer, presentSummary } from '../../bot/present-answer.js';
import { MemoryStateStore } from '../../bot/stores/MemoryStateStore.js';
import { serve, type Serving } from '../../cli/serve.js';
import { loadConfig } from '../../config/load.js';
import { demoFixture } from '../helpers/demo-fixture.js';
import { SseClient } from '../helpers/sse-client.js';
import { expectBundleHoldsThread } from '../helpers/thread-bundle.js';
import { waitFor } from '../helpers/wait-for.js';

// Names no measure, so the bot asks for one (a prompt with options) before its brief card.
const REQUEST = 'How have things moved over time, month by month? We want to see the busiest and quietest months.';
const CHROMIUM = '/usr/bin/chromium';
const SHOTS = '/tmp/local-channel';

let serving: Serving;
let base: string;

beforeAll(async () => {
  const demo = await demoFixture();
  const stateDir = mkdtempSync(join(tmpdir(), 'tc-local-'));
  serving = await serve({
    configFile: demo.configPath,
    statePath: join(stateDir, 'state.duckdb'),
    environment: { local: { host: '127.0.0.1', port: 0 } },
    log: () => undefined,
  });
  base = serving.localUrl.replace(/\/$/, '');
});
afterAll(async () => serving?.stop());

async function postJson(path: string, body: unknown, headers: Record<string, string> = {}): Promise<Response> {
  return fetch(`${base}${path}`, { method: 'POST', headers: { 'content-type': 'application/json', ...headers }, body: JSON.stringify(body) });
}

async function thread(id: string): Promise<{ messages: LocalMessage[] }> {
  return (await fetch(`${base}/api/threads/${id}`)).json() as Promise<{ messages: LocalMessage[] }>;
}

describe('local channel HTTP API', () => {
  it('takes a request through prompts and the plan to charts, with events as they happen', async () => {
    const created = await postJson('/api/threads', { author: 'maren', text: REQUEST });
    expect(created.status).toBe(201);
    const { threadId } = (await created.json()) as { threadId: string };

    const sse = new SseClient();
    const stream = await sse.open(`${base}/api/threads/${threadId}/events`);
    expect(stream.headers.get('content-type')).toMatch(/^text\/event-stream/);

    // Answer each prompt with its recommended option, then agree the plan.
    const answered = new Set<string>();
    for (let turn = 0; turn < 12; turn++) {
      const last = await waitFor('the bot to ask something', async () => {
        const m = (await thread(threadId)).messages.at(-1);
        return m?.fromBot && (m.prompt || m.quickReplies) && !answered.has(m.id) ? m : undefined;
      });
      answered.add(last.id);
      const reply = last.prompt ? last.prompt.recommended.value : 'go';
      const res = await postJson(`/api/threads/${threadId}/messages`, { author: 'maren', text: reply });
      expect(res.status).toBe(201);
      if (!last.prompt) break;
    }

    // The run's last post is the zip of the thread, after the summary: wait for both, so no post
    // arrives while the events are counted.
    const done = await waitFor('the summary and the zip', async () => {
      const t = await thread(threadId);
      return t.messages.some((m) => m.fromBot && m.text.startsWith('*Summary*')) && t.messages.some((m) => m.files.some((f) => f.kind === 'bundle')) ? t : undefined;
    });
    const prompts = done.messages.filter((m) => m.prompt);
    expect(prompts.length).toBeGreaterThan(0);
    for (const p of prompts) {
      // The page shows options as buttons, so the numbered list stays out of the lead text.
      expect(p.prompt!.lead).not.toMatch(/^1\. /m);
      expect(p.prompt!.options.length).toBeGreaterThan(0);
    }
    expect(done.messages[0]).toMatchObject({ author: 'maren', fromBot: false, text: REQUEST });

    // Events: every message was announced once, and the progress message was updated in place.
    await waitFor('events for every message', () => sse.events.filter((e) => e.event === 'message.created').length >= done.messages.length);
    const createdIds = sse.events.filter((e) => e.event === 'message.created').map((e) => (JSON.parse(e.data) as LocalMessage).id);
    expect(createdIds).toEqual(done.messages.map((m) => m.id));
    const updates = sse.events.filter((e) => e.event === 'message.updated').map((e) => JSON.parse(e.data) as LocalMessage);
    expect(updates.length).toBeGreaterThan(0);
    expect(updates.at(-1)!.text).toMatch(/^All \d+ done\.$/);
    expect(sse.events.map((e) => Number(e.id))).toEqual(sse.events.map((_, i) => i + 1));
    await sse.close();

    // A reconnecting stream gets only what it missed.
    const again = new SseClient();
    await again.open(`${base}/api/threads/${threadId}/events`, { 'last-event-id': String(sse.events.length - 2) });
    await waitFor('the replayed events', () => again.events.length >= 2);
    expect(again.events.map((e) => Number(e.id))).toEqual([sse.events.length - 1, sse.events.length]);
    await again.close();

    // Files: the chart is a 1200-pixel PNG; tables are CSV; the SQL is there too.
    const files = done.messages.flatMap((m) => m.files);
    const chart = files.find((f) => f.kind === 'chart')!;
    expect(chart).toMatchObject({ contentType: 'image/png', width: 1200 });
    const png = await fetch(`${base}${chart.url}`);
    expect(png.headers.get('content-type')).toBe('image/png');
    const bytes = Buffer.from(await png.arrayBuffer());
    expect(bytes.subarray(1, 4).toString('latin1')).toBe('PNG');
    expect(bytes.readUInt32BE(16)).toBe(1200);
    const csv = await fetch(`${base}${files.find((f) => f.kind === 'table')!.url}`);
    expect(csv.headers.get('content-type')).toMatch(/^text\/csv/);
    expect((await csv.text()).split('\n')[0]).toMatch(/,/);
    expect(files.some((f) => f.kind === 'sql' && f.name.endsWith('.sql'))).toBe(true);

    const list = (await (await fetch(`${base}/api/threads`)).json()) as { threads: { id: string; waiting: boolean }[] };
    expect(list.threads.find((t) => t.id === threadId)).toMatchObject({ waiting: false });
  });

  it('refuses what it should', async () => {
    const text = await fetch(`${base}/api/threads`, { method: 'POST', headers: { 'content-type': 'text/plain' }, body: 'hello' });
    expect(text.status).toBe(415);
    expect((await postJson('/api/threads', { text: '   ' })).status).toBe(400);
    expect((await postJson('/api/threads', { text: 'x', extra: 1 })).status).toBe(400);
    expect((await postJson('/api/threads/nope/messages', { text: 'go' })).status).toBe(404);
    expect((await fetch(`${base}/api/files/nope`)).status).toBe(404);
    // Another site's name pointed at 127.0.0.1 (DNS rebinding) is turned away.
    const rebound = await new Promise<number>((resolve, reject) => {
      import('node:http').then(({ request }) => {
        const url = new URL(`${base}/api/threads`);
        request({ host: url.hostname, port: url.port, path: url.pathname, headers: { host: 'evil.example:80' } }, (res) => {
          res.resume();
          resolve(res.statusCode ?? 0);
        })
          .on('error', reject)
          .end();
      }, reject);
    });
    expect(rebound).toBe(421);
  });

  it('serves the page, and finds its files from dist/ as from the source tree', async () => {
    const page = await fetch(`${base}/`);
    expect(page.headers.get('content-type')).toMatch(/^text\/html/);
    expect(await page.text()).toContain('<script src="/app.js" defer></script>');
    expect((await fetch(`${base}/app.js`)).headers.get('content-type')).toMatch(/javascript/);
    expect((await fetch(`${base}/../package.json`)).status).toBe(404);
    const fromSource = findPageDir();
    expect(findPageDir(join(fromSource, '..', '..', '..', 'dist', 'adapters', 'local-channel', 'page-files.js'))).toBe(fromSource);
  });
});

describe('acknowledgement', () => {
  let ws: Workspace;
  beforeAll(async () => {
    ws = await openWorkspace(loadConfig((await demoFixture()).configPath));
  });
  afterAll(async () => ws?.source.close());

  it('answers the POST before the bot has posted anything', async () => {
    // The bot's work waits on a gate the test opens only after the response has arrived: a
    // server that waited for the bot would never answer.
    let open!: () => void;
    const gate = new Promise<void>((resolve) => (open = resolve));
    let inbox!: ThreadInbox;
    const channel = new LocalChannel({ port: 0, deliver: (msg) => void gate.then(() => inbox.deliver(msg)) });
    const bot = new Bot({ workspace: ws, port: channel, store: new MemoryStateStore(), now: () => new Date('2026-12-01T09:00:00Z'), presentAnswer, presentSummary, jobs: pLimit(1) });
    inbox = new ThreadInbox((m) => bot.handle(m), (err) => {
      throw err;
    });
    await channel.start();
    try {
      const res = await fetch(`${channel.url}api/threads`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ author: 'ola', text: REQUEST }) });
      expect(res.status).toBe(201);
      const { threadId } = (await res.json()) as { threadId: string };
      expect((await channel.threads.get(threadId))!.messages.map((m) => m.fromBot)).toEqual([false]);
      open();
      await waitFor('the bot to acknowledge', async () => (await channel.threads.get(threadId))!.messages.some((m) => m.fromBot));
      await inbox.idle();
    } finally {
      await channel.stop();
    }
  });

  it('says how long it held each answer (Server-Timing), counting from the connection for its first request', async () => {
    const channel = new LocalChannel({ port: 0, deliver: () => undefined });
    await channel.start();
    const { port } = new URL(channel.url);
    const { connect } = await import('node:net');
    const socket = connect(Number(port), '127.0.0.1');
    try {
      await new Promise<void>((resolve, reject) => socket.once('connect', resolve).once('error', reject));
      let received = '';
      socket.setEncoding('utf8').on('data', (chunk: string) => (received += chunk));
      const exchange = async (path: string): Promise<number> => {
        const before = received.length;
        socket.write(`GET ${path} HTTP/1.1\r\nHost: 127.0.0.1:${port}\r\n\r\n`);
        await waitFor('the answer', async () => /\r\n\r\n[\s\S]*\}/.test(received.slice(before)));
        const m = /^server-timing: held;dur=(\d+(?:\.\d+)?)\r$/im.exec(received.slice(before));
        expect(m, received.slice(before)).not.toBeNull();
        return Number(m![1]);
      };
      // The connection sits idle for 300 ms before its first request: that wait is the server's
      // holding time too (a connection accepted and not yet read is waiting on the server).
      await new Promise((resolve) => setTimeout(resolve, 300));
      const first = await exchange('/api/threads/no-such-thread');
      // A second request on the same kept-alive connection counts from its own arrival.
      const second = await exchange('/api/threads/no-such-thread');
      expect(first).toBeGreaterThanOrEqual(300);
      expect(second).toBeLessThan(first);
      expect(second).toBeGreaterThanOrEqual(0);
    } finally {
      socket.destroy();
      await channel.stop();
    }
  });
});

/** A screenshot after two animation frames, so the page has painted what the test just did. */
async function shot(page: Page, name: string, fullPage = false): Promise<void> {
  await page.evaluate(() => new Promise<void>((resolve) => requestAnimationFrame(() => requestAnimationFrame(() => resolve()))));
  await page.screenshot({ path: `${SHOTS}/${name}`, fullPage });
}

describe('the page in a browser', () => {
  const haveChromium = existsSync(CHROMIUM);
  const inCi = process.env.CI === 'true';
  if (!haveChromium && !inCi) {
    it.skip(`needs Debian's chromium at ${CHROMIUM} (apt-get install chromium; .ci/run installs it)`, () => undefined);
    return;
  }

  it('takes a typed request through clicked choices to a loaded chart', async () => {
    // Under CI a missing browser is a failure, not a skip.
    expect(existsSync(CHROMIUM), `chromium not found at ${CHROMIUM}; .ci/run should have installed it`).toBe(true);
    const { chromium } = await import('playwright-core');
    mkdirSync(SHOTS, { recursive: true });
    const browser = await chromium.launch({
      executablePath: CHROMIUM,
      headless: true,
      args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'],
    });
    try {
      const page = await browser.newPage({ viewport: { width: 1280, height: 900 }, reducedMotion: 'reduce' });
      const errors: string[] = [];
      page.on('pageerror', (e) => errors.push(e.message));
      page.on('console', (m) => m.type() === 'error' && errors.push(m.text()));
      await page.goto(serving.localUrl);
      await shot(page, '01-compose.png');

      await page.fill('#request-text', REQUEST);
      await page.getByRole('button', { name: 'Post request' }).click();
      await page.waitForSelector('#messages article.request');

      let shotPrompt = false;
      for (let turn = 0; turn < 12; turn++) {
        // The newest bot message with live choices: a prompt or the plan's quick replies.
        const state = await page.waitForFunction(
          () => {
            const all = document.querySelectorAll('#messages article.msg');
            const last = all[all.length - 1];
            if (!last?.classList.contains('bot')) return null;
            if (last.querySelector('.quick button:not(:disabled)')) return 'plan';
            if (last.querySelector('.prompt button.recommended:not(:disabled)')) return last.querySelector('.send-choices') ? 'many' : 'prompt';
            return null;
          },
          undefined,
          { timeout: 60_000 },
        );
        const kind = (await state.jsonValue()) as string;
        const last = page.locator('#messages article.msg').last();
        if (!shotPrompt && kind !== 'plan') {
          await shot(page, '02-prompt.png');
          shotPrompt = true;
        }
        if (kind === 'plan') {
          await shot(page, '03-plan.png');
          await last.getByRole('button', { name: /^Go/ }).click();
          break;
        }
        const before = await page.locator('#messages article.msg').count();
        // One click takes the recommendation; for several, it is already picked and Send sends it.
        if (kind === 'many') await last.locator('.send-choices').click();
        else await last.locator('.prompt button.recommended').click();
        // Wait until the click was taken (the person's reply appears, the prompt goes inert).
        await page.waitForFunction((n) => document.querySelectorAll('#messages article.msg').length > n, before, { timeout: 60_000 });
      }

      await page.waitForFunction(
        () => [...document.querySelectorAll<HTMLImageElement>('.charts img')].some((img) => img.complete && img.naturalWidth === 1200),
        undefined,
        { timeout: 120_000 },
      );
      const firstChart = page.locator('.charts figure').first();
      await firstChart.scrollIntoViewIfNeeded();
      await shot(page, '04-chart.png');
      await page.waitForFunction(() => [...document.querySelectorAll('#messages article.bot .text')].some((t) => t.textContent?.startsWith('Summary')), undefined, { timeout: 120_000 });
      await shot(page, '05-done-full.png', true);
      await page.locator('#messages article.msg').last().scrollIntoViewIfNeeded();
      await shot(page, '06-done.png');

      // The sidebar lists the request; file links are there for CSV and SQL.
      expect(await page.locator('#thread-list a').count()).toBeGreaterThan(0);
      expect(await page.locator('.files a[download$=".csv"]').count()).toBeGreaterThan(0);
      expect(await page.locator('.files a[download$=".sql"]').count()).toBeGreaterThan(0);

      // One zip of the whole thread, offered once after the summary; the browser downloads it.
      const zipLink = page.locator('.files .bundle a[download$=".zip"]');
      await zipLink.waitFor({ timeout: 60_000 });
      expect(await zipLink.count()).toBe(1);
      await zipLink.scrollIntoViewIfNeeded();
      await shot(page, '07-zip.png');
      const [download] = await Promise.all([page.waitForEvent('download'), zipLink.click()]);
      const zipBytes = readFileSync((await download.path())!);
      const threadId = decodeURIComponent(/#\/t\/(.+)$/.exec(page.url())![1]!);
      const posted = (await thread(threadId)).messages.flatMap((m) => m.files);
      const fetched = await Promise.all(posted.map(async (f) => ({ name: f.name, bytes: Buffer.from(await (await fetch(`${base}${f.url}`)).arrayBuffer()) })));
      expectBundleHoldsThread(zipBytes, fetched);

      // The thread's own link opens it again, in a page of its own, finished and with its zip.
      const link = await page.locator('#thread-link').getAttribute('href');
      expect(link).toBe(`${base}/#/t/${encodeURIComponent(threadId)}`);
      const again = await browser.newPage({ viewport: { width: 1280, height: 900 } });
      await again.goto(link!);
      await again.locator('.files .bundle a[download$=".zip"]').waitFor({ timeout: 30_000 });
      expect(await again.locator('#messages article.msg').count()).toBe(await page.locator('#messages article.msg').count());
      await again.close();
      expect(errors).toEqual([]);
    } finally {
      await browser.close();
    }
  });

  it('with an access token: signs in through the form, then posts (the CSRF token goes with it)', async () => {
    expect(existsSync(CHROMIUM), `chromium not found at ${CHROMIUM}; .ci/run should have installed it`).toBe(true);
    const token = 'page-test-access-token-0123456789';
    const received: string[] = [];
    const channel = new LocalChannel({ port: 0, accessToken: token, deliver: (m) => void received.push(m.text) });
    await channel.start();
    const { chromium } = await import('playwright-core');
    mkdirSync(SHOTS, { recursive: true });
    const browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: ['--no-sandbox', '--disable-gpu', '--no-first-run'] });
    try {
      const page = await browser.newPage({ viewport: { width: 1280, height: 800 } });
      const errors: string[] = [];
      page.on('pageerror', (e) => errors.push(e.message));
      await page.goto(channel.url);
      expect(new URL(page.url()).pathname).toBe('/login');
      await shot(page, '07-sign-in.png');
      await page.fill('#token', 'not the token at all, no');
      await page.getByRole('button', { name: 'Sign in' }).click();
      await page.waitForSelector('.sign-in .error');
      await page.fill('#token', token);
      await page.getByRole('button', { name: 'Sign in' }).click();
      await page.waitForSelector('#request-text');
      await page.fill('#request-text', REQUEST);
      await page.getByRole('button', { name: 'Post request' }).click();
      await page.waitForSelector('#messages article.request');
      await waitFor('the request to reach the bot', () => received.length === 1);
      expect(received).toEqual([REQUEST]);
      expect(errors).toEqual([]);
    } finally {
      await browser.close();
      await channel.stop();
    }
  });
});
