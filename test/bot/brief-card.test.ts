// The brief card (issue 14): one message with what was read and what is assumed, and the plan;
// "go" or a correction in free words, edited in place; follow-ups after a run start new runs.
// Driven through `threadcount ask` on the demo data, so every part is the real one.
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
  const dir = mkdtempSync(join(tmpdir(), 'tc-card-'));
  writeFileSync(join(dir, 'answers.yaml'), answers);
  const r = await ask({ configFile: configPath, request, answersFile: join(dir, 'answers.yaml'), outDir: join(dir, 'out'), now });
  return { end: r.end, thread: r.thread.thread };
}
const bot = (t: RecordedThread) => t.posts.filter((p) => p.author === 'threadcount');

const cards = (t: RecordedThread) => bot(t).filter((p) => p.text.startsWith('*Here is what I understood.*'));
const line = (text: string, label: string) => text.split('\n').find((l) => l.startsWith(`- *${label}:*`)) ?? '';
const items = (text: string) => (text.match(/^\d+\. /gm) ?? []).length;
const DEMO_REQUEST =
  'Ops review is on the 15th. Could the data team tell us whether this summer beat last summer, which routes and booking channels drove the difference, whether SkerryPass holders really travel more often than other customers since it launched, and where average fare per passenger and the share of revenue we refunded stand for the last full month?';

