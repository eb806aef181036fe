// Thin periods: a year holding 1–2 rows against a usual ~175 is read like a partial one, left out
// of the highs, lows and the latest complete year, and said once. On open data the project was
// never built around: vega-datasets' movies.json (films with release dates, 1928–2025, most of them
// 1995–2010). Every year's count is the test's own SQL over the file.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import { caveatNote } from '../../analysis/captions/caveat-text.js';
import type { SubQuestion } from '../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { loadConfig } from '../../config/load.js';
import { vegaDataFile } from '../helpers/open-data.js';

let ws: Workspace;
let films: Map<number, number>;
beforeAll(async () => {
  const file = join(mkdtempSync(join(tmpdir(), 'tc-thin-')), 'movies.yaml');
  writeFileSync(file, `version: 1
datasets:
  - name: movies
    label: Movies
    source: { kind: json, paths: [${vegaDataFile('movies.json')}] }
    time_column: { expr: "strptime(\\"Release Date\\", '%b %d %Y')" }
    timezone: UTC
    metrics:
      - { name: films, label: Films, count: rows, unit: count, kind: flow }
      - { name: worldwide_gross, label: Worldwide gross, sum: '"Worldwide Gross"', unit: currency, currency: USD, kind: flow }
    dimensions:
      - { name: genre, label: Genre, column: Major Genre }
`);
  ws = await openWorkspace(loadConfig(file));
  const db = await DuckDBInstance.create(':memory:');
  const conn = await db.connect();
  const rows = (await conn.runAndReadAll(`SELECT year(strptime("Release Date", '%b %d %Y')) AS y, COUNT(*)::DOUBLE AS n
    FROM read_json_auto('${vegaDataFile('movies.json')}') WHERE "Release Date" IS NOT NULL GROUP BY 1`)).getRowObjectsJson();
  conn.closeSync();
  db.closeSync();
  films = new Map(rows.map((r) => [Number(r.y), Number(r.n)]));
}, 60_000);
afterAll(async () => {
  await ws?.source.close();
});

const series = (metric: string): SubQuestion => ({
  id: 's', kind: 'trend', lens: 'time_pattern', template: 'series', metrics: [metric], grain: 'year',
  window: { start: '1995-01-01', end: '2025-01-01' }, filters: [],
});

describe('thin years (movies.json, 1995–2024)', () => {
  it('leaves the years with a handful of films out of the high, low and latest complete year', async () => {
    const years = [...films.keys()].filter((y) => y >= 1995 && y <= 2024);
    // Own SQL: 1995–2010 hold 73–220 films each; 2011, 2015, 2016 and 2020 hold 1–2.
    const handful = years.filter((y) => films.get(y)! < 10).sort();
    const full = years.filter((y) => films.get(y)! >= 10);
    expect(handful).toEqual([2011, 2015, 2016, 2020]);
    expect(Math.min(...full.map((y) => films.get(y)!))).toBeGreaterThan(50);
    const answer = await answerSubQuestion(series('films'), ws);
    const f = (type: string) => answer.findings.find((x) => x.type === type) as { period: string; value: number };
    const lowest = full.reduce((a, b) => (films.get(b)! < films.get(a)! ? b : a));
    const highest = full.reduce((a, b) => (films.get(b)! > films.get(a)! ? b : a));
    expect(f('trough').period).toBe(`${lowest}-01-01`);
    expect(f('trough').value).toBe(films.get(lowest));
    expect(f('peak').period).toBe(`${highest}-01-01`);
    expect(f('latest').period).toBe(`${Math.max(...full)}-01-01`);
    // Said once, naming the thin years and what they hold.
    const thin = answer.caveats.filter((c) => c.code === 'thin_period');
    expect(thin).toHaveLength(1);
    expect(String(thin[0]!.data.periods).split(',')).toEqual(handful.map((y) => `${y}-01-01`));
    expect(thin[0]!.data.most).toBe(Math.max(...handful.map((y) => films.get(y)!)));
    const note = caveatNote(thin[0]!, 'en-GB');
    expect(note).toContain('2011, 2015, 2016 and 2020');
    expect(note).toMatch(/left out of the highs, lows and the latest complete year/);
  });

  it('a measure of the same rows leaves the same years out (worldwide gross: 2011 is no "lowest year")', async () => {
    const answer = await answerSubQuestion(series('worldwide_gross'), ws);
    const trough = answer.findings.find((x) => x.type === 'trough') as { period: string };
    const latest = answer.findings.find((x) => x.type === 'latest') as { period: string };
    expect(['2011-01-01', '2015-01-01', '2016-01-01', '2020-01-01']).not.toContain(trough.period);
    expect(latest.period).toBe('2010-01-01');
  });

  it('a series with no thin period is read as before (1995–2010 only)', async () => {
    const answer = await answerSubQuestion({ ...series('films'), window: { start: '1995-01-01', end: '2011-01-01' } }, ws);
    expect(answer.caveats.some((c) => c.code === 'thin_period')).toBe(false);
    expect((answer.findings.find((x) => x.type === 'latest') as { period: string }).period).toBe('2010-01-01');
  });
});
