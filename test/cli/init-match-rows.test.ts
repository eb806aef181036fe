// `threadcount init` on rows unique by date and every breakdown: a grid of figures already counted
// (unemployed per industry per month) fills most of its date × breakdown cells and gets no count of
// rows; match results (a date, a division, a home and an away team) are unique only because they
// pair rare values, fill a tiny share of the cells, and are events: a count of rows (matches) is
// drafted. Data: vega-datasets football.json and unemployment-across-industries.json; the
// premises (each row unique, the share of cells filled) come from this test's own SQL (DuckDB).
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { vegaDataFile } from '../helpers/open-data.js';
import { runCli } from '../helpers/run-cli.js';

type Dataset = { metrics: { name: string; label: string; also_called: string[]; count?: string }[] };

async function draft(source: string): Promise<{ out: string; ds: Dataset; text: string }> {
  const file = join(mkdtempSync(join(tmpdir(), 'tc-init-match-')), 'draft.yaml');
  const r = await runCli(['init', '--source', source, '--out', file]);
  expect(r.code, r.err).toBe(0);
  const text = readFileSync(file, 'utf8');
  return { out: r.out, ds: (parse(text) as { datasets: Dataset[] }).datasets[0]!, text };
}

async function fill(file: string, time: string, breakdowns: string[]): Promise<{ rows: number; cells: number; grid: number }> {
  const db = await DuckDBInstance.create(':memory:');
  const c = await db.connect();
  const t = `read_json_auto('${file.replaceAll("'", "''")}')`;
  const key = [time, ...breakdowns].map((k) => `CAST(${k} AS VARCHAR)`).join(` || '|' || `);
  const r = (await c.runAndReadAll(`SELECT COUNT(*) AS rows, COUNT(DISTINCT ${key}) AS cells, ${[time, ...breakdowns].map((k) => `COUNT(DISTINCT ${k})`).join(' * ')} AS grid FROM ${t}`)).getRowObjectsJson()[0]!;
  c.closeSync();
  return { rows: Number(r.rows), cells: Number(r.cells), grid: Number(r.grid) };
}

describe('init: cells of a grid or events', () => {
  it('drafts a count of rows for match results, each row a match', async () => {
    const file = vegaDataFile('football.json');
    const f = await fill(file, 'date', ['division', 'home_team', 'away_team']);
    // Premise: every row is its own (date, division, home, away) cell, and under a tenth of the grid is filled.
    expect(f.cells).toBe(f.rows);
    expect(f.rows).toBeLessThan(0.1 * f.grid);
    const { out, ds } = await draft(file);
    expect(ds.metrics.find((m) => m.count === 'rows')).toBeDefined();
    expect(out).not.toContain('no count of rows');
  }, 120_000);

  it('still drafts none for the unemployed per industry per month, a filled grid', async () => {
    const file = vegaDataFile('unemployment-across-industries.json');
    const u = await fill(file, 'date', ['series']);
    expect(u.cells).toBe(u.rows);
    expect(u.rows).toBeGreaterThanOrEqual(0.1 * u.grid);
    const { out, ds } = await draft(file);
    expect(ds.metrics.find((m) => m.count === 'rows')).toBeUndefined();
    expect(out).toContain('no count of rows');
  }, 120_000);
});

describe('init: the count of rows is named for what a row is, where the data says it', () => {
  it('flights-3m.parquet: a file named for its rows (one plural noun after the size mark) counts "Flights"', async () => {
    const { ds, text } = await draft(vegaDataFile('flights-3m.parquet'));
    const rows = ds.metrics.find((m) => m.count === 'rows')!;
    expect(rows).toMatchObject({ name: 'flights', label: 'Flights', also_called: ['flights'] });
    expect(text).toContain('each read as one of the flights the file is named for');
  }, 120_000);

  it('birdstrikes.csv: the same rule on another file, one word', async () => {
    const { ds } = await draft(vegaDataFile('birdstrikes.csv'));
    expect(ds.metrics.find((m) => m.count === 'rows')).toMatchObject({ label: 'Birdstrikes' });
  }, 120_000);

  it('football.json: nothing names a row (a singular name, no such column), so the plain label stays and the comment asks for it to be renamed', async () => {
    const { ds, text } = await draft(vegaDataFile('football.json'));
    const rows = ds.metrics.find((m) => m.count === 'rows')!;
    expect(rows).toMatchObject({ name: 'rows', label: 'Rows', also_called: [] });
    const comment = text.split('\n').find((l) => l.includes('drafted by init: the number of rows'))!;
    expect(comment).toMatch(/nothing in the file says what a row is: rename the label/);
  }, 120_000);
});
