// Labels written in Title Case, as `threadcount init` drafts them from a file's column names, said
// in a sentence. On vega-datasets movies.json (a public list of 3,201 films with their grosses,
// ratings, genre and distributor), with the labels init drafted for it ("Worldwide Gross", "Major
// Genre", "US Gross", "IMDB Rating", "MPAA Rating"), every template's words follow ordinary English
// usage: an ordinary word is lower case mid-sentence ("worldwide gross", "major genre") and an
// acronym keeps its case ("US gross", "IMDB rating"); the brief card's say-back lines too. And no
// placeholder or caveat code reaches a post (test/helpers/caption-checks.ts).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { metricFormula } from '../../../analysis/captions/metric-words.js';
import { SUB_QUESTIONS, TEMPLATE_NAMES } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { datasetFacts, openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { planFor } from '../../../bot/card-edits.js';
import { buildCard, cardText } from '../../../bot/card.js';
import { presentContext } from '../../../bot/present-answer.js';
import { readRequest } from '../../../bot/reading/read-request.js';
import { parseConfigText } from '../../../config/load.js';
import { placeholderIn, wordsOf } from '../../helpers/caption-checks.js';
import { vegaDataFile } from '../../helpers/open-data.js';

const NOW = new Date('2026-12-05T09:00:00Z');
// The labels as `threadcount init` drafted them for movies.json (column names kept as written).
const CONFIG = `version: 1
datasets:
  - name: movies
    label: Movies
    source: { kind: json, paths: ["${vegaDataFile('movies.json')}"] }
    time_column: { expr: 'strptime("Release Date", ''%b %d %Y'')' }
    timezone: UTC
    metrics:
      - { name: rows, label: Films released, also_called: [films, releases], count: rows, unit: count, kind: flow }
      - { name: us_gross, label: US Gross, sum: '"US Gross"', unit: number, kind: flow }
      - { name: worldwide_gross, label: Worldwide Gross, sum: '"Worldwide Gross"', unit: number, kind: flow }
      - { name: imdb_rating, label: IMDB Rating, average: '"IMDB Rating"', unit: number, kind: level }
    dimensions:
      - { name: mpaa_rating, label: MPAA Rating, column: MPAA Rating }
      - { name: major_genre, label: Major Genre, also_called: [genre, genres], column: Major Genre }
      - { name: creative_type, label: Creative Type, column: Creative Type }
`;

/**
 * A Title Case label left as it was inside a sentence: any of its later ordinary words still
 * capitalised after the word before it ("worldwide Gross", "Worldwide Gross", "IMDB Rating").
 */
function titleCaseSlips(text: string, labels: readonly string[]): string[] {
  const out: string[] = [];
  for (const label of labels) {
    const words = label.split(' ');
    for (let i = 1; i < words.length; i++) {
      if (!/^[A-Z][a-z]+$/.test(words[i]!)) continue;
      const pair = new RegExp(`\\b${words[i - 1]}\\s${words[i]}\\b`, 'i');
      const m = pair.exec(text);
      // The pair found with the later word still capitalised (the case-insensitive match finds it either way).
      if (m && m[0].endsWith(words[i]!)) out.push(`"${m[0]}" in "${text}"`);
    }
  }
  return out;
}

let ws: Workspace;
beforeAll(async () => {
  ws = await openWorkspace(parseConfigText(CONFIG, '/virtual/movies.yaml'), undefined, {}, NOW);
}, 120_000);
afterAll(async () => {
  await ws?.source.close();
});

describe('Title Case labels in sentences (movies.json, vega-datasets)', () => {
  const labels = () => [...ws.dataset.metrics.map((m) => m.label), ...ws.dataset.dimensions.map((d) => d.label)];

  it('every template, for every audience: no label left in Title Case mid-sentence, no placeholder', async () => {
    const problems: string[] = [];
    let checked = 0;
    // The films up to 2010, where the file's own dates are right (later ones are a two-digit-year slip).
    const window = { start: '1990-01-01', end: '2011-01-01' };
    for (const template of TEMPLATE_NAMES) {
      const def = SUB_QUESTIONS[template];
      if (def.kind === 'performance') continue; // movies.json has no comparison group
      for (const metric of ['worldwide_gross', 'imdb_rating', 'rows']) {
        const sq: SubQuestion = {
          id: `${template}-${metric}`, kind: def.kind, lens: def.lens, template, grain: template === 'period_table' ? 'year' : 'month', window,
          filters: [], metrics: template === 'period_table' ? [metric, 'rows'] : [metric], dimension: 'major_genre',
          ...(template === 'value_compare' ? { contrast: { dimension: 'major_genre', values: ['Drama', 'Comedy'] } } : {}),
        };
        const answer = await answerSubQuestion(sq, ws);
        for (const audience of ['leadership', 'managers', 'analysts'] as const) {
          const presented = def.present(answer, presentContext(ws, audience));
          for (const text of wordsOf(presented)) {
            // Analysts see a metric's formula as written, with the data's own column names ("sum of Worldwide Gross").
            const words = audience === 'analysts' ? ws.dataset.metrics.reduce((t, m) => t.replace(metricFormula(m, ws.dataset), ''), text) : text;
            for (const slip of titleCaseSlips(words, labels())) problems.push(`${sq.id} · ${audience}: ${slip}`);
            const placeholder = placeholderIn(text);
            if (placeholder) problems.push(`${sq.id} · ${audience}: "${placeholder}" in "${text}"`);
            if (/\b1 films\b/.test(text)) problems.push(`${sq.id} · ${audience}: "1 films" in "${text}"`);
          }
          checked++;
        }
      }
    }
    expect(checked).toBeGreaterThan(30);
    expect(problems).toEqual([]);
  }, 600_000);

  it('the brief card says the labels back the same way', () => {
    const facts = datasetFacts(ws);
    for (const request of ['worldwide gross by major genre since 2000', 'IMDB ratings by MPAA rating, year by year', 'US gross of Drama against Comedy']) {
      const brief = readRequest(request, facts, { now: NOW, locale: 'en-IE' });
      const { plan, defaults } = planFor(brief, facts.dataset, facts.coverage, []);
      const card = buildCard(brief, plan, { dataset: facts.dataset, coverage: facts.coverage, locale: 'en-IE', defaults });
      const text = cardText(card);
      expect(titleCaseSlips(text, labels())).toEqual([]);
      expect(placeholderIn(text)).toBeNull();
      // The acronyms survive: a label's "US" or "IMDB" is never lowered.
      expect(text).not.toMatch(/\bus gross\b|\bimdb\b|\bmpaa\b/);
    }
  });
});
