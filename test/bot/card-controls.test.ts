// Clicking and typing are one path: every choice a card control offers is a correction the reader
// reads as a change to that control's own topic, and nothing else. Also the words people type on
// a card, several topics at once. On the demo catalog (invented data); dates checked by hand
// against the calendar rules in docs/reading.md.
import { describe, expect, it } from 'vitest';
import { briefDefaults } from '../../bot/brief-defaults.js';
import { applyCorrection, planFor } from '../../bot/card-edits.js';
import { buildCard, cardControls } from '../../bot/card.js';
import { readRequest } from '../../bot/reading/read-request.js';
import { changesSomething, readCorrection, type Correction } from '../../bot/reading/corrections.js';
import { exampleFacts } from '../helpers/example-facts.js';

const NOW = new Date('2025-06-20T09:00:00Z');
const ds = exampleFacts.dataset;
const coverage = exampleFacts.coverage;
const brief = readRequest('how has revenue moved over time?', exampleFacts, { now: NOW, locale: 'en-IE' });
const { plan } = planFor(brief, ds, coverage, []);
const card = buildCard(brief, plan, { dataset: ds, coverage, locale: 'en-IE', defaults: briefDefaults(brief, ds, coverage) });
const controls = cardControls(card);
const read = (text: string) => readCorrection(text, exampleFacts, NOW, 'en-IE');

/** The topics a correction touches. */
function touched(c: Correction): string[] {
  const out: string[] = [];
  if (c.audience) out.push('audience');
  if (c.deadline) out.push('deadline');
  if (c.grain) out.push('grain');
  if (c.window) out.push('period');
  if (c.addDimensions.length || c.removeDimensions.length || c.clearDimensions) out.push('breakdowns');
  if (c.metrics) out.push('metrics');
  if (c.filters.length || c.clearFilters.length) out.push('filters');
  if (c.drop.length) out.push('drop');
  return out;
}

describe('card controls', () => {
  it('offers a select for audience, grain, period and breakdowns, and a date for the deadline', () => {
    expect(controls.map((c) => [c.topic, c.kind])).toEqual([
      ['audience', 'select'],
      ['deadline', 'date'],
      ['grain', 'select'],
      ['period', 'select'],
      ['breakdowns', 'select'],
    ]);
    // The value in force is one of the choices, so a select can show it.
    for (const c of controls.filter((c) => c.kind === 'select' && c.current)) expect(c.choices.map((x) => x.value)).toContain(c.current);
  });

  for (const control of cardControls(card)) {
    it(`every ${control.topic} choice reads as a change to ${control.topic} only`, () => {
      const sent = control.kind === 'date' ? [control.sends!.replace('{date}', '2025-07-04')] : control.choices.map((c) => c.value);
      for (const value of sent) {
        const c = read(value);
        expect(changesSomething(c), value).toBe(true);
        expect(touched(c), value).toEqual([control.topic]);
        expect(c.unread, value).toEqual([]);
      }
    });
  }

  it('reads several topics typed in one reply', () => {
    const c = read('for leadership, weekly, only 2024, add channel, drop 3');
    expect(touched(c).sort()).toEqual(['audience', 'breakdowns', 'drop', 'grain', 'period']);
    expect(c).toMatchObject({ audience: 'leadership', grain: 'week', addDimensions: ['channel'], drop: [3] });
    // 2024 as a calendar year: 1 January 2024 to 1 January 2025, end exclusive (docs/reading.md).
    expect(c.window).toEqual({ window: { start: '2024-01-01', end: '2025-01-01' } });
  });

  it('says back an impossible date and changes nothing', () => {
    const c = read('deadline 2025-02-30');
    expect(c.deadline).toBeUndefined();
    expect(c.problems.join(' ')).toMatch(/2025-02-30/);
  });

  it('keeps a dropped item out when the plan is rebuilt at another grain', () => {
    const last = plan.items.length;
    const drop = applyCorrection(brief, read(`drop ${last}`), plan, [], { dataset: ds, coverage, locale: 'en-IE', words: `drop ${last}` });
    const weekly = applyCorrection(drop.brief, read('weekly'), planFor(drop.brief, ds, coverage, drop.dropped).plan, drop.dropped, { dataset: ds, coverage, locale: 'en-IE', words: 'weekly' });
    const rebuilt = planFor(weekly.brief, ds, coverage, weekly.dropped).plan;
    expect(rebuilt.items.map((sq) => sq.template)).not.toContain(plan.items[last - 1]!.template);
    expect(rebuilt.items.every((sq) => sq.grain === 'week')).toBe(true);
    expect(rebuilt.items).toHaveLength(planFor(weekly.brief, ds, coverage, []).plan.items.length - 1);
  });
});
