// A whole thread on a dataset that is not the demo (issue 16, "look at a whole thread ... on one
// other dataset"): the invented Ledgerlark support desk (test/fixtures/datasets/support-desk), one
// conversation on serve's local channel (request → brief card → "go" → answers → summary), with a
// request that names a filter (the chat channel; all but the free tier), a named segment (the Tech
// Support team; the Billing team) and a group comparison (premium support against other accounts).
// Every answer's figures are checked against a plain reduction of tickets.csv in this file; Welch's
// interval against @stdlib/stats-ttest2.
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ttest2 from '@stdlib/stats-ttest2';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { serve, type Serving } from '../../cli/serve.js';
import { waitFor } from '../helpers/wait-for.js';

const DIR = join(import.meta.dirname, '..', 'fixtures', 'datasets', 'support-desk');
const REQUEST =
  'How did Tech Support tickets on the chat channel change in 2024 compared with 2023? And for the Billing team, leaving out the free tier, do premium support accounts get faster first responses than other accounts?';

interface Ticket {
  id: string;
  day: string;
  month: string;
  team: string;
  channel: string;
  priority: string;
  tier: string;
  premium: boolean;
  firstResponse: number | null;
}

function tickets(): Ticket[] {
  const [header, ...lines] = readFileSync(join(DIR, 'tickets.csv'), 'utf8').trim().split('\n');
  const names = header!.split(',');
  const at = (n: string) => names.indexOf(n);
  return lines.map((l) => {
    const v = l.split(',');
    // The time column is a wall-clock timestamp in the dataset's own zone: its date is its first ten characters.
    const opened = v[at('opened_at')]!;
    const frt = v[at('first_response_minutes')]!;
    return {
      id: v[at('ticket_id')]!,
      day: opened.slice(0, 10),
      month: opened.slice(0, 7),
      team: v[at('team')]!,
      channel: v[at('channel')]!,
      priority: v[at('priority')]!,
      tier: v[at('customer_tier')]!,
      premium: v[at('premium_support')] === 'true',
      firstResponse: frt === '' ? null : Number(frt),
    };
  });
}

interface LocalMessage {
  fromBot: boolean;
  text: string;
  files: { name: string; kind: string; url: string }[];
}

let serving: Serving;
let rows: Ticket[];
let messages: LocalMessage[];

beforeAll(async () => {
  rows = tickets();
  const dir = mkdtempSync(join(tmpdir(), 'tc-desk-thread-'));
  serving = await serve({ configFile: join(DIR, 'ledgerlark.yaml'), statePath: join(dir, 'state.duckdb'), environment: { local: { host: '127.0.0.1', port: 0 } }, log: () => undefined });
  const base = serving.localUrl.replace(/\/$/, '');
  const post = (path: string, body: unknown) => fetch(`${base}${path}`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) });
  const created = await post('/api/threads', { author: 'maren', text: REQUEST });
  expect(created.status).toBe(201);
  const { threadId } = (await created.json()) as { threadId: string };
  const read = async () => ((await (await fetch(`${base}/api/threads/${threadId}`)).json()) as { messages: LocalMessage[] }).messages;
  await waitFor('the brief card', async () => (await read()).find((m) => m.fromBot && /^\*Here is what I understood\.\*/.test(m.text)), 150_000);
  expect((await post(`/api/threads/${threadId}/messages`, { author: 'maren', text: 'go' })).status).toBe(201);
  // The zip of the thread is the run's last post, after the summary.
  messages = await waitFor('the summary and the zip', async () => {
    const m = await read();
    return m.some((x) => x.fromBot && x.text.startsWith('*Summary*')) && m.some((x) => x.files.some((f) => f.kind === 'bundle')) ? m : undefined;
  }, 280_000);
}, 300_000);
afterAll(async () => serving?.stop());

/** The answer post whose title names the template (by its files' stem) and its number. */
function answer(template: string): LocalMessage & { n: number } {
  const m = messages.find((x) => x.fromBot && x.files.some((f) => new RegExp(`^\\d+-${template}-`).test(f.name)));
  if (!m) throw new Error(`no ${template} answer in the thread:\n${messages.map((x) => x.text.split('\n')[0]).join('\n')}`);
  return { ...m, n: Number(/^\*(\d+)\. /.exec(m.text)![1]) };
}

