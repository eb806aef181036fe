// A measure computed from an expression ("home_score + away_score") is named in the missing-values
// note by the measure it makes, with the expression beside, never by the bare SQL alone. Data:
// vega-datasets' football.json (European league matches, 2013–2017); the count of rows where the
// sum is missing comes from the test's own DuckDB SQL over the file.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { expect, it } from 'vitest';
import { FOOTBALL_JSON, footballConfigText } from '../../helpers/open-data.js';
import { referenceRows } from '../../helpers/reference-sql.js';
import { askPostTexts } from '../../helpers/run-cli.js';

const FOOTBALL = FOOTBALL_JSON;

it('names the measure and its expression in the missing-values note, with the count SQL gives', async () => {
  const dir = mkdtempSync(join(tmpdir(), 'tc-expression-note-'));
  const config = join(dir, 'football.yaml');
  writeFileSync(config, footballConfigText(
  [
    '{ name: matches, label: Matches, count: rows, unit: count, kind: flow }',
    '{ name: goals, label: Goals, sum: home_score + away_score, unit: count, kind: flow }',
    '{ name: goals_per_match, label: Goals per match, also_called: [goals per game], ratio: { of: goals, per: matches }, unit: number, decimals: 2 }',
  ],
  [
    '{ name: division, label: Division, also_called: [league], column: division }',
  ],
));
  const [r] = await referenceRows(`SELECT COUNT(*) FILTER (WHERE home_score + away_score IS NULL) AS missing FROM read_json_auto('${FOOTBALL}')`);
  const missing = Number(r!.missing);
  expect(missing).toBeGreaterThan(0);
  const posts = await askPostTexts(config, 'goals per game by league in 2016', join(dir, 'out'));
  const notes = posts.join('\n').split('\n').filter((l) => l.includes('is missing in'));
  expect(notes.length).toBeGreaterThan(0);
  for (const n of notes) {
    expect(n).toMatch(/^(?:_Note: |- )?Goals \(home_score \+ away_score\) is missing in/);
    expect(n).toContain(`(${missing})`);
  }
}, 180_000);
