// "Week 47 of 2015 compared with the same week last year" compares ISO week 47 of 2015 with ISO
// week 47 of 2014 (README: a year earlier is the same ISO week for weeks), not the same dates a year
// back, which start on another weekday. On vega-datasets' seattle-weather.csv (daily, 2012-2015).
// Sources: the week's dates from date-fns 4 (npm; setISOWeek / startOfISOWeek implement ISO 8601);
// the totals from the test's own SQL using DuckDB's isoyear() and week(), which number ISO 8601 weeks.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { setISOWeek, startOfISOWeek } from 'date-fns';
import { DuckDBInstance } from '@duckdb/node-api';
import { describe, expect, it } from 'vitest';
import { readBrief } from '../../cli/read.js';
import { vegaDataFile, writeSeattleConfig } from '../helpers/open-data.js';

const dir = mkdtempSync(join(tmpdir(), 'tc-isoweek-'));
const CONFIG = writeSeattleConfig(dir);
const NOW = new Date('2026-12-05T09:00:00Z');
const REQUEST = 'How much precipitation was there in week 47 of 2015 compared with the same week last year?';

/** date-fns works on local dates; noon keeps every zone on the same calendar day. */
const isoMonday = (year: number, week: number): string => {
  const d = startOfISOWeek(setISOWeek(new Date(year, 5, 15, 12), week));
  return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
};
const plusDays = (iso: string, n: number) => new Date(Date.parse(`${iso}T00:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10);

describe('the same week last year is the same ISO week number', () => {
  it('the compared window is ISO week 47 of 2014 (date-fns), Monday to Sunday like week 47 of 2015', async () => {
    const b = await readBrief({ configFile: CONFIG, text: REQUEST, now: NOW });
    const q = b.questions[0]!;
    const w15 = isoMonday(2015, 47);
    const w14 = isoMonday(2014, 47);
    expect(q.window).toEqual({ from: w15, to: plusDays(w15, 6) });
    expect(q.compareWindow).toEqual({ from: w14, to: plusDays(w14, 6) });
    // The same dates a year back would start on a Monday's eve: 16 Nov 2014 was a Sunday.
    expect(w14).not.toBe(`2014${w15.slice(4)}`);
  });

  it('the answer states the change between the two ISO weeks worked out by SQL', async () => {
    const inst = await DuckDBInstance.create(':memory:');
    const con = await inst.connect();
    const r = await con.runAndReadAll(`SELECT isoyear(date) AS y, sum(precipitation) AS p FROM read_csv_auto('${vegaDataFile('seattle-weather.csv')}')
      WHERE week(date) = 47 AND isoyear(date) IN (2014, 2015) GROUP BY 1 ORDER BY 1`);
    const [p14, p15] = r.getRowObjectsJson().map((row) => Number(row['p']));
    con.closeSync();
    const growth = ((p15! / p14! - 1) * 100).toFixed(1);
    const { ask } = await import('../../cli/ask.js');
    writeFileSync(join(dir, 'go.yaml'), 'plan: go\n');
    const out = await ask({ configFile: CONFIG, request: REQUEST, answersFile: join(dir, 'go.yaml'), outDir: join(dir, 'out'), now: NOW });
    const texts = out.thread.thread.posts.filter((p) => p.author === 'threadcount').map((p) => p.text);
    const change = texts.find((t) => /rose|fell/.test(t) && /16\s?–\s?22 Nov 2015 against 17\s?–\s?23 Nov 2014/.test(t));
    expect(change, texts.join('\n---\n')).toBeDefined();
    expect(change).toContain(`${Number(growth) >= 0 ? 'rose' : 'fell'} ${Math.abs(Number(growth)).toFixed(1)}%`);
    expect(change).toContain(`${p14!.toFixed(1)} to ${p15!.toFixed(1)}`);
  }, 300_000);
});
