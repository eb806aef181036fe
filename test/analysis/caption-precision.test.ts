// No number in a whole thread is printed past its precision: every caption, title and summary line
// of threads on two open datasets (vega-datasets flights-3m.parquet, FAA on-time records Jan–Jun
// 2001, and seattle-weather.csv, NOAA daily weather 2012–2015) is scanned for a figure with more
// than three decimal places and more than two significant figures ("−0.0228 min" was seen in a
// caption of average delay on flights: a weekly average near zero). Formatting goes through
// analysis/format.ts; this checks what reaches the reader, whatever caption printed it.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { flightsParquetConfigText, writeSeattleConfig } from '../helpers/open-data.js';
import { runCli } from '../helpers/run-cli.js';

/** Figures past their precision: more than 3 decimal places, with more than 2 significant figures among them. */
export function overPrecise(text: string): string[] {
  const out: string[] = [];
  for (const m of text.matchAll(/(?<![\w.])\d[\d,]*\.(\d+)(?![\d.])/g)) {
    const decimals = m[1]!;
    const whole = m[0].slice(0, m[0].indexOf('.')).replace(/,/g, '');
    const significant = (whole.replace(/^0+/, '') + decimals).replace(/^0+/, '').length;
    if (decimals.length > 3 && significant > 2) out.push(m[0]);
  }
  return out;
}

async function threadTexts(config: string, request: string): Promise<string[]> {
  const out = mkdtempSync(join(tmpdir(), 'tc-precision-'));
  const r = await runCli(['ask', '--config', config, '--request', request, '--out', out]);
  expect(r.code, r.err).toBe(0);
  const thread = JSON.parse(readFileSync(join(out, 'thread.json'), 'utf8')) as { posts: { text?: string }[] };
  return thread.posts.map((p) => p.text ?? '');
}

describe('no figure past its precision in whole threads', () => {
  it('the scan itself catches the figure seen in the trial and passes sensible ones', () => {
    expect(overPrecise('its lowest week was at −0.0228 min.')).toEqual(['0.0228']);
    expect(overPrecise('0.023 min, 13.8 min, 2,120,000, 80.2%, p < 0.001, 0.00042, 1.43 a day')).toEqual([]);
  });

  it('flights-3m.parquet: average delay over time, and how concentrated flights are by origin', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tc-precision-flights-'));
    const config = join(dir, 'flights.yaml');
    writeFileSync(
      config,
      `${flightsParquetConfigText(['{ name: delay, label: Average delay, average: delay, unit: number, unit_label: min, higher_is_better: false, kind: ratio }'])}    dimensions:
      - { name: origin, label: Origin airport, column: origin }
`,
    );
    const found: string[] = [];
    for (const request of ['How has average delay changed over time?', 'How many airports make up 80% of flights?']) {
      for (const text of await threadTexts(config, request)) found.push(...overPrecise(text).map((x) => `${request}: ${x}`));
    }
    expect(found).toEqual([]);
  }, 300_000);

  it('seattle-weather.csv: precipitation over time and by weather type', async () => {
    const config = writeSeattleConfig(mkdtempSync(join(tmpdir(), 'tc-precision-weather-')), 'weather.yaml', ['{ name: temp_max, label: Maximum temperature, average: temp_max, unit: number, unit_label: °C, kind: ratio }']);
    const found: string[] = [];
    for (const request of ['How has maximum temperature changed over time?', 'precipitation by weather type']) {
      for (const text of await threadTexts(config, request)) found.push(...overPrecise(text).map((x) => `${request}: ${x}`));
    }
    expect(found).toEqual([]);
  }, 300_000);
});
