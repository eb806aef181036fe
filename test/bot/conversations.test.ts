// Whole conversations through the CLI path on the demo data, written the way people write:
// typos, several questions in one message, relative dates, no metric, an unknown metric, a plan
// edit, a cancel, answers typed instead of clicked.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import type { RecordedThread } from '../../adapters/file-thread/FileThread.js';
import { ask } from '../../cli/ask.js';
import { demoFixture } from '../helpers/demo-fixture.js';

const now = new Date('2026-12-01T09:00:00Z');
let configPath: string;
beforeAll(async () => {
  configPath = (await demoFixture()).configPath;
});

async function converse(request: string, answers: string): Promise<{ end: string; thread: RecordedThread }> {
  const dir = mkdtempSync(join(tmpdir(), 'tc-conv-'));
  writeFileSync(join(dir, 'answers.yaml'), answers);
  const r = await ask({ configFile: configPath, request, answersFile: join(dir, 'answers.yaml'), outDir: join(dir, 'out'), now });
  return { end: r.end, thread: r.thread.thread };
}

const bot = (t: RecordedThread) => t.posts.filter((p) => p.author === 'threadcount');
// The brief card holds the plan; corrections edit it in place (test/bot/brief-card.test.ts).
const card = (t: RecordedThread) => bot(t).find((p) => p.text.startsWith('*Here is what I understood.*'))!;

describe('scripted conversations', () => {
  it('the demo request covers all four request kinds and ends with a digest', async () => {
    const { end, thread } = await converse(
      'Ops review is on the 15th. Could the data team tell us whether this summer beat last summer, which routes and booking channels drove the difference, whether SkerryPass holders really travel more often than other customers since it launched, and where average fare per passenger and the share of revenue we refunded stand for the last full month?',
      'metrics: revenue\naudience: managers\n',
    );
    expect(end).toBe('done');
    const text = card(thread).text;
    for (const heading of ['*Growth*', '*Performance*', '*KPI snapshot*']) expect(text).toContain(heading);
    // The data ends on 18 June 2025: this summer so far, against the same days a year earlier (docs/reading.md).
    expect(text).toMatch(/1 June to 18 June 2025 so far against 1 June to 18 June 2024/);
    // Nothing asked: the summer question's measure is assumed (the headline one) and said on the card.
    expect(bot(thread).map((p) => p.promptTopic).filter(Boolean)).toEqual([]);
    expect(text).toMatch(/Revenue \(assumed\)/);
    const answers = bot(thread).filter((p) => /^\*\d+\. /.test(p.text));
    expect(answers.length).toBeGreaterThanOrEqual(12);
    expect(answers.some((p) => /pass holders/i.test(p.text) && /observational|not proof|cannot prove/i.test(p.text))).toBe(true);
    const summary = bot(thread).find((p) => p.text.startsWith('*Summary*'))!;
    expect(summary.files.map((f) => f.kind)).toEqual(['digest']);
  });

  it('tolerates typos, takes typed answers and a plan edit', async () => {
    const { end, thread } = await converse(
      'hey, how has revnue trended?? need it for the board by friday',
      'grain: "by quarter please"\nwindow: "since 2023"\nplan: ["drop 2", "go"]\n',
    );
    expect(end).toBe('done');
    expect(bot(thread)[0]!.text).toMatch(/revenue/);
    // "the board" sets the audience and "by friday" the deadline: neither is asked.
    expect(bot(thread).map((p) => p.promptTopic)).not.toContain('audience');
    expect(bot(thread).map((p) => p.promptTopic)).not.toContain('deadline');
    // The grain, the period and the drop are corrections to one card, each confirmed in a line.
    const confirmations = bot(thread).filter((p) => p.text.startsWith('Updated the brief above:')).map((p) => p.text);
    expect(confirmations).toEqual([expect.stringMatching(/grain: quarterly/), expect.stringMatching(/period: 1 January 2023 to 18 June 2025/), expect.stringMatching(/dropped: /)]);
    const dropped = /dropped: (.+)\.$/.exec(confirmations[2]!)![1]!;
    expect(card(thread).text).not.toContain(dropped);
    expect(card(thread).text).toMatch(/Quarterly revenue, 1 January 2023 to 18 June 2025/);
    expect(card(thread).edits).toBe(4);
  });

  it('asks for a metric when none is named, and lists the catalog for one that does not exist', async () => {
    const none = await converse('can you look at how things have moved over time?', 'metrics: "bookings"\n');
    expect(bot(none.thread).find((p) => p.promptTopic === 'metrics')!.text).toMatch(/Which metric/);
    expect(none.end).toBe('done');
    const unknown = await converse('show me the trend of churn', 'metrics: "churn"\n');
    const prompts = bot(unknown.thread).filter((p) => p.promptTopic === 'metrics');
    expect(prompts[0]!.text).toMatch(/I don't have a metric called "churn"/);
    // The typed "churn" is refused with the catalog, then "ok" takes the recommendation, which is
    // to stop: nothing in the data measures churn, and no other measure is offered in its place.
    expect(prompts[1]!.text).toMatch(/I couldn't match "churn" to a metric\. I can measure: Revenue, Bookings/);
    expect(prompts[0]!.text).toMatch(/Recommended: \*Stop here\*/);
    expect(unknown.end).toBe('cancelled');
    expect(bot(unknown.thread).at(-1)!.text).toMatch(/^Cancelled/);
  });

  it('stops on cancel at the plan', async () => {
    const { end, thread } = await converse('monthly passengers trend', 'plan: cancel\n');
    expect(end).toBe('cancelled');
    expect(bot(thread).at(-1)!.text).toMatch(/^Cancelled/);
    expect(bot(thread).some((p) => p.files.length > 0)).toBe(false);
  });

  it('reads relative deadlines', async () => {
    const { thread } = await converse('revenue trend, needed by end of next month', 'plan: cancel\n');
    expect(bot(thread).map((p) => p.promptTopic)).not.toContain('deadline');
  });

  it('takes plan edits that add a breakdown and change the period, and refuses personal data', async () => {
    const { end, thread } = await converse(
      'monthly revenue trend for the ops team',
      'deadline: none\nwindow: all\nplan: ["add a breakdown by customer email", "add a breakdown by channel", "use 2024", "go"]\n',
    );
    expect(end).toBe('done');
    const notes = bot(thread).map((p) => p.text);
    expect(notes.some((t) => /personal data/.test(t) && /Customer email/.test(t))).toBe(true);
    expect(card(thread).text).toMatch(/Revenue by booking channel over time/);
    expect(card(thread).text).toMatch(/January 2024 to December 2024/);
    expect(bot(thread).some((p) => p.files.some((f) => f.path.includes('segment_trend')))).toBe(true);
  });
});