const MINUS = '−';
const signed = (x: number, decimals: number) => `${x < 0 ? MINUS : '+'}${Math.abs(x).toFixed(decimals)}`;
const whole = (n: number) => n.toLocaleString('en-US');
const monthName = (m: string) => new Date(`${m}-01T00:00:00Z`).toLocaleString('en-US', { month: 'long', year: 'numeric', timeZone: 'UTC' });
const count = (xs: Ticket[], from: string, to: string) => xs.filter((t) => t.day >= from && t.day < to).length;
const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / xs.length;

describe('a thread on the support desk: Tech Support chat tickets, 2024 against 2023', () => {
  const chat = () => rows.filter((t) => t.team === 'Tech Support' && t.channel === 'chat');
  /** Complete months of data (November 2024 ends on the 29th, the data's last day). */
  const months = () => {
    const out: string[] = [];
    for (let y = 2021, m = 9; y < 2024 || (y === 2024 && m <= 10); m === 12 ? ((m = 1), y++) : m++) out.push(`${y}-${String(m).padStart(2, '0')}`);
    return out;
  };
  const monthly = () => new Map(months().map((m) => [m, chat().filter((t) => t.month === m).length]));

  it('says the filter and the segment on every answer of the question', () => {
    for (const t of ['series', 'growth_drivers', 'growth_series', 'growth_summary', 'growth_share_shift']) {
      expect(answer(t).text).toMatch(/\(team: Tech Support; contact channel: chat\)\*\nFiltered to team: Tech Support; contact channel: chat\. /);
    }
  });

  it('series: the highest and lowest complete months', () => {
    const by = [...monthly()].filter(([, n]) => n > 0);
    const hi = by.reduce((a, b) => (b[1] > a[1] ? b : a));
    const lo = by.reduce((a, b) => (b[1] < a[1] ? b : a));
    const text = answer('series').text;
    expect(text).toContain(`peaked in ${monthName(hi[0])} at ${whole(hi[1])}`);
    expect(text).toContain(`lowest month was ${monthName(lo[0])} at ${whole(lo[1])}`);
  });

  it('growth drivers: the year so far against the same dates a year earlier, by priority (team and channel are pinned, so not the breakdown)', () => {
    const now = count(chat(), '2024-01-01', '2024-11-30');
    const before = count(chat(), '2023-01-01', '2023-11-30');
    const text = answer('growth_drivers').text;
    expect(text).toContain(`Tickets rose ${((now / before - 1) * 100).toFixed(1)}%: ${whole(before)} to ${whole(now)} (+${now - before})`);
    expect(text).toContain('Largest changes by priority: ');
    const listed = [...text.matchAll(/(?:: |; )(low|normal|high|urgent) ([+−]\d+), ([+−][\d.]+)%/g)];
    expect(listed.length).toBeGreaterThanOrEqual(2);
    const change = (p: string) => {
      const a = count(chat().filter((t) => t.priority === p), '2024-01-01', '2024-11-30');
      const b = count(chat().filter((t) => t.priority === p), '2023-01-01', '2023-11-30');
      return { diff: a - b, pct: (a / b - 1) * 100 };
    };
    for (const [, p, d, pct] of listed) {
      expect(d).toBe(signed(change(p!).diff, 0));
      expect(pct).toBe(signed(change(p!).pct, 1));
    }
    // The title names the priority with the largest change.
    const top = ['low', 'normal', 'high', 'urgent'].map((p) => ({ p, ...change(p) })).sort((a, b) => Math.abs(b.diff) - Math.abs(a.diff))[0]!;
    expect(text.split('\n')[0]).toContain(`${top.p[0]!.toUpperCase()}${top.p.slice(1)} drove the biggest change in tickets: ${signed(top.diff, 0)}`);
  });

  it('growth series: the year to date, the last full year and the latest complete month', () => {
    const text = answer('growth_series').text;
    const now = count(chat(), '2024-01-01', '2024-11-30');
    const before = count(chat(), '2023-01-01', '2023-11-30');
    expect(text).toContain(`tickets ran ${((now / before - 1) * 100).toFixed(1)}% above the same dates of 2023 (${whole(now)} against ${whole(before)})`);
    // Chat opened part-way through 2022 (its first ticket in September), so 2022 is no base year:
    // 2023 gets no growth on it (a +1,174% against four months would not be like for like).
    const firstChat = chat().reduce((m, t) => (t.month < m ? t.month : m), '9999-99');
    expect(firstChat > '2022-01').toBe(true);
    expect(text).not.toMatch(/on the year before/);
    expect(text).toContain(`No rows match the filter before ${monthName(firstChat)}`);
    const m = monthly();
    const oct24 = m.get('2024-10')!;
    const last12 = count(chat(), '2023-11-01', '2024-11-01');
    const prior12 = count(chat(), '2022-11-01', '2023-11-01');
    expect(text).toContain(
      `Latest complete month, October 2024: ${signed((oct24 / m.get('2023-10')! - 1) * 100, 1)}% on a year earlier; ${signed((oct24 / m.get('2024-09')! - 1) * 100, 1)}% on the month before; the last 12 months together ${signed((last12 / prior12 - 1) * 100, 1)}% on the 12 before`,
    );
  });

  it('growth summary: the spread of growth on the same month a year earlier', () => {
    const m = monthly();
    const rates = months()
      .filter((k) => m.get(k)! > 0)
      .map((k) => {
        const prev = m.get(`${Number(k.slice(0, 4)) - 1}${k.slice(4)}`);
        return prev ? { k, r: (m.get(k)! / prev - 1) * 100 } : null;
      })
      .filter((x): x is { k: string; r: number } => x !== null);
    const lo = rates.reduce((a, b) => (b.r < a.r ? b : a));
    const hi = rates.reduce((a, b) => (b.r > a.r ? b : a));
    const short = (k: string) => new Date(`${k}-01T00:00:00Z`).toLocaleString('en-US', { month: 'short', year: 'numeric', timeZone: 'UTC' });
    const text = answer('growth_summary').text;
    expect(text).toContain(`ranged from ${signed(lo.r, 1)}% (${short(lo.k)}) to ${signed(hi.r, 1)}% (${short(hi.k)})`);
    const sorted = rates.map((x) => x.r).sort((a, b) => a - b);
    const median = sorted.length % 2 ? sorted[(sorted.length - 1) / 2]! : (sorted[sorted.length / 2 - 1]! + sorted[sorted.length / 2]!) / 2;
    expect(text).toContain(`Across ${rates.length} months, growth on the same month a year earlier had a middle value of ${signed(median, 1)}%`);
  });

  it('share shift: each priority named with its share now and its move in points', () => {
    const text = answer('growth_share_shift').text;
    const share = (p: string, from: string, to: string) => (count(chat().filter((t) => t.priority === p), from, to) / count(chat(), from, to)) * 100;
    const listed = [...text.matchAll(/(?:: |; )(low|normal|high|urgent) ([\d.]+)% \(([+−][\d.]+) pts\)/g)];
    expect(listed.length).toBeGreaterThanOrEqual(2);
    for (const [, p, now, move] of listed) {
      const a = share(p!, '2024-01-01', '2024-11-30');
      const b = share(p!, '2023-01-01', '2023-11-30');
      expect(now).toBe(a.toFixed(1));
      expect(move).toBe(signed(a - b, 1));
    }
  });
});

