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

  it('reads typed period edits as they say (issue 17 item 14), the verb before them not taken as an unknown word', () => {
    // The example data runs 1 January 2022 to 18 June 2025; windows are end-exclusive (docs/reading.md).
    expect(read('since march 2024')).toMatchObject({ window: { window: { start: '2024-03-01', end: '2025-06-19' } }, unread: [] });
    expect(read('use march 2024 to may 2025')).toMatchObject({ window: { window: { start: '2024-03-01', end: '2025-06-01' } }, unread: [] });
    expect(read('use 2025')).toMatchObject({ window: { window: { start: '2025-01-01', end: '2025-06-19' } }, unread: [] });
    expect(read('switch to weekly instead')).toMatchObject({ grain: 'week', unread: [] });
    expect(read('compare 2025 so far with the same months of 2024')).toMatchObject({
      window: { window: { start: '2025-01-01', end: '2025-06-19' }, compareWindow: { start: '2024-01-01', end: '2024-06-19' } },
      unread: [],
    });
  });

  it('lists as left out only what the plan does not hold, each once (issue 17 item 12), also after an edit', () => {
    // A leadership brief of two questions and two breakdowns: more than its cap of items.
    const big = readRequest('for leadership: how have revenue and bookings moved over time by route and channel, and did this summer beat last summer?', exampleFacts, { now: NOW, locale: 'en-IE' });
    const check = (b: typeof big, dropped: string[]) => {
      const p = planFor(b, ds, coverage, dropped).plan;
      const c = buildCard(b, p, { dataset: ds, coverage, locale: 'en-IE', defaults: briefDefaults(b, ds, coverage) });
      expect(c.leftOut.length).toBeGreaterThan(0);
      expect(new Set(c.leftOut).size).toBe(c.leftOut.length);
      for (const line of c.leftOut) expect(c.plan.join('\n')).not.toContain(line);
      return p;
    };
    const p = check(big, []);
    const edit = applyCorrection(big, read('drop 1, weekly'), p, [], { dataset: ds, coverage, locale: 'en-IE', words: 'drop 1, weekly' });
    check(edit.brief, edit.dropped);
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
