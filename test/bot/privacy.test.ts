// Personal data: the demo's customer_email column is never grouped by, filtered on or shown. Whole
// demo conversations are checked end to end: no post text, attached CSV or SQL file, chart spec or
// audit entry holds an email address or the column's name; a request that asks for it is told
// so, naming the rule, and still gets the rest of its answers.
import { DuckDBInstance } from '@duckdb/node-api';
import pLimit from 'p-limit';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { definitionOf } from '../../analysis/sub-questions/registry.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { Bot, type AnswerPresenter } from '../../bot/Bot.js';
import type { OutgoingPost, ThreadPort } from '../../bot/port.js';
import { presentAnswer, presentContext, presentSummary } from '../../bot/present-answer.js';
import type { ScriptedAnswers } from '../../bot/scripted-answers.js';
import { playScriptedConversation } from '../../bot/scripted-conversation.js';
import { MemoryStateStore } from '../../bot/stores/MemoryStateStore.js';
import { loadConfig } from '../../config/load.js';
import { demoFixture } from '../helpers/demo-fixture.js';

// An email address as it would appear in text (local part, @, a dotted domain).
const EMAIL = /[A-Za-z0-9._%+-]+@[A-Za-z0-9-]+(\.[A-Za-z0-9-]+)*\.[A-Za-z]{2,}/;
const COLUMN = 'customer_email';

interface Captured {
  key: string;
  text: string;
  promptTopic?: string;
  /** Text files (CSV, SQL) by name; PNGs are checked through their chart specs instead. */
  files: Record<string, string>;
}

class CapturingPort implements ThreadPort {
  readonly posts: Captured[] = [];
  async post(_threadId: string, post: OutgoingPost): Promise<string> {
    const files: Record<string, string> = {};
    for (const f of post.files ?? []) if (f.kind === 'table' || f.kind === 'sql') files[f.name] = String(f.content);
    this.posts.push({ key: post.key, text: post.text, files, ...(post.prompt ? { promptTopic: post.prompt.topic } : {}) });
    return String(this.posts.length - 1);
  }
  async update(_threadId: string, ref: string, text: string): Promise<void> {
    this.posts[Number(ref)]!.text = text;
  }
}

let ws: Workspace;
let sampleEmails: string[];
const now = new Date('2026-12-01T09:00:00Z');

beforeAll(async () => {
  const demo = await demoFixture();
  ws = await openWorkspace(loadConfig(demo.configPath));
  const db = await DuckDBInstance.create(demo.databasePath, { access_mode: 'READ_ONLY' });
  const con = await db.connect();
  sampleEmails = (await con.runAndReadAll(`SELECT DISTINCT ${COLUMN} FROM bookings WHERE ${COLUMN} IS NOT NULL LIMIT 50`)).getRows().map((r) => String(r[0]));
  con.closeSync();
  db.closeSync();
});
afterAll(async () => {
  await ws?.source.close();
});

async function converse(request: string, answers: ScriptedAnswers) {
  const port = new CapturingPort();
  const store = new MemoryStateStore();
  const specs: string[] = [];
  // The chart spec of every answer, as the presenter built it (the PNG is drawn from it).
  const capturing: AnswerPresenter = async (answer, ctx) => {
    const p = definitionOf(answer.subQuestion).present(answer, presentContext(ctx.workspace, ctx.audience));
    if (p.chart) specs.push(JSON.stringify(p.chart));
    return presentAnswer(answer, ctx);
  };
  const bot = new Bot({ workspace: ws, port, store, now: () => now, presentAnswer: capturing, presentSummary, jobs: pLimit(2) });
  const end = await playScriptedConversation({ bot, store, threadId: 'local:privacy', requester: 'maren', channel: 'local', request, answers });
  const audit = await store.listAudit();
  const everything = [
    ...port.posts.flatMap((p) => [p.text, ...Object.values(p.files)]),
    ...specs,
    ...audit.map((e) => JSON.stringify(e.detail)),
  ];
  return { end, port, specs, audit, everything };
}

function expectNoPersonalData(texts: string[]): void {
  for (const t of texts) {
    expect(t).not.toMatch(EMAIL);
    expect(t).not.toContain(COLUMN);
  }
}

