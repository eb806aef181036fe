// Two values named against each other keep the comparison when one of them has to be asked about:
// on vega-datasets' football.json (European league matches, 2013-2017), "Bundesliga" is part of two
// divisions (Deutsche and Österreichische) and a team is both a home and an away team. Before, the
// answer to "which did you mean?" merged the values into one filter ("Serie A or Deutsche
// Bundesliga"). Wordings written from how managers ask, several not the ones the code was fixed on.
// The end-to-end check takes its expected figures from the test's own SQL over the file.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { describe, expect, it } from 'vitest';
import { nextPrompt, readAnswer, type PromptContext } from '../../bot/prompts.js';
import { readRequest, type DatasetFacts } from '../../bot/reading/read-request.js';
import type { Brief } from '../../bot/brief.js';
import { FOOTBALL_JSON, footballConfigText } from '../helpers/open-data.js';
import { askPostTexts } from '../helpers/run-cli.js';
import { publicFacts } from './public-data.js';

const FOOTBALL = FOOTBALL_JSON;
const dir = mkdtempSync(join(tmpdir(), 'tc-versus-'));
const file = join(dir, 'football.yaml');
writeFileSync(file, footballConfigText(
  [
    '{ name: matches, label: Matches, count: rows, kind: flow, unit: count, also_called: [games] }',
    '{ name: goals, label: Goals, sum: home_score + away_score, kind: flow, unit: count }',
    '{ name: goals_per_match, label: Goals per match, ratio: { of: goals, per: matches }, unit: number, decimals: 2, also_called: [goals per game] }',
    '{ name: away_win_rate, label: Away win rate, rate: { when: "home_score < away_score" }, unit: percent, also_called: [away wins] }',
  ],
  [
    '{ name: division, label: Division, column: division, also_called: [league, leagues] }',
    '{ name: home_team, label: Home team, column: home_team }',
    '{ name: away_team, label: Away team, column: away_team }',
  ],
));
const now = new Date('2026-12-05T07:00:00Z');
let facts: DatasetFacts | undefined;

/** Reads the request and answers every value question with its recommendation ("ok"). */
async function readAndAccept(text: string): Promise<Brief> {
  facts ??= await publicFacts(file);
  const ctx: PromptContext = { dataset: facts.dataset, coverage: facts.coverage, facts, now, locale: 'en-GB' };
  let brief = readRequest(text, facts, { now });
  for (let p = nextPrompt(brief, ctx); p && p.topic === 'values'; p = nextPrompt(brief, ctx)) {
    const a = readAnswer(p, 'ok', brief, ctx);
    if (!a.ok) throw new Error(a.message);
    brief = a.brief;
  }
  return brief;
}

describe('values named against each other stay compared once asked about (football.json)', () => {
  for (const text of [
    'goals per match in Serie A vs Bundesliga',
    'Serie A versus the Bundesliga on goals per game',
    'which scores more goals per game, Serie A or the Bundesliga?',
    'goals per match: Bundesliga against Serie A',
    'compare goals per match in Serie A with the Bundesliga',
  ]) {
    it(`"${text}": Serie A against Deutsche Bundesliga, side by side`, async () => {
      const q = (await readAndAccept(text)).questions[0]!;
      expect(q.contrast?.dimension).toBe('division');
      expect([...(q.contrast?.values ?? [])].sort()).toEqual(['Deutsche Bundesliga', 'Serie A']);
    }, 120_000);
  }

  for (const text of ['away win rate for Barcelona vs Real Madrid?', 'who has the better away win rate, Barcelona or Real Madrid?']) {
    it(`"${text}": the two teams compared, both under the breakdown chosen`, async () => {
      const q = (await readAndAccept(text)).questions[0]!;
      expect(q.contrast?.values.map(String).sort()).toEqual(['Barcelona', 'R. Madrid']);
    }, 120_000);
  }

  it('one value asked about with no other named against it stays a filter', async () => {
    const q = (await readAndAccept('goals per match in the Bundesliga')).questions[0]!;
    expect(q.contrast).toBeUndefined();
    expect(q.filters).toEqual([{ dimension: 'division', values: ['Deutsche Bundesliga'] }]);
  }, 120_000);

  it('the thread answers each division with its own figure, as the SQL gives it', async () => {
    const db = await DuckDBInstance.create(':memory:');
    const c = await db.connect();
    const rows = (await c.runAndReadAll(`SELECT division, CAST(SUM(home_score + away_score) AS DOUBLE) / COUNT(*) AS g FROM read_json_auto('${FOOTBALL}') WHERE division IN ('Serie A', 'Deutsche Bundesliga') GROUP BY 1`)).getRows() as [string, number][];
    c.closeSync();
    const posts = await askPostTexts(file, 'goals per match in Serie A vs Bundesliga', join(dir, 'out'));
    const all = posts.join('\n---\n');
    expect(all).toMatch(/How Serie A and Deutsche Bundesliga compare/);
    for (const [division, g] of rows) expect(all).toContain(`${division} ${g.toFixed(2)}`);
  }, 300_000);
});

describe('"last season" is read as the data\'s year and said, never dropped (football.json)', () => {
  for (const [text, which] of [
    ['goals per match in Serie A vs Bundesliga last season', 'last'],
    ['how did home teams do in the previous season?', 'last'],
    ['matches this season so far', 'this'],
  ] as const) {
    it(`"${text}"`, async () => {
      const db = await DuckDBInstance.create(':memory:');
      const c = await db.connect();
      // The last year the file covers to its end (a December match), and the file's last date.
      const [[lastFull, lastDate]] = (await c.runAndReadAll(`SELECT MAX(year(CAST(date AS DATE))) FILTER (WHERE month(CAST(date AS DATE)) = 12), strftime(MAX(CAST(date AS DATE)), '%Y-%m-%d') FROM read_json_auto('${FOOTBALL}')`)).getRows() as [[number, string]];
      c.closeSync();
      const brief = await readAndAccept(text);
      const w = brief.questions[0]!.window;
      if (which === 'last') expect(w).toEqual({ start: `${lastFull}-01-01`, end: `${Number(lastFull) + 1}-01-01` });
      else expect(w).toEqual({ start: `${lastDate.slice(0, 4)}-01-01`, end: expect.any(String) });
      expect((brief.saidBack ?? []).join(' ')).toMatch(/season" read as .*calendar year.*no season start is declared/);
    }, 120_000);
  }
});
