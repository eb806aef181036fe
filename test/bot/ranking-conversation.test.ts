// A ranking asked is answered first, as a whole conversation on two open datasets (vega-datasets'
// flights-20k.json, US domestic flights January to March 2001, and birdstrikes.csv, FAA wildlife
// strike reports 1990-2002, with the configs a newcomer wrote): the summary's first line is the
// answer to "which … the most" or "top N … and their share", and its figures agree with our own SQL
// on the raw file (DuckDB, written here apart from the templates' SQL).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { describe, expect, it } from 'vitest';
import { ask } from '../../cli/ask.js';
import { BIRDSTRIKES_CONFIG, FLIGHTS_CONFIG, vega } from '../reading/open-data-configs.js';

async function summaryOf(configFile: string, request: string): Promise<string[]> {
  const dir = mkdtempSync(join(tmpdir(), 'tc-ranking-'));
  writeFileSync(join(dir, 'answers.yaml'), 'plan: go\n');
  const r = await ask({ configFile, request, answersFile: join(dir, 'answers.yaml'), outDir: join(dir, 'out'), now: new Date('2026-12-05T09:00:00Z') });
  expect(r.end).toBe('done');
  const summary = r.thread.thread.posts.find((p) => p.author === 'threadcount' && p.text.startsWith('*Summary*'))!;
  return summary.text.split('\n').slice(1).filter((l) => l.startsWith('- '));
}

async function query<T>(sql: string): Promise<T[]> {
  const db = await DuckDBInstance.create(':memory:');
  const con = await db.connect();
  const rows = (await con.runAndReadAll(sql)).getRowObjectsJson() as T[];
  con.closeSync();
  db.closeSync();
  return rows;
}

const pct = (x: number, digits: number) => `${(x * 100).toFixed(digits)}%`;

describe('the answer to the ranking asked leads the summary', () => {
  it('"top 5 busiest origin airports … what share of all flights do they handle?" leads with the top five\'s share', async () => {
    const lines = await summaryOf(FLIGHTS_CONFIG, 'top 5 busiest origin airports by number of flights, and what share of all flights do they handle?');
    const rows = await query<{ origin: string; n: string; total: string }>(
      `SELECT origin, count(*) AS n, sum(count(*)) OVER () AS total FROM read_json_auto('${join(vega, 'flights-20k.json')}') GROUP BY origin ORDER BY n DESC, origin LIMIT 5`,
    );
    const total = Number(rows[0]!.total);
    const top5 = rows.reduce((s, r) => s + Number(r.n), 0) / total;
    // Our SQL: DFW, ORD, ATL, LAX, PHX handle about 22.3% of the 20,000 flights.
    expect(lines[0]).toContain(`The top 5 origin airports carry ${pct(top5, 0)} of flights`);
    expect(lines[0]).toContain(`${rows[0]!.origin} the most (${pct(Number(rows[0]!.n) / total, 1)})`);
    // Not a rate of late flights: "share" here is the top five's share of all flights.
    expect(lines.join('\n')).not.toMatch(/flights late/i);
  }, 300_000);

  it('"…which phase costs us the most" leads with the phase of flight with the most total cost', async () => {
    const lines = await summaryOf(BIRDSTRIKES_CONFIG, 'Could you break down the total cost of strikes by phase of flight…which phase costs us the most');
    const rows = await query<{ phase: string; cost: string; total: string }>(
      `SELECT "Phase of flight" AS phase, sum("Cost Total $") AS cost, sum(sum("Cost Total $")) OVER () AS total FROM read_csv_auto('${join(vega, 'birdstrikes.csv')}') GROUP BY 1 ORDER BY cost DESC LIMIT 1`,
    );
    const share = Number(rows[0]!.cost) / Number(rows[0]!.total);
    // Our SQL: Climb, about 41.5% of total cost; the peak month of the series is not the first line.
    expect(lines[0]).toMatch(new RegExp(`^- ${rows[0]!.phase} has the most total cost: US\\$[\\d.]+M \\(${pct(share, 1).replace('.', '\\.')}\\)`));
    expect(lines[0]).not.toMatch(/peaked/);
  }, 300_000);
});
