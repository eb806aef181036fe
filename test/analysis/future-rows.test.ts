// Rows dated after today, and "this year" read against them. vega-datasets' movies.json dates its
// films as "Dec 31 1946"-style text whose two-digit years were read in the wrong century upstream:
// 24 films fall after 2010 and some as late as 2046 (counted below by plain SQL on the file).
// "this year" is the calendar year holding the anchor, run to the anchor, against the same dates a
// year earlier: never 2026 to 2046 against 2025 to 2045.
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { datasetFacts, openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { readRequest } from '../../bot/reading/read-request.js';
import { parseConfigText } from '../../config/load.js';
import { vegaDataFile } from '../helpers/open-data.js';

const MOVIES = vegaDataFile('movies.json');
const RELEASE = `strptime("Release Date", '%b %d %Y')`;
// The run's clock: the day the newcomer's trial ran.
const now = new Date('2026-12-05T09:00:00Z');

/** Films dated after a day, and the last date on or before it, by plain SQL on the file. */
async function datesAround(day: string): Promise<{ after: number; firstAfter: string; lastAfter: string; lastOnOrBefore: string }> {
  const db = await DuckDBInstance.create(':memory:');
  const con = await db.connect();
  try {
    const r = await con.runAndReadAll(`WITH m AS (SELECT CAST(${RELEASE} AS DATE) AS d FROM read_json_auto('${MOVIES.replace(/'/g, "''")}'))
SELECT COUNT(*) FILTER (WHERE d > DATE '${day}')::DOUBLE AS after, CAST(MIN(d) FILTER (WHERE d > DATE '${day}') AS VARCHAR) AS first_after,
  CAST(MAX(d) FILTER (WHERE d > DATE '${day}') AS VARCHAR) AS last_after, CAST(MAX(d) FILTER (WHERE d <= DATE '${day}') AS VARCHAR) AS last_before FROM m`);
    const row = r.getRowObjectsJS()[0]!;
    return { after: Number(row.after), firstAfter: String(row.first_after), lastAfter: String(row.last_after), lastOnOrBefore: String(row.last_before) };
  } finally {
    con.closeSync();
    db.closeSync();
  }
}

describe('rows dated after today (movies.json, vega-datasets)', () => {
  let ws: Workspace;
  let truth: Awaited<ReturnType<typeof datesAround>>;
  beforeAll(async () => {
    const config = parseConfigText(
      `version: 1
datasets:
  - name: movies
    label: Movies
    source: { kind: json, paths: ["${MOVIES}"] }
    time_column: { expr: '${RELEASE.replace(/'/g, "''")}' }
    timezone: UTC
    metrics:
      - { name: worldwide_gross, label: Worldwide Gross, sum: '"Worldwide Gross"', unit: number, kind: flow }
`,
      '/virtual/future-rows.yaml',
    );
    ws = await openWorkspace(config);
    truth = await datesAround('2026-12-05');
  });
  afterAll(async () => {
    await ws?.source.close();
  });

  it('the file has films dated after the run\'s day (plain SQL)', () => {
    expect(truth.after).toBe(16);
    expect(truth.lastAfter).toBe('2046-12-31');
  });

  it('"this year vs last year" is 2026 to today against the same dates of 2025', () => {
    const brief = readRequest('total worldwide gross this year vs last year', datasetFacts(ws), { now });
    expect(brief.window).toEqual({ start: '2026-01-01', end: '2026-12-06' });
    expect(brief.compareWindow).toEqual({ start: '2025-01-01', end: '2025-12-06' });
  });

  it('"since 2000" runs to today, not to the last film dated 2046', () => {
    const brief = readRequest('monthly count of worldwide gross since 2000', datasetFacts(ws), { now });
    expect(brief.window?.start).toBe('2000-01-01');
    expect(brief.window!.end <= '2026-12-06').toBe(true);
  });
});
