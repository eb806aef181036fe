// Dates written month first with dashes ("01-13-2001") in JSON and CSV files, which the engine's own
// readers guess at: read_json read "02-01-2001" as 2 January and "01-13-2001" as 13 January in one
// column. Format fixture: the rows are vega-datasets' flights-2k.json (v3.2.1: US flights, January to
// March 2001, dated "2001/01/01 00:47"), each day rewritten month first here, so the range `check`
// reads back must be the original file's, worked out in plain JavaScript.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { parse } from 'yaml';
import { vegaDataFile } from '../helpers/open-data.js';
import { runCli as run } from '../helpers/run-cli.js';

afterEach(() => vi.restoreAllMocks());

interface Flight { date: string; delay: number; distance: number; origin: string; destination: string }
const flights = JSON.parse(readFileSync(vegaDataFile('flights-2k.json'), 'utf8')) as Flight[];
/** "2001/01/13 00:47" as "01-13-2001". */
const monthFirst = (date: string) => `${date.slice(5, 7)}-${date.slice(8, 10)}-${date.slice(0, 4)}`;
const rangeOf = (rows: Flight[]) => {
  const days = rows.map((f) => f.date.slice(0, 10).replace(/\//g, '-')).sort();
  return `${days[0]} to ${days[days.length - 1]}`;
};

function write(rows: Flight[], kind: 'json' | 'csv'): { source: string; file: string } {
  const dir = mkdtempSync(join(tmpdir(), 'tc-file-dates-'));
  const source = join(dir, `flights.${kind}`);
  const dated = rows.map((f) => ({ ...f, date: monthFirst(f.date) }));
  writeFileSync(source, kind === 'json' ? JSON.stringify(dated) : `date,delay,distance,origin,destination\n${dated.map((f) => [f.date, f.delay, f.distance, f.origin, f.destination].join(',')).join('\n')}\n`);
  return { source, file: join(dir, 'flights.yaml') };
}

describe('dates written month first with dashes in JSON and CSV files', () => {
  for (const kind of ['json', 'csv'] as const) {
    it(`reads every ${kind} date month first when days above 12 settle it, and check reads the original range`, async () => {
      const { source, file } = write(flights, kind);
      const r = await run(['init', '--source', source, '--out', file]);
      expect(r.code, r.err).toBe(0);
      expect(r.out).toMatch(/time column: date, text dates read as %m-%d-%Y \(all \d+ distinct values sampled\)/);
      expect(r.out).not.toContain('cannot tell day-first');
      const ds = (parse(readFileSync(file, 'utf8')) as { datasets: Record<string, unknown>[] }).datasets[0]!;
      expect(ds.time_column).toBe('date');
      expect(ds.source).not.toHaveProperty('date_order');
      const check = await run(['check', '--config', file]);
      expect(check.code, check.out).toBe(0);
      expect(check.out).toContain(`2,000 rows, ${rangeOf(flights)}, stamped daily`);
    });
  }

  it('says it assumed day first when no day is above 12, writes date_order into the source, and reads month first once it is turned round', async () => {
    const early = flights.filter((f) => Number(f.date.slice(8, 10)) <= 12);
    const { source, file } = write(early, 'json');
    const r = await run(['init', '--source', source, '--out', file]);
    expect(r.code, r.err).toBe(0);
    const said = 'the data cannot tell day-first from month-first: assumed %d-%m-%Y; if the month comes first set date_order: month_first in source';
    expect(r.out).toContain(said);
    const text = readFileSync(file, 'utf8');
    expect(text).toContain(said);
    expect((parse(text) as { datasets: { source: Record<string, unknown> }[] }).datasets[0]!.source.date_order).toBe('day_first');
    // Day first, "03-12-2001" is 3 December: the range runs past March, the file's last month.
    const dayFirst = await run(['check', '--config', file]);
    expect(dayFirst.code, dayFirst.out).toBe(0);
    expect(dayFirst.out).toMatch(/ to 2001-(0[4-9]|1[0-2])-\d\d/);
    writeFileSync(file, text.replace('date_order: day_first', 'date_order: month_first'));
    const monthFirstCheck = await run(['check', '--config', file]);
    expect(monthFirstCheck.code, monthFirstCheck.out).toBe(0);
    expect(monthFirstCheck.out).toContain(`${early.length.toLocaleString('en')} rows, ${rangeOf(early)}`);
  });
});