describe('a thread on the support desk: premium support on the Billing team, all but the free tier', () => {
  const LAUNCH = '2023-03-01';
  const scope = () => rows.filter((t) => t.team === 'Billing' && t.tier !== 'free');
  const since = () => scope().filter((t) => t.day >= LAUNCH && t.day < '2024-11-30' && t.firstResponse !== null);
  const side = (premium: boolean, xs = since()) => xs.filter((t) => t.premium === premium).map((t) => t.firstResponse!);

  it('says the filter (leaving a value out) and the segment on every answer of the question', () => {
    for (const t of ['performance_compare', 'performance_before_after', 'performance_by_segment']) {
      expect(answer(t).text).toMatch(/\(team: Billing; customer tier: all but free\)\*\nFiltered to team: Billing; customer tier: all but free\. /);
    }
  });

  it('group comparison: both means, their counts and the interval of the gap (Welch, as @stdlib/stats-ttest2)', () => {
    const m = side(true);
    const o = side(false);
    const text = answer('performance_compare').text;
    const [mm, mo] = [mean(m), mean(o)];
    expect(text).toContain(`is ${whole(Math.round(mm))} against ${whole(Math.round(mo))} for premium support accounts and other accounts: ${whole(Math.round(mo - mm))} lower, over ${whole(m.length)} and ${whole(o.length)} tickets`);
    expect(text.split('\n')[0]).toContain(`about ${Math.round((1 - mm / mo) * 100)}% lower for premium support accounts than for other accounts`);
    const ref = ttest2(m, o);
    const [lo, hi] = [Math.abs(ref.ci[0]!), Math.abs(ref.ci[1]!)].sort((a, b) => a - b);
    expect(text).toContain(`the true gap is probably ${whole(Math.round(lo!))} to ${whole(Math.round(hi!))}`);
    // First response time has lower declared better, so "better" is the metric's own sense here.
    expect(text).toContain('On this measure that is better for premium support accounts.');
  });

  it('before and after: there were no premium support accounts before the launch, and it says so first', () => {
    expect(scope().some((t) => t.premium && t.day < LAUNCH)).toBe(false);
    expect(answer('performance_before_after').text).toContain('Premium support had no premium support accounts before March 1, 2023, so the same group cannot be compared before and after');
  });

  it('within each contact channel: the relative gaps shown match the rows, and the withheld ones have a small side', () => {
    const text = answer('performance_by_segment').text;
    const listed = [...text.matchAll(/(?:: |; )(email|phone|chat|web form) ([+−][\d.]+)%/g)];
    expect(listed.length).toBeGreaterThanOrEqual(2);
    for (const [, channel, rel] of listed) {
      const within = since().filter((t) => t.channel === channel);
      expect(rel).toBe(signed((mean(side(true, within)) / mean(side(false, within)) - 1) * 100, 1));
    }
    // The breakdown is not the team (pinned to Billing) but the next one in the catalog.
    expect(text.split('\n')[0]).toMatch(/contact channels/);
    const withheld = /_Note: ([^:]+): a group is too few to show/.exec(text)?.[1]?.split(', ') ?? [];
    expect(withheld.length).toBeGreaterThan(0);
    const rowsOf = (channel: string, premium: boolean) => scope().filter((t) => t.day >= LAUNCH && t.day < '2024-11-30' && (channel === 'Not recorded' ? t.channel === '' : t.channel === channel) && t.premium === premium).length;
    // At least one withheld channel has a side below the minimum group size (10); any other is withheld beside it.
    expect(withheld.some((c) => Math.min(rowsOf(c, true), rowsOf(c, false)) < 10)).toBe(true);
  });
});