describe('the brief card', () => {
  it('answers the demo request with one card and no questions: each topic read (with its words) or assumed (with a reason)', async () => {
    const { end, thread } = await converse(DEMO_REQUEST, '');
    expect(end).toBe('done');
    expect(bot(thread).some((p) => p.promptTopic)).toBe(false);
    expect(cards(thread)).toHaveLength(1);
    const card = cards(thread)[0]!.text;
    // Read from the text, with the words it came from.
    expect(line(card, 'Deadline')).toMatch(/15 December 2026 _\(from "[^"]*15th[^"]*"\)_/);
    expect(line(card, 'Period')).toMatch(/from "/);
    expect(line(card, 'Breakdowns')).toMatch(/Route.*Booking channel|Booking channel.*Route/);
    // Not stated: a default and why.
    // ("Ops review" reads as a managers' meeting; either way the card says where the value came from.)
    expect(line(card, 'Audience')).toMatch(/Managers _\((?:from "Ops review"|assumed: .+)\)_/);
    expect(line(card, 'Grain')).toMatch(/Monthly _\(assumed: .+\)_/);
    // The summer question names no measure: the request's first is assumed, and said.
    expect(line(card, 'Measures')).toMatch(/\(assumed\)|assumed:/);
    // The data ends before today: the card says from which day "last month" counts, in one date style.
    expect(card).toMatch(/^Periods like "last month" count back from the end of the data \(\d{1,2} [A-Z][a-z]+ \d{4}\), not from today\.$/m);
    expect(card).not.toMatch(/\d{4}-\d{2}-\d{2}/);
    // The questions restated, and the plan beneath with its kinds.
    expect(card).toMatch(/\*Questions\*\n1\. /);
    for (const heading of ['*Growth*', '*Performance*', '*KPI snapshot*']) expect(card).toContain(heading);
    // Agreed: the card keeps its text, loses its controls and says so.
    expect(card).toMatch(/\*Agreed:\* running \d+ answers\.$/);
    expect(cards(thread)[0]!.controls).toBeUndefined();
  }, 240_000);

  it('takes a correction touching several topics in one reply, edits the card in place and confirms in one line', async () => {
    const { end, thread } = await converse('how has revenue trended by quarter since 2023?', 'plan: ["for leadership, weekly, only 2024, add channel, drop 3", "go"]\n');
    expect(end).toBe('done');
    expect(cards(thread)).toHaveLength(1);
    const card = cards(thread)[0]!;
    // Edited twice: the correction, then "go".
    expect(card.edits).toBe(2);
    expect(line(card.text, 'Audience')).toMatch(/^- \*Audience:\* Leadership _\(from "for leadership, weekly/);
    expect(line(card.text, 'Grain')).toMatch(/Weekly/);
    expect(line(card.text, 'Period')).toMatch(/1 January to 31 December 2024/);
    expect(line(card.text, 'Breakdowns')).toMatch(/Booking channel/);
    expect(card.text).toMatch(/^1\. Weekly revenue, January 2024 to December 2024/m);
    const confirm = bot(thread).find((p) => p.text.startsWith('Updated the brief above:'))!;
    expect(confirm.text.split('\n')).toHaveLength(1);
    for (const what of ['audience: leadership', 'grain: weekly', 'period: 1 January to 31 December 2024', 'breakdown added: booking channel', 'dropped: ']) expect(confirm.text).toContain(what);
  }, 240_000);

  it('asks only what cannot be defaulted: no measure at all, or one the catalog lacks', async () => {
    const none = await converse('can you look at how things have moved over time?', 'metrics: "bookings"\n');
    expect(bot(none.thread).filter((p) => p.promptTopic).map((p) => p.promptTopic)).toEqual(['metrics']);
    expect(none.end).toBe('done');
    const unknown = await converse('show me the trend of churn for the board by friday', 'metrics: "bookings"\n');
    expect(bot(unknown.thread).filter((p) => p.promptTopic).map((p) => p.promptTopic)).toEqual(['metrics']);
    expect(bot(unknown.thread)[0]!.text).toMatch(/I don't have a metric called "churn"/);
    // What the answer set is credited to the answer, not to the request's words.
    expect(line(cards(none.thread)[0]!.text, 'Measure')).toMatch(/^- \*Measure:\* Bookings _\(your answer\)_$/);
  }, 240_000);

  it('restates each question with its own detail: "the busiest and quietest months" is not folded into "how it moved"', async () => {
    const { thread } = await converse('How has revenue moved over time, month by month? We want to see the busiest and quietest months.', '');
    const card = cards(thread)[0]!.text;
    expect(card).toMatch(/^1\. How revenue moved over time\.$/m);
    expect(card).toMatch(/^2\. When in the year revenue is highest and lowest\.$/m);
  }, 240_000);

  it('makes the verb agree with a plural measure: "bookings are", never "bookings is"', async () => {
    const { thread } = await converse('How fast are bookings growing, and when in the year are they busiest?', '');
    const card = cards(thread)[0]!.text;
    expect(card).toMatch(/^1\. How fast bookings are growing\.$/m);
    expect(card).toMatch(/^2\. When in the year bookings are highest and lowest\.$/m);
    expect(card).not.toMatch(/bookings (?:is|stands|has)\b/);
  }, 240_000);

  it('says back a reply it cannot read as a change, and keeps the card as it was', async () => {
    const { end, thread } = await converse('monthly passengers trend', 'plan: ["make it sparkle", "go"]\n');
    expect(end).toBe('done');
    expect(bot(thread).some((p) => /^I couldn't read "make it sparkle" as a change to the brief\./.test(p.text))).toBe(true);
    expect(cards(thread)[0]!.edits).toBe(1); // only "go"
  }, 240_000);

  it('after a run, a follow-up starts a new run from the last brief with the change, asking nothing again', async () => {
    const { end, thread } = await converse('how has revenue trended since 2023?', 'after: ["drop the seasonality one", "rerun it quarterly", "now split that by channel"]\n');
    expect(end).toBe('done');
    const reruns = bot(thread).filter((p) => p.text.startsWith('Running it again with'));
    expect(reruns.map((p) => p.text.split('\n')[0])).toEqual([
      expect.stringMatching(/^Running it again with dropped: Which calendar months are busiest/),
      'Running it again with grain: quarterly.',
      'Running it again with breakdown added: booking channel.',
    ]);
    expect(items(reruns[0]!.text)).toBe(3);
    expect(reruns[0]!.text.split('\n').slice(1).join('\n')).not.toMatch(/calendar months/);
    expect(reruns[1]!.text).toMatch(/^1\. Quarterly revenue/m);
    // Each follow-up keeps the changes before it: quarterly stays, the breakdown is added.
    expect(reruns[2]!.text).toMatch(/^1\. Quarterly revenue/m);
    expect(reruns[2]!.text).toMatch(/^\d+\. Revenue by booking channel over time/m);
    expect(bot(thread).some((p) => p.promptTopic)).toBe(false);
    expect(cards(thread)).toHaveLength(1);
  }, 300_000);
});
