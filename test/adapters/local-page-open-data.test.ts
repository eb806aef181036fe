// The local page serving an open dataset the bot was never tuned to, in Debian's chromium driven by
// playwright-core: vega-datasets iowa-electricity.csv (US EIA net generation in Iowa by source,
// one row per source per year, 2001 to 2017) with the catalog `threadcount init` drafts for it.
// - the example buttons are that data's own starters, at its own grain (years, not months);
// - the brief card's period and breakdown selects show the values in force, before and after a
//   correction typed in words ("by source, only 2010 to 2017");
// - that correction, understood, draws no complaint about a date.
// The real server (cli/serve), the real bot and a real DuckDB.
import { existsSync, mkdirSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Locator, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { serve, type Serving } from '../../cli/serve.js';
import { writeIowaConfig } from '../helpers/open-data.js';

const CHROMIUM = '/usr/bin/chromium';
const SHOTS = '/tmp/local-page-open-data';

let serving: Serving;
beforeAll(async () => {
  const dir = mkdtempSync(join(tmpdir(), 'tc-page-open-'));
  const configFile = writeIowaConfig(dir);
  serving = await serve({ configFile, statePath: join(dir, 'state.duckdb'), environment: { local: { host: '127.0.0.1', port: 0 } }, log: () => undefined });
}, 300_000);
afterAll(async () => serving?.stop());

/** What each of the card's selects shows, by topic. */
const shown = (card: Locator) => card.locator('.controls select').evaluateAll((all) => Object.fromEntries((all as HTMLSelectElement[]).map((s) => [s.dataset.topic, s.selectedOptions[0]?.textContent ?? ''])));

async function botTexts(page: Page): Promise<string> {
  return (await page.locator('#messages article.bot').allInnerTexts()).join('\n');
}

describe('the local page on iowa-electricity.csv', () => {
  if (!existsSync(CHROMIUM) && process.env.CI !== 'true') {
    it.skip(`needs Debian's chromium at ${CHROMIUM}`, () => undefined);
    return;
  }
  it('offers the data\'s own starters and shows the period and breakdown in force on the card, before and after a correction in words', async () => {
    const { chromium } = await import('playwright-core');
    mkdirSync(SHOTS, { recursive: true });
    const browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: ['--no-sandbox', '--disable-gpu', '--no-first-run'] });
    try {
      const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
      const errors: string[] = [];
      page.on('pageerror', (e) => errors.push(e.message));
      await page.goto(serving.localUrl);
      // Yearly data: the starters ask year by year, and serve's hint is the first of them.
      await page.locator('.examples button.example').first().waitFor();
      const starters = await page.locator('.examples button.example').allTextContents();
      expect(starters[0]).toBe('How has net generation moved over time, year by year?');
      expect(starters[0]).toBe(serving.starters[0]);
      expect(starters.join(' ')).not.toMatch(/month|revenue|route|SkerryPass/i);
      await page.screenshot({ path: join(SHOTS, '01-compose.png') });

      // One source named: across all three, net generation is answered per source (catalog.ts ownLevelDimension).
      await page.fill('#request-text', 'How has nuclear generation moved over time?');
      await page.getByRole('button', { name: 'Post request' }).click();
      const card = page.locator('#messages article.bot', { has: page.locator('.controls') }).last();
      await card.locator('.controls select').first().waitFor({ timeout: 120_000 });
      expect(await shown(card)).toMatchObject({ grain: 'Yearly', period: 'All the data', breakdowns: 'No breakdown' });

      const before = await page.locator('#messages article.bot').count();
      await page.fill('#reply-text', 'by source, only 2010 to 2017');
      await page.locator('#reply-form button[type=submit]').click();
      await page.waitForFunction((n) => document.querySelectorAll('#messages article.bot').length > n, before, { timeout: 60_000 });
      await page.waitForFunction(() => document.querySelector('#messages select[data-topic="breakdowns"]')?.closest('.controls') !== null && [...document.querySelectorAll<HTMLSelectElement>('#messages select[data-topic="breakdowns"]')].some((s) => s.selectedOptions[0]?.textContent === 'By source'), undefined, { timeout: 60_000 });
      expect(await shown(card)).toMatchObject({ grain: 'Yearly', period: '2010 to 2017', breakdowns: 'By source' });
      const texts = await botTexts(page);
      expect(texts).toMatch(/Updated the brief above/);
      expect(texts).not.toMatch(/as a date|couldn't read/i);
      await card.locator('.controls').scrollIntoViewIfNeeded();
      await page.screenshot({ path: join(SHOTS, '02-card-corrected.png') });
      // Each select shows its choice whole: no label wider than its box.
      const clipped = await card.locator('.controls select').evaluateAll((all) =>
        (all as HTMLSelectElement[]).filter((s) => {
          const probe = document.createElement('span');
          probe.style.cssText = `font: ${getComputedStyle(s).font}; position: absolute; visibility: hidden; white-space: nowrap`;
          probe.textContent = s.selectedOptions[0]?.textContent ?? '';
          document.body.append(probe);
          const wide = probe.getBoundingClientRect().width > s.clientWidth - 30;
          probe.remove();
          return wide;
        }).map((s) => s.dataset.topic),
      );
      expect(clipped).toEqual([]);
      expect(errors).toEqual([]);
    } finally {
      await browser.close();
    }
  }, 300_000);
});