describe('the thread as a whole', () => {
  it('says each note about the data once, in the summary, with figures from the file', () => {
    const summary = messages.find((m) => m.fromBot && m.text.startsWith('*Summary*'))!;
    const ids = new Map<string, number>();
    for (const t of rows) ids.set(t.id, (ids.get(t.id) ?? 0) + 1);
    const repeated = [...ids.values()].filter((n) => n > 1).reduce((s, n) => s + n - 1, 0);
    expect(summary.text).toContain(`- ${repeated} rows repeat a ticket_id that should be unique`);
    const last = rows.reduce((a, t) => (t.day > a ? t.day : a), '');
    expect(summary.text).toContain(`The latest data is from ${new Date(`${last}T00:00:00Z`).toLocaleString('en-US', { month: 'long', day: 'numeric', year: 'numeric', timeZone: 'UTC' })}`);
    for (const m of messages.filter((x) => x.fromBot && /^\*\d+\. /.test(x.text))) {
      expect(m.text).not.toMatch(/repeat a ticket_id|The latest data is from/);
    }
  });

  it('leads with the comparison asked, and lists takeaways that point at answers in the thread, each with its scope', () => {
    const summary = messages.find((m) => m.fromBot && m.text.startsWith('*Summary*'))!;
    const lines = summary.text.split('\n').filter((l) => /\(see \d+\)$/.test(l));
    expect(lines.length).toBeGreaterThanOrEqual(3);
    // The comparison the request named leads (its own answer, growth_periods, the two periods'
    // figures), with its figure from the rows and its scope: the headline (also the digest's
    // title) is about Tech Support's chat tickets, not all tickets.
    const chat = rows.filter((t) => t.team === 'Tech Support' && t.channel === 'chat');
    const ytd = (count(chat, '2024-01-01', '2024-11-30') / count(chat, '2023-01-01', '2023-11-30') - 1) * 100;
    expect(lines[0]).toBe(`- Tickets are ${ytd.toFixed(1)}% above last year so far (January to November 29) (team: Tech Support; contact channel: chat). (see ${answer('growth_periods').n})`);
    for (const l of lines.slice(1)) {
      const n = Number(/\(see (\d+)\)$/.exec(l)![1]);
      const target = messages.find((m) => m.fromBot && m.text.startsWith(`*${n}. `))!;
      expect(target).toBeDefined();
      const scope = /^- Filtered to ([^.]+)\./.exec(l)?.[1];
      expect(scope).toBeDefined();
      expect(target.text).toContain(`Filtered to ${scope}.`);
    }
  });
});