describe('personal data never leaves the database', () => {
  it('the demo data does hold email addresses, so the checks below can fail', () => {
    expect(sampleEmails.length).toBe(50);
    for (const e of sampleEmails) expect(e).toMatch(EMAIL);
  });

  it('the demo request: every post, CSV, SQL file, chart spec and audit entry is free of emails and of the column name', async () => {
    const { end, port, specs, everything } = await converse(
      'Ops review is on the 15th. Could the data team tell us whether this summer beat last summer, which routes and booking channels drove the difference, whether SkerryPass holders really travel more often than other customers since it launched, and where average fare per passenger and the share of revenue we refunded stand for the last full month?',
      { metrics: 'revenue', audience: 'managers' },
    );
    expect(end).toBe('done');
    // The checks covered real output: answers with CSVs and SQL, and their charts.
    expect(port.posts.filter((p) => Object.keys(p.files).some((n) => n.endsWith('.sql'))).length).toBeGreaterThanOrEqual(12);
    expect(specs.length).toBeGreaterThanOrEqual(10);
    expectNoPersonalData(everything);
  });

  it('"revenue by customer email" is refused, naming the rule, and the rest is answered without it', async () => {
    const { end, port, audit, everything } = await converse('Show me revenue by customer email, month by month, for the ops review. No deadline.', {});
    expect(end).toBe('done');
    // Said on the brief card, the first post, before anything runs.
    const card = port.posts[0]!;
    expect(card.text).toMatch(/^\*Here is what I understood\.\*/);
    expect(card.text).toContain(
      "I can't break anything down by, filter on or show Customer email: the catalog marks it as personal data, and personal data is never grouped by, filtered on or shown in any answer, table or SQL. The rest of the request is answered without it.",
    );
    expect(audit.find((e) => e.kind === 'denied')).toMatchObject({ detail: { reason: 'personal_data', dimensions: ['Customer email'] } });
    // "customer" in "customer email" was not read as the customers metric: revenue only.
    expect(card.text).toMatch(/^- \*Measure:\* Revenue _/m);
    expect(port.posts.some((p) => Object.keys(p.files).length > 0)).toBe(true);
    // The refusal and the audit name the catalog label, never the column.
    expectNoPersonalData(everything);
  });

  it('a correction on the card that names customer email is refused with the rule, and the card stays as it was', async () => {
    const { end, port, audit, everything } = await converse('Did revenue grow this summer compared with last summer? For my team, no deadline.', {
      dimensions: 'customer email',
    });
    expect(end).toBe('done');
    const refusals = port.posts.filter((p) => /^I can't break anything down by, filter on or show Customer email: the catalog marks it as personal data/.test(p.text));
    expect(refusals).toHaveLength(1);
    expect(port.posts.some((p) => p.text.startsWith('Updated the brief above'))).toBe(false);
    // The refusal is in the audit log with the words that asked.
    expect(audit.filter((e) => e.kind === 'denied').map((e) => e.detail)).toEqual([{ reason: 'personal_data', dimensions: ['Customer email'], text: 'add customer email' }]);
    expectNoPersonalData(everything);
  });

  it('a plan edit that names customer email is refused, and the refusal is audited', async () => {
    const { end, port, audit, everything } = await converse('How has revenue moved over time? For my team, no deadline.', {
      plan: ['add a breakdown by customer email', 'go'],
    });
    expect(end).toBe('done');
    const refusal = port.posts.find((p) => /personal data/.test(p.text))!;
    expect(refusal.text).toMatch(/^I can't break anything down by, filter on or show Customer email/);
    expect(audit.filter((e) => e.kind === 'denied').map((e) => e.detail)).toEqual([{ reason: 'personal_data', dimensions: ['Customer email'], text: 'add a breakdown by customer email' }]);
    // Logged before the refusal was posted.
    const deniedAt = audit.findIndex((e) => e.kind === 'denied');
    expect(deniedAt).toBeLessThan(audit.findIndex((e) => e.kind === 'post' && e.detail.text === refusal.text));
    expectNoPersonalData(everything);
  });
  it.each([
    ['How many bookings did someone@example.com make, month by month? For my team, no deadline.', 'someone@example.com', 'an email address'],
    // The short form the attack probe used: no dot in the domain.
    ['bookings for someone@example by month, for my team, no deadline', 'someone@example', 'an email address'],
    ['Revenue from +353 87 123 4567 by month? For my team, no deadline.', '123 4567', 'a phone number'],
    ['How often does customer 48213 travel, month by month? For my team, no deadline.', '48213', 'an id of a person'],
  ])('a filter on a personal value is refused with a reply, audited, and the answer is for everyone: %s', async (request, value, kind) => {
    const { end, port, audit } = await converse(request, { metrics: 'bookings' });
    expect(end).toBe('done');
    const refusal = port.posts.find((p) => p.text.startsWith("I can't filter on"))!;
    expect(refusal.text).toBe(`I can't filter on ${kind}: that would pick out one person, and personal data is never filtered on or shown in any answer. I'll answer for everyone instead.`);
    expect(audit.filter((e) => e.kind === 'denied').map((e) => e.detail)).toEqual([{ reason: 'personal_value', kinds: [kind], text: request }]);
    // Answered, and never for that person: the value is in no post, table, SQL file or bound parameter.
    expect(port.posts.some((p) => Object.keys(p.files).some((n) => n.endsWith('.sql')))).toBe(true);
    for (const p of port.posts) {
      expect(p.text).not.toContain(value);
      for (const f of Object.values(p.files)) expect(f).not.toContain(value);
    }
    for (const e of audit.filter((x) => x.kind === 'sql')) expect(JSON.stringify(e.detail)).not.toContain(value);
  });
});
