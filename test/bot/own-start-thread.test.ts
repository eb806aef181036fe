// Issue 16, named segments measured from their own start, and a change since a named month, as
// whole threads on vega-datasets' flights-3m.parquet (US flights, January to June 2001, plus six
// rows stamped 1 July). Every figure checked comes from the test's own DuckDB SQL over the file.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { beforeAll, describe, expect, it } from 'vitest';
import { askPostTexts, runCli } from '../helpers/run-cli.js';
import { vegaDataFile } from '../helpers/open-data.js';

const FILE = vegaDataFile('flights-3m.parquet');
let dir = '';
let config = '';

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'tc-own-start-'));
  config = join(dir, 'flights.yaml');
  writeFileSync(config, `version: 1
datasets:
  - name: flights
    label: Flights
    source: { kind: parquet, paths: ["${FILE}"] }
    time_column: date
    timezone: UTC
    metrics:
      - { name: flights, label: Flights, count: rows, unit: count, kind: flow, also_called: [flights, departures] }
      - { name: delay, label: Average delay, average: delay, unit: number, unit_label: min, higher_is_better: false, kind: ratio, also_called: [delay, lateness] }
    dimensions:
      - { name: origin, label: Origin airport, column: origin, also_called: [origin, airport, departure airport] }
      - { name: destination, label: Destination airport, column: destination, also_called: [destination, arrival airport] }
`);
});

async function one(query: string): Promise<unknown[]> {
  const db = await DuckDBInstance.create(':memory:');
  const c = await db.connect();
  const rows = (await c.runAndReadAll(query)).getRows();
  c.closeSync();
  return rows[0]!;
}

const longDay = (iso: string) => {
  const d = new Date(`${iso}T00:00:00Z`);
  return `${d.getUTCDate()} ${d.toLocaleString('en-GB', { month: 'long', timeZone: 'UTC' })} ${d.getUTCFullYear()}`;
};

describe('"How have flights from LWB done since it opened?"', () => {
  it('reads from LWB\'s first day, says so, and sets its flights since then against all flights over the same days', async () => {
    // The test's own SQL: LWB's first day as an origin, its flights from then to the data's last full day (30 June), and all flights over those days.
    const [first] = (await one(`SELECT CAST(MIN(CAST(date AS DATE)) AS VARCHAR) FROM '${FILE}' WHERE origin = 'LWB'`)) as [string];
    const [own, all] = (await one(`SELECT COUNT(*) FILTER (WHERE origin = 'LWB'), COUNT(*) FROM '${FILE}' WHERE CAST(date AS DATE) >= DATE '${first}' AND CAST(date AS DATE) < DATE '2001-07-01'`)) as [bigint, bigint];
    const posts = await askPostTexts(config, 'How have flights from LWB done since it opened?', join(dir, 'lwb'));
    const card = posts.find((p) => p.includes('*Plan*'))!;
    expect(card).toContain(`LWB's first flight in the data is ${longDay(first)}; reading from there`);
    expect(card).toContain(`${new Date(`${first}T00:00:00Z`).getUTCDate()} May to 30 June 2001`);
    // Its share of everything over the same days: its own count and the total, as the test's SQL counts them.
    const share = posts.find((p) => p.includes("LWB carried"))!;
    expect(share).toContain(`(${Number(own)})`);
    expect(share).toContain(`${Math.round(Number(all) / 1000)}K flights`);
    // Its course since opening: filtered to LWB, and only over weeks from its first.
    expect(posts.some((p) => p.includes('Filtered to origin airport: LWB') && !p.includes('April 2001 at'))).toBe(true);
  });

  it('on the trial wording, the value asked first (origin or destination), then anchored to its start', async () => {
    const r = await runCli(['read', '--config', config, '--now', '2026-12-05T12:00:00Z', 'How has LWB done since it opened?']);
    expect(r.code, r.err).toBe(0);
    // Both airports' columns hold LWB: which is meant is asked before any start is looked up.
    expect((JSON.parse(r.out) as { toAsk: string[] }).toAsk).toContain('values');
    const posts = await askPostTexts(config, 'How has LWB done since it opened?', join(dir, 'lwb-trial'));
    expect(posts.some((p) => p.includes("LWB's first flight in the data is 4 May 2001"))).toBe(true);
  });

  it('"since launch" with nothing named: says what it read and what it assumed', async () => {
    const r = await runCli(['read', '--config', config, '--now', '2026-12-05T12:00:00Z', 'since launch, how are flights doing?']);
    const b = JSON.parse(r.out) as { saidBack: string[]; questions: { window: unknown }[] };
    expect(b.saidBack.join(' ')).toMatch(/"since launch" read, but no single value is named/);
    expect(b.questions[0]!.window).toBeNull();
  });

  it('a value there from the data\'s first day has no start in the data: said, all of it read', async () => {
    const [first] = (await one(`SELECT CAST(MIN(CAST(date AS DATE)) AS VARCHAR) FROM '${FILE}' WHERE origin = 'ATL'`)) as [string];
    expect(first).toBe('2001-01-01');
    const r = await runCli(['read', '--config', config, '--now', '2026-12-05T12:00:00Z', 'How have flights from ATL done since it opened?']);
    const b = JSON.parse(r.out) as { saidBack: string[] };
    expect(b.saidBack.join(' ')).toContain('ATL (origin airport) is in the data from its first day (1 January 2001)');
  });
});

describe('"has the daily average number of flights gone up since March?"', () => {
  it('answers June against March per day, with the day counts, as the test\'s SQL counts them', async () => {
    const [march, june] = (await one(`SELECT COUNT(*) FILTER (WHERE month(date) = 3), COUNT(*) FILTER (WHERE month(date) = 6) FROM '${FILE}'`)) as [bigint, bigint];
    const [m, j] = [Number(march) / 31, Number(june) / 30];
    const pct = (100 * (j - m)) / m;
    const posts = await askPostTexts(config, 'has the daily average number of flights gone up since March?', join(dir, 'march'));
    const growth = posts.find((p) => p.includes('Flights per day'))!;
    expect(growth).toContain(`Flights per day ${pct >= 0 ? 'rose' : 'fell'} ${Math.abs(pct).toFixed(1)}%`);
    expect(growth).toContain('Jun 2001 against Mar 2001');
    expect(growth).toContain('Jun 2001 has 30 days and Mar 2001 31');
  });
});
