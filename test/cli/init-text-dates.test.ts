// `threadcount init` on dates written as text in other common ways. The rows are vega-datasets'
// flights-20k.json (v3.2.1: 20,000 US flights, January to March 2001, dated "2001/01/01 00:47") with
// the same instants rewritten day first, month first, with dots or dashes, or ISO with a T; so the
// range `check` reads back must be the original file's, worked out here in plain JavaScript.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { vegaDataFile } from '../helpers/open-data.js';
import { describeWithPostgres, dropSchema, uniqueName, withClient } from '../helpers/postgres.js';
import { runCli as run } from '../helpers/run-cli.js';

interface Flight { date: string; delay: number; distance: number; origin: string; destination: string }
const flights = JSON.parse(readFileSync(vegaDataFile('flights-20k.json'), 'utf8')) as Flight[];

/** The parts of the file's "2001/01/01 00:47". */
function partsOf(date: string): { y: string; m: string; d: string; time: string } {
  const [, y, m, d, time] = /^(\d{4})\/(\d\d)\/(\d\d) (\d\d:\d\d)$/.exec(date)!;
  return { y: y!, m: m!, d: d!, time: time! };
}

/** First and last day of the rows, as check prints them. */
function rangeOf(rows: Flight[]): string {
  const days = rows.map((f) => f.date.slice(0, 10).replace(/\//g, '-')).sort();
  return `${days[0]} to ${days[days.length - 1]}`;
}

async function draft(rows: Flight[], rewrite: (p: ReturnType<typeof partsOf>) => string): Promise<{ out: string; text: string; file: string }> {
  const dir = mkdtempSync(join(tmpdir(), 'tc-init-dates-'));
  writeFileSync(join(dir, 'flights.json'), JSON.stringify(rows.map((f) => ({ ...f, date: rewrite(partsOf(f.date)) }))));
  const file = join(dir, 'flights.yaml');
  const r = await run(['init', '--source', join(dir, 'flights.json'), '--out', file]);
  expect(r.code, r.err).toBe(0);
  return { out: r.out, text: readFileSync(file, 'utf8'), file };
}

const timeColumnOf = (text: string) => (parse(text) as { datasets: Record<string, unknown>[] }).datasets[0]!.time_column;

describe('init on text dates written day first, month first, with dots and dashes', () => {
  it('reads day-first dates with dots and a time as %d.%m.%Y %H:%M, settled by days above 12 anywhere in the file, and check reads the same range', async () => {
    // Sorted by time, the file's first thousand distinct minutes all fall on 1-12 January: the
    // sample must spread over the file to meet a day above 12.
    const { out, text, file } = await draft(flights, (p) => `${p.d}.${p.m}.${p.y} ${p.time}`);
    expect(out).toMatch(/time column: date, text dates read as %d\.%m\.%Y %H:%M \(all \d+ distinct values sampled\)/);
    expect(out).not.toMatch(/cannot tell day-first/);
    expect(timeColumnOf(text)).toEqual({ expr: "strptime(date, '%d.%m.%Y %H:%M')" });
    const check = await run(['check', '--config', file]);
    expect(check.code, check.out).toBe(0);
    expect(check.out).toContain(`20,000 rows, ${rangeOf(flights)}, stamped daily`);
  });

  it('reads month-first dates with slashes and no time as %m/%d/%Y', async () => {
    const { out, text, file } = await draft(flights, (p) => `${p.m}/${p.d}/${p.y}`);
    // One value per day of the file (90 days, January to March 2001).
    const days = new Set(flights.map((f) => f.date.slice(0, 10))).size;
    expect(out).toContain(`text dates read as %m/%d/%Y (all ${days} distinct values sampled)`);
    expect(timeColumnOf(text)).toEqual({ expr: "strptime(date, '%m/%d/%Y')" });
    const check = await run(['check', '--config', file]);
    expect(check.code, check.out).toBe(0);
    expect(check.out).toContain(`20,000 rows, ${rangeOf(flights)}, stamped daily`);
  });

  it('says it assumed day first when no day is above 12, in the notes and above time_column, naming the month-first format', async () => {
    const early = flights.filter((f) => Number(partsOf(f.date).d) <= 12);
    const { out, text, file } = await draft(early, (p) => `${p.d}/${p.m}/${p.y} ${p.time}`);
    const said = 'the data cannot tell day-first from month-first: assumed %d/%m/%Y %H:%M; if the month comes first write %m/%d/%Y %H:%M';
    expect(out).toContain(said);
    expect(text).toContain(said);
    expect(timeColumnOf(text)).toEqual({ expr: "strptime(date, '%d/%m/%Y %H:%M')" });
    const check = await run(['check', '--config', file]);
    expect(check.code, check.out).toBe(0);
    expect(check.out).toContain(`${early.length.toLocaleString('en')} rows, ${rangeOf(early)}`);
  });

  it('takes a format that reads nearly every value, and says how many it did not', async () => {
    // One flight in a hundred has its date replaced by "unknown": still a date column.
    const { out, text } = await draft(flights.slice(0, 2000), (p) => `${p.y}/${p.m}/${p.d} ${p.time}`);
    expect(timeColumnOf(text)).toEqual({ expr: "strptime(date, '%Y/%m/%d %H:%M')" });
    expect(out).toMatch(/\(all \d+ distinct values sampled\)/);
    const dir = mkdtempSync(join(tmpdir(), 'tc-init-dates-'));
    writeFileSync(join(dir, 'flights.json'), JSON.stringify(flights.slice(0, 2000).map((f, i) => ({ ...f, date: i % 100 === 0 ? 'unknown' : f.date }))));
    const r = await run(['init', '--source', join(dir, 'flights.json'), '--out', join(dir, 'flights.yaml')]);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(/text dates read as %Y\/%m\/%d %H:%M \((\d+) of (\d+) distinct values sampled; the others read as no date\)/);
    const [, read, sampled] = /\((\d+) of (\d+) distinct values sampled/.exec(r.out)!;
    expect(Number(sampled) - Number(read)).toBe(1);
  });
});

describeWithPostgres('init on text dates in a PostgreSQL table (ISO with a T, as text)', (adminUrl) => {
  const schema = uniqueName('tc_init_dates');
  afterEach(() => {
    delete process.env.TC_INIT_DATES_URL;
  });

  it('drafts strptime(date, \'%Y-%m-%dT%H:%M:%S\') from the pattern the PostgreSQL side checks, and check reads the same range', async () => {
    const rows = flights.slice(0, 3000);
    await withClient(adminUrl, async (c) => {
      await c.query(`CREATE SCHEMA ${schema}`);
      await c.query(`CREATE TABLE ${schema}.flights (date text, delay int, distance int, origin text, destination text)`);
      const iso = rows.map((f) => {
        const p = partsOf(f.date);
        return `${p.y}-${p.m}-${p.d}T${p.time}:00`;
      });
      await c.query(`INSERT INTO ${schema}.flights SELECT * FROM unnest($1::text[], $2::int[], $3::int[], $4::text[], $5::text[])`, [
        iso,
        rows.map((f) => f.delay),
        rows.map((f) => f.distance),
        rows.map((f) => f.origin),
        rows.map((f) => f.destination),
      ]);
    });
    try {
      const file = join(mkdtempSync(join(tmpdir(), 'tc-init-dates-pg-')), 'flights.yaml');
      const r = await run(['init', '--source', adminUrl, '--table', `${schema}.flights`, '--url-env', 'TC_INIT_DATES_URL', '--out', file]);
      expect(r.code, r.err).toBe(0);
      const text = readFileSync(file, 'utf8');
      expect(timeColumnOf(text)).toEqual({ expr: "strptime(date, '%Y-%m-%dT%H:%M:%S')" });
      process.env.TC_INIT_DATES_URL = adminUrl;
      const check = await run(['check', '--config', file]);
      expect(check.code, check.out).toBe(0);
      expect(check.out).toContain(`3,000 rows, ${rangeOf(rows)}`);
      expect(check.out).toMatch(/delay: ratio, average of delay/);
    } finally {
      await dropSchema(adminUrl, schema);
    }
  });
});
