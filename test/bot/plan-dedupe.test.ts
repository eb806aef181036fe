// A request that splits into two questions plans each thing once: the second question's items
// that come to the same as the first's are shared, taking the hint it gave ("top 10"), and the
// card restates the two once. On an open dataset the reader was never tuned to: vega-datasets
// movies.json (3,201 films with release dates, grosses, ratings and genres), read through a real
// DuckDB workspace with a catalog as `threadcount init` drafts it. The requests are those of a
// newcomer's trial, where the plan listed items 1=2, 3=5, 4=6, 7=8 and the summary repeated lines.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { planFor } from '../../bot/card-edits.js';
import { buildCard } from '../../bot/card.js';
import type { Brief } from '../../bot/brief.js';
import { type DatasetFacts, readRequest } from '../../bot/reading/read-request.js';
import { describeSubQuestion } from '../../analysis/sub-questions/describe.js';
import { vegaDataFile } from '../helpers/open-data.js';
import { publicFacts } from '../reading/public-data.js';

const NOW = new Date('2026-12-05T07:00:00Z');
let facts: DatasetFacts;

beforeAll(async () => {
  const config = join(mkdtempSync(join(tmpdir(), 'tc-plan-dedupe-')), 'movies.yaml');
  writeFileSync(config, `version: 1
datasets:
  - name: movies
    label: Movies
    source: { kind: json, paths: [${vegaDataFile('movies.json')}] }
    time_column: { expr: "strptime(\\"Release Date\\", '%b %d %Y')" }
    timezone: UTC
    metrics:
      - { name: rows, label: Films released, count: rows, unit: count, kind: flow }
      - { name: us_gross, label: US Gross, sum: '"US Gross"', unit: number, kind: flow }
      - { name: worldwide_gross, label: Worldwide Gross, sum: '"Worldwide Gross"', unit: number, kind: flow }
    dimensions:
      - { name: mpaa_rating, label: MPAA Rating, column: MPAA Rating }
      - { name: major_genre, label: Major Genre, column: Major Genre }
`);
  facts = await publicFacts(config);
}, 60_000);

function planned(brief: Brief) {
  const { plan, defaults } = planFor(brief, facts.dataset, facts.coverage, []);
  const card = buildCard(brief, plan, { dataset: facts.dataset, coverage: facts.coverage, locale: 'en-IE', defaults });
  const lines = plan.items.map((sq) => describeSubQuestion(sq, facts.dataset, 'en-IE'));
  return { plan, card, lines };
}

const read = (text: string) => readRequest(text, facts, { now: NOW, locale: 'en-IE' });

describe('a request split into two questions plans each thing once', () => {
  it('"… worldwide gross since 2000? top 10 pls": four items, not eight, and one question on the card', () => {
    const brief = read('which distributors earned the most worldwide gross since 2000? top 10 pls');
    // The reader splits it in two: the second carries only the "top 10".
    expect(brief.questions).toHaveLength(2);
    expect(brief.questions[1]!.rankLimit).toBe(10);
    const { plan, card, lines } = planned(brief);
    expect(new Set(lines).size).toBe(lines.length);
    expect(plan.items.map((sq) => sq.template)).toEqual(['series', 'trend_seasonality', 'trend_test', 'trend_summary']);
    // The shared items keep the hint the second question gave, and the first question's period.
    for (const sq of plan.items) expect(sq).toMatchObject({ rankLimit: 10, window: { start: '2000-01-01' } });
    expect(card.questions).toHaveLength(1);
    expect(card.items).toBe(4);
  });

  it('"latest year\'s US gross against the year before … quick KPI snapshot": the snapshot and its context once each, keeping the year compared with', () => {
    const { plan, card, lines } = planned(read("What's the latest year's US gross against the year before and its history? quick KPI snapshot for leadership"));
    expect(new Set(lines).size).toBe(lines.length);
    expect(plan.items.map((sq) => sq.template)).toEqual(['kpi_snapshot', 'kpi_context']);
    expect(plan.items[0]!.compareWindow).toBeDefined();
    expect(card.questions).toHaveLength(1);
  });

  it('keeps two items apart when the hint one question gives changes what the plan says: what drove a change against a named year, and against a year earlier', () => {
    const asked = read('which major genre drove the change in worldwide gross in 2005 against 2003?');
    const q = asked.questions[0]!;
    expect(q).toMatchObject({ kind: 'growth', compareWindow: { start: '2003-01-01', end: '2004-01-01' } });
    const { compareWindow: _c, ...withoutCompare } = q;
    const { plan, lines } = planned({ ...asked, questions: [q, { ...withoutCompare, text: 'and what drove it in 2005?' }] });
    const drivers = plan.items.filter((sq) => sq.template === 'growth_drivers');
    expect(drivers).toHaveLength(2);
    expect(drivers.map((sq) => sq.compareWindow?.start ?? null).sort()).toEqual(['2003-01-01', null].sort());
    expect(new Set(lines).size).toBe(lines.length);
  });
});
