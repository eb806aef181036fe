// A before/after around a date with no group to set against ("Did the share of wet days in Seattle
// go up after 2014-06-01?", "average delay before and after 1 April") is answered: the metric over
// equal spans either side of the date, with the caution that a before/after is not an experiment.
// It had planned nothing, and `threadcount ask` had then said "go" to an empty plan fifty times.
// Run through `threadcount ask` on vega-datasets' weather.csv (NOAA daily weather for Seattle and
// New York, 2012-2015); the expected shares are counted here from the CSV itself.
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { addDays, daysBetween } from '../../analysis/periods.js';
import { askPostTexts } from '../helpers/run-cli.js';
import { WEATHER_CSV, writeWeatherConfig } from '../helpers/open-data.js';

const csv = WEATHER_CSV;
const [head, ...lines] = readFileSync(csv, 'utf8').trim().split('\n');
const columns = head!.split(',');
const rows = lines.map((l) => Object.fromEntries(l.split(',').map((v, i) => [columns[i]!, v])));
const seattle = rows.filter((r) => r.location === 'Seattle');

/** Share of Seattle's days with precipitation in [start, end). */
function wetShare(start: string, end: string): number {
  const days = seattle.filter((r) => r.date! >= start && r.date! < end);
  return days.filter((r) => Number(r.precipitation) > 0).length / days.length;
}

describe('before and after a date, with no group', () => {
  it('compares equal spans either side of the date, from the file, and says it is not an experiment', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tc-before-after-'));
    const config = writeWeatherConfig(dir, [
      '{ name: days, label: Days recorded, count: rows, unit: count, kind: flow }',
      '{ name: wet_share, label: Share of wet days, rate: { when: "precipitation > 0" }, unit: percent, decimals: 1 }',
    ], [
      '{ name: city, label: City, column: location }',
    ]);
    const out = join(dir, 'out');
    const posts = await askPostTexts(config, 'Did the share of wet days in Seattle go up after 2014-06-01?', out);
    // The data ends on 31 December 2015: 579 days from 1 June 2014, so as many days before it.
    const end = '2016-01-01';
    const days = daysBetween('2014-06-01', end);
    expect(days).toBe(579);
    const [before, after] = [wetShare(addDays('2014-06-01', -days), '2014-06-01'), wetShare('2014-06-01', end)];
    const pct = (v: number) => `${(v * 100).toFixed(1)}%`;
    const answer = posts.find((p) => p.includes('not an experiment'));
    expect(answer, posts.join('\n---\n')).toBeDefined();
    expect(answer).toContain(`${pct(before)} to ${pct(after)}`);
    expect(answer).toContain(after < before ? 'fell' : 'rose');
    // A rate moves in points.
    expect(answer).toContain(`${(Math.abs(after - before) * 100).toFixed(1)} pts`);
    expect(posts.filter((p) => /plan is empty/.test(p))).toEqual([]);
  }, 300_000);
});
