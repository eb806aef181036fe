// Seasonality asked of data stamped once a year: vega-datasets' iowa-electricity.csv (U.S. EIA net
// generation in Iowa by source, one row per source per year, 2001–2017). No within-year pattern can
// be measured, so the card says so and what is answered instead, never a silent drop of the ask.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { expect, it } from 'vitest';
import { vegaDataFile, writeIowaConfig } from '../helpers/open-data.js';
import { referenceRows } from '../helpers/reference-sql.js';
import { askPostTexts } from '../helpers/run-cli.js';

it('"is net generation seasonal?" on yearly data: the card and the plan say no within-year pattern can be measured', async () => {
  // The file's own stamps: one date a year (1 January), so nothing within a year to compare.
  const [r] = await referenceRows(`SELECT COUNT(DISTINCT year) AS dates, COUNT(DISTINCT date_part('year', CAST(year AS DATE))) AS years, COUNT(DISTINCT date_part('month', CAST(year AS DATE))) AS months FROM read_csv('${vegaDataFile('iowa-electricity.csv')}')`);
  expect(Number(r!.dates)).toBe(Number(r!.years));
  expect(Number(r!.months)).toBe(1);
  const dir = mkdtempSync(join(tmpdir(), 'tc-yearly-season-'));
  const posts = await askPostTexts(writeIowaConfig(dir), 'is net generation seasonal?', join(dir, 'out'));
  const card = posts.find((p) => p.includes('*Here is what I understood.*'))!;
  expect(card).toMatch(/When in the year net generation is highest and lowest: the data is stamped once a year, so no within-year pattern can be measured; the answers show how it moved year by year/);
  // No answer claims a month or a season.
  const answers = posts.filter((p) => /^\*\d+\. /.test(p)).join('\n');
  expect(answers).not.toMatch(/\b(?:January|February|March|April|June|July|August|September|October|November|December|seasonal pattern)\b/);
}, 180_000);
