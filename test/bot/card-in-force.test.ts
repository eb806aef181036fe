// The brief card's selects show what is in force, and a correction that was understood is not
// also complained about. On an open dataset the reader was never tuned to: vega-datasets
// iowa-electricity.csv (US EIA net generation in Iowa by source, one row per source per year,
// 2001 to 2017), read through a real DuckDB workspace with the catalog `threadcount init` drafts
// for it (a row count, then net generation). Windows are end-exclusive (docs/reading.md).
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { applyCorrection, planFor } from '../../bot/card-edits.js';
import { buildCard, cardControls } from '../../bot/card.js';
import { readCorrection } from '../../bot/reading/corrections.js';
import { type DatasetFacts, readRequest } from '../../bot/reading/read-request.js';
import { cardChanged } from '../../bot/replies.js';
import { writeIowaConfig } from '../helpers/open-data.js';
import { publicFacts } from '../reading/public-data.js';

const NOW = new Date('2026-12-05T07:00:00Z');
let facts: DatasetFacts;

beforeAll(async () => {
  const config = writeIowaConfig(mkdtempSync(join(tmpdir(), 'tc-card-in-force-')));
  facts = await publicFacts(config);
}, 60_000);

function cardFor(text: string) {
  const brief = readRequest(text, facts, { now: NOW, locale: 'en-IE' });
  const { plan, defaults } = planFor(brief, facts.dataset, facts.coverage, []);
  const card = buildCard(brief, plan, { dataset: facts.dataset, coverage: facts.coverage, locale: 'en-IE', defaults });
  return { brief, plan, card, controls: cardControls(card) };
}

describe('the card\'s selects show the values in force', () => {
  it('a period and a breakdown read from the request are each its select\'s current choice, which sends them back unchanged', () => {
    const { controls } = cardFor('How has net generation moved by source since 2010?');
    const period = controls.find((c) => c.topic === 'period')!;
    const breakdowns = controls.find((c) => c.topic === 'breakdowns')!;
    expect(period.current).toBe('only 2010 to 2017');
    expect(breakdowns.current).toBe('by source');
    for (const c of [period, breakdowns]) expect(c.choices.map((x) => x.value)).toContain(c.current);
    expect(breakdowns.choices.find((x) => x.value === 'by source')!.label).toBe('By source');
    // Sent as typed, each reads back to what the card already holds: 2010 to the end of 2017, by source.
    expect(readCorrection(period.current!, facts, NOW, 'en-IE')).toMatchObject({ window: { window: { start: '2010-01-01', end: '2018-01-01' } }, problems: [], unread: [] });
    expect(readCorrection(breakdowns.current!, facts, NOW, 'en-IE')).toMatchObject({ addDimensions: ['source'], problems: [], unread: [] });
  });

  it('a comparison of two years is shown with its comparison, and no breakdown is shown as "No breakdown"', () => {
    const { controls } = cardFor('net generation in 2016 against 2015');
    const period = controls.find((c) => c.topic === 'period')!;
    expect(period.current).toBe('only 2016 against 2015');
    expect(period.choices[0]!.value).toBe('only 2016 against 2015');
    expect(readCorrection(period.current!, facts, NOW, 'en-IE').window).toEqual({ window: { start: '2016-01-01', end: '2017-01-01' }, compareWindow: { start: '2015-01-01', end: '2016-01-01' } });
    // One source named: net generation across all three would be answered per source (a level each
    // source holds of its own, catalog.ts ownLevelDimension), so the request keeps to one.
    const trend = cardFor('How has nuclear generation moved over time?').controls;
    expect(trend.find((c) => c.topic === 'breakdowns')!.current).toBe('no breakdown');
    expect(trend.find((c) => c.topic === 'period')!.current).toBe('all the data');
  });
});

describe('a correction that was understood', () => {
  it('"by source, only 2010 to 2017" changes the breakdown and the period and complains about no date', () => {
    const { brief, plan } = cardFor('How has net generation moved over time?');
    const words = 'by source, only 2010 to 2017';
    const c = readCorrection(words, facts, NOW, 'en-IE', brief);
    expect(c).toMatchObject({ addDimensions: ['source'], window: { window: { start: '2010-01-01', end: '2018-01-01' } }, problems: [], unread: [] });
    expect(c.deadline).toBeUndefined();
    const edit = applyCorrection(brief, c, plan, [], { dataset: facts.dataset, coverage: facts.coverage, locale: 'en-IE', words });
    expect(edit.problems).toEqual([]);
    const reply = cardChanged(edit.changes, edit.problems);
    expect(reply).toMatch(/source/);
    expect(reply).not.toMatch(/as a date|couldn't read/);
  });

  it('while a "by" that reads as nothing else is still taken for a deadline, and a wrong one is said back', () => {
    expect(readCorrection('by 2026-12-18', facts, NOW, 'en-IE')).toMatchObject({ deadline: '2026-12-18', problems: [] });
    expect(readCorrection('by the blue moon', facts, NOW, 'en-IE').problems.join(' ')).toMatch(/couldn't read "by the blue moon" as a date/);
  });
});
