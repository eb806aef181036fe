// The verdict first (issue 17 item 7), as a whole conversation on the demo data (invented
// Skerrywake bookings, ending 18 June 2025): a yes-or-no request about the year so far gets its
// answer as the summary's first line, and the figure agrees with a plain reduction of the raw rows.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { beforeAll, describe, expect, it } from 'vitest';
import type { RecordedThread } from '../../adapters/file-thread/FileThread.js';
import { ask } from '../../cli/ask.js';
import { demoFixture } from '../helpers/demo-fixture.js';

let dir: string;
let thread: RecordedThread;
let databasePath: string;

beforeAll(async () => {
  const demo = await demoFixture();
  databasePath = demo.databasePath;
  dir = mkdtempSync(join(tmpdir(), 'tc-verdict-'));
  writeFileSync(join(dir, 'answers.yaml'), 'audience: managers\ngrain: month\nwindow: all\nplan: go\n');
  const r = await ask({
    configFile: demo.configPath,
    request: 'Is revenue growing on last year so far this year?',
    answersFile: join(dir, 'answers.yaml'),
    outDir: join(dir, 'out'),
    now: new Date('2025-06-19T09:00:00Z'),
  });
  expect(r.end).toBe('done');
  thread = r.thread.thread;
}, 300_000);

/** Revenue from 1 January to 18 June of a year, summed from the raw rows in plain JavaScript. */
async function revenueToJune18(year: number): Promise<number> {
  return revenueBetween(`${year}-01-01`, `${year}-06-18`);
}

/** Revenue between two days (inclusive), summed from the raw rows in plain JavaScript. */
async function revenueBetween(first: string, last: string): Promise<number> {
  const db = await DuckDBInstance.create(databasePath, { access_mode: 'READ_ONLY' });
  const con = await db.connect();
  const reader = await con.runAndReadAll('SELECT CAST(sail_date AS VARCHAR) AS d, CAST(fare_total AS VARCHAR) AS f FROM bookings');
  let total = 0;
  for (const [d, f] of reader.getRows() as [string, string][]) {
    if (d >= first && d <= last) total += Number(f);
  }
  con.closeSync();
  db.closeSync();
  return total;
}

describe('"Is revenue growing on last year so far this year?"', () => {
  it('answers first, with the year so far against the same dates a year earlier', async () => {
    const summary = thread.posts.find((p) => p.author === 'threadcount' && p.text.startsWith('*Summary*'))!;
    const first = summary.text.split('\n')[1]!;
    const change = (await revenueToJune18(2025)) / (await revenueToJune18(2024)) - 1;
    // The demo's 2025 runs below 2024 so far, so the answer to "growing?" is no.
    expect(change).toBeLessThan(-0.01);
    const pct = (Math.abs(change) * 100).toFixed(1);
    expect(first).toMatch(new RegExp(`^- No: revenue is ${pct.replace('.', '\\.')}% below last year so far \\(January to 18 June\\)\\. \\(see \\d+\\)$`));
    // The answer it points to is the growth answer, which states the same figure.
    const see = Number(/\(see (\d+)\)$/.exec(first)![1]);
    const answer = thread.posts.find((p) => p.text.startsWith(`*${see}. `))!;
    expect(answer.text).toContain(`2025 so far: −${pct}%`);
  });

  it('still lists the other takeaways after the verdict, and sends the digest', () => {
    const summary = thread.posts.find((p) => p.author === 'threadcount' && p.text.startsWith('*Summary*'))!;
    const lines = summary.text.split('\n').filter((l) => l.startsWith('- ') && /\(see \d+\)$/.test(l));
    expect(lines.length).toBeGreaterThan(2);
    expect(summary.files.map((f) => f.kind)).toEqual(['digest']);
    const png = readFileSync(join(dir, 'out', summary.files[0]!.path));
    expect(png.readUInt32BE(16)).toBe(1600);
  });
});

// A request that names the periods to compare is answered on those periods, not on the year so far
// against the year before (which would answer a different question).
describe('a comparison the request names leads the summary, on the periods it names', () => {
  async function summaryOf(request: string): Promise<RecordedThread> {
    const demo = await demoFixture();
    const out = mkdtempSync(join(tmpdir(), 'tc-verdict-named-'));
    writeFileSync(join(out, 'answers.yaml'), 'plan: go\n');
    const r = await ask({ configFile: demo.configPath, request, answersFile: join(out, 'answers.yaml'), outDir: join(out, 'out'), now: new Date('2025-06-19T09:00:00Z') });
    expect(r.end).toBe('done');
    return r.thread.thread;
  }
  const firstLine = (t: RecordedThread) => t.posts.find((p) => p.author === 'threadcount' && p.text.startsWith('*Summary*'))!.text.split('\n')[1]!;

  it('"How did revenue in 2025 compare with 2023?": 2025 so far against the same dates of 2023', async () => {
    const t = await summaryOf('How did revenue in 2025 compare with 2023?');
    const change = (await revenueToJune18(2025)) / (await revenueToJune18(2023)) - 1;
    const pct = (Math.abs(change) * 100).toFixed(1).replace('.', '\\.');
    expect(firstLine(t)).toMatch(new RegExp(`^- Revenue is ${pct}% ${change < 0 ? 'below' : 'above'} the same dates of 2023 \\(1 January to 18 June; €[\\d.]+K against €[\\d.]+K\\)\\. \\(see \\d+\\)$`));
    // The plan said what it compares with: 2023, not "a year earlier".
    const card = t.posts.find((p) => p.text.startsWith('*Here is what I understood.*'))!.text;
    expect(card).toMatch(/drove the change in revenue, 1 January to 18 June 2025 against 1 January to 18 June 2023\./);
    expect(card).not.toMatch(/against a year earlier/);
  }, 300_000);

  it('"Did this summer beat last summer?": the summer so far against the same dates a year earlier, not the year so far', async () => {
    const t = await summaryOf('Did this summer beat last summer for revenue?');
    const change = (await revenueBetween('2025-06-01', '2025-06-18')) / (await revenueBetween('2024-06-01', '2024-06-18')) - 1;
    const pct = (Math.abs(change) * 100).toFixed(1).replace('.', '\\.');
    expect(firstLine(t)).toMatch(new RegExp(`^- ${change < 0 ? 'No' : 'Yes'}: revenue is ${pct}% ${change < 0 ? 'below' : 'above'} the same dates a year earlier \\(1 June to 18 June; `));
    // The named comparison's own takeaway gives the same two figures: the verdict says them once.
    const lines = t.posts.find((p) => p.text.startsWith('*Summary*'))!.text.split('\n').filter((l) => l.startsWith('- '));
    const figures = firstLine(t).match(/€[\d.]+K against €[\d.]+K/)![0].split(' against ');
    expect(lines.filter((l) => figures.every((f) => l.includes(f)))).toHaveLength(1);
  }, 300_000);
});
