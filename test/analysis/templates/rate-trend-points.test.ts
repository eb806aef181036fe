// A rate's trend by segment moves in points, never in percent of itself: "home win rate by division"
// on vega-datasets' football.json (European league matches, July 2013 to May 2017, one row per
// match) had said "Österreichische Bundesliga grew fastest: +3.2% a year" for a home win rate.
// Expected: the division with the steepest Sen's slope of its monthly home win rate (the median of
// all pairwise slopes, Sen 1968), over the whole months inside the data, from the test's own SQL.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { beforeAll, describe, expect, it } from 'vitest';
import { askPostTexts } from '../../helpers/run-cli.js';
import { vegaDataFile } from '../../helpers/open-data.js';

const FOOTBALL = vegaDataFile('football.json');
let config = '';
let dir = '';

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'tc-rate-trend-'));
  config = join(dir, 'football.yaml');
  writeFileSync(config, `version: 1
datasets:
  - name: football
    label: Football matches
    source: { kind: json, paths: ["${FOOTBALL}"] }
    time_column: date
    timezone: UTC
    metrics:
      - { name: matches, label: Matches, count: rows, kind: flow, unit: count, also_called: [games] }
      - { name: home_win_rate, label: Home win rate, rate: { when: "home_score > away_score" }, unit: percent, also_called: [home wins] }
    dimensions:
      - { name: division, label: Division, column: division, also_called: [league, leagues, divisions] }
`);
});

describe('a rate trended by segment (football.json)', () => {
  it('ranks divisions by their slope in points a month, the steepest as the SQL finds it', async () => {
    const db = await DuckDBInstance.create(':memory:');
    const c = await db.connect();
    // Whole months only: the data starts 20 July 2013 and ends 28 May 2017.
    const rows = (
      await c.runAndReadAll(`WITH m AS (
          SELECT division, date_trunc('month', CAST(date AS DATE)) AS mo,
            AVG(CASE WHEN home_score > away_score THEN 1.0 WHEN home_score <= away_score THEN 0.0 END) AS r
          FROM read_json_auto('${FOOTBALL}') WHERE CAST(date AS DATE) >= DATE '2013-08-01' AND CAST(date AS DATE) < DATE '2017-05-01' GROUP BY 1, 2),
        i AS (SELECT division, r, year(mo) * 12 + month(mo) AS k FROM m)
        SELECT a.division, median((b.r - a.r) / (b.k - a.k)) * 100 AS sen
        FROM i a JOIN i b ON a.division = b.division AND b.k > a.k GROUP BY 1 ORDER BY 2 DESC`)
    ).getRows() as [string, number][];
    c.closeSync();
    const [steepest, sen] = rows[0]!;
    const posts = await askPostTexts(config, 'home win rate by division', join(dir, 'out'));
    const answer = posts.find((t) => /^\*\d+\. [^\n]*(?:rose most|fell least|grew fastest|held up best)/.test(t))!;
    expect(answer, posts.join('\n---\n')).toBeDefined();
    const title = answer.split('\n')[0]!;
    expect(title).toContain(`${steepest} rose most: +${sen.toFixed(2)} pts a month (trend)`);
    // No percentage of a percentage anywhere in the answer's growth words.
    expect(answer).not.toMatch(/[+−-]\d+(?:\.\d+)?% a (?:year|month)/);
  }, 300_000);
});
