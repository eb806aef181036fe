// "Per day" asks for an average daily figure, not daily points: "precipitation per day in 2015,
// monthly" is a monthly series of each month's total over its days, and its title, caption and
// table say "per day". On vega-datasets' seattle-weather.csv (one row a day, 2012-2015). Expected
// values from the test's own SQL (DuckDB): each month's sum over the days the month spans.
import { readFileSync, readdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { beforeAll, describe, expect, it } from 'vitest';
import { vegaDataFile, writeSeattleConfig } from '../helpers/open-data.js';

const dir = mkdtempSync(join(tmpdir(), 'tc-perday-'));
const CONFIG = writeSeattleConfig(dir);
writeFileSync(join(dir, 'go.yaml'), 'plan: go\n');
const NOW = new Date('2026-12-05T09:00:00Z');

async function sql(text: string): Promise<Record<string, unknown>[]> {
  const inst = await DuckDBInstance.create(':memory:');
  const con = await inst.connect();
  const r = await con.runAndReadAll(text);
  const rows = r.getRowObjectsJson();
  con.closeSync();
  return rows;
}

async function converse(request: string, out: string) {
  const { ask } = await import('../../cli/ask.js');
  const r = await ask({ configFile: CONFIG, request, answersFile: join(dir, 'go.yaml'), outDir: join(dir, out), now: NOW });
  return r.thread.thread.posts.filter((p) => p.author === 'threadcount').map((p) => p.text);
}

describe('"per day" at a monthly grain', () => {
  let truth: { month: string; perDay: number }[];
  beforeAll(async () => {
    const rows = await sql(`SELECT strftime(date_trunc('month', date), '%Y-%m-%d') AS m, sum(precipitation) / (date_diff('day', date_trunc('month', date), date_trunc('month', date) + INTERVAL 1 MONTH)) AS pd
      FROM read_csv_auto('${vegaDataFile('seattle-weather.csv')}') WHERE year(date) = 2015 GROUP BY date_trunc('month', date) ORDER BY 1`);
    truth = rows.map((r) => ({ month: String(r['m']), perDay: Number(r['pd']) }));
  });

  it('the series is each month\'s total over its days; the headline names the month with the most per day', async () => {
    const texts = await converse('precipitation per day in 2015, monthly', 'series');
    const card = texts.find((t) => t.startsWith('*Here is what I understood.*')) ?? '';
    expect(card).toMatch(/\*Grain:\* Monthly/);
    const tables = join(dir, 'series', 'tables');
    const file = readdirSync(tables).find((f) => /^01-series-precipitation\.csv$/.test(f))!;
    const [header, ...lines] = readFileSync(join(tables, file), 'utf8').trim().split('\n');
    expect(header).toBe('period,precipitation_per_day,partial');
    expect(lines.length).toBe(12);
    for (const [k, line] of lines.entries()) {
      const [period, value] = line.split(',');
      expect(period).toBe(truth[k]!.month);
      expect(Math.abs(Number(value) - truth[k]!.perDay)).toBeLessThan(1e-9);
    }
    const top = [...truth].sort((a, b) => b.perDay - a.perDay)[0]!;
    const monthName = new Date(`${top.month}T00:00:00Z`).toLocaleString('en-GB', { month: 'long', timeZone: 'UTC' });
    const first = texts.find((t) => t.startsWith('*1. ')) ?? '';
    expect(first).toMatch(new RegExp(`^\\*1\\. Precipitation per day peaked in ${monthName} 2015 at ${top.perDay.toFixed(2)}`));
    expect(first).toMatch(/Each month's total is divided by its days/);
  }, 300_000);
});
