// The verdict said first (issue 17 item 7): which way a yes-or-no request asks, and the answer
// worded against it. The requests are our own, written as a manager would type them.
import { describe, expect, it } from 'vitest';
import { askedDirection, verdictLine, wantsVerdict } from '../../../analysis/captions/verdict-words.js';

describe('askedDirection', () => {
  it.each([
    ['Is revenue up on last year so far this year?', 'up'],
    ['Are bookings growing compared with 2024?', 'up'],
    ['Did this summer beat last summer?', 'better'],
    ['Was March better than February for average delay?', 'better'],
    ['Are we behind last year on passengers?', 'worse'],
    ['Has the refund share got worse since the price change?', 'worse'],
    ['Has the refund share fallen since the price change?', 'down'],
    ['Quick one. Are passengers below last year?', 'down'],
    ['Did car fares drop after March, and which routes drove it?', 'down'],
  ] as const)('%s → %s', (request, expected) => {
    expect(askedDirection(request)).toBe(expected);
  });

  it.each([
    'Is revenue up or down on last year?',
    'How has revenue moved over time?',
    'Revenue by route for 2024, please',
    'Show me whether bookings grew',
  ])('%s → no direction asked', (request) => {
    expect(askedDirection(request)).toBeNull();
  });
});

describe('verdictLine', () => {
  const below = { direction: 'down' as const, higherIsBetter: true, statement: 'revenue is 2.5% below last year so far (January to 18 June)' };
  it('answers yes or no against the direction asked', () => {
    expect(verdictLine('Is revenue up on last year so far?', below)).toBe('No: revenue is 2.5% below last year so far (January to 18 June).');
    expect(verdictLine('Is revenue down on last year so far?', below)).toBe('Yes: revenue is 2.5% below last year so far (January to 18 June).');
    expect(verdictLine('Is revenue up on last year?', { direction: 'level', higherIsBetter: true, statement: 'revenue is level with last year so far (+0.4%, January to 18 June)' })).toBe(
      'No: revenue is level with last year so far (+0.4%, January to 18 June).',
    );
  });

  it('states the finding plainly when no direction was asked', () => {
    expect(verdictLine('How is revenue doing against last year?', below)).toBe('Revenue is 2.5% below last year so far (January to 18 June).');
    expect(wantsVerdict('How is revenue doing against last year?')).toBe(true);
    expect(wantsVerdict('Revenue by route for 2024, please')).toBe(false);
  });
});

describe('verdictLine on a judgement ("better", "worse")', () => {
  // Average delay in minutes: lower is better (the metric's higher_is_better: false). The figures
  // are those of flights-20k.json (vega-datasets), February 9.60 min and March 7.35 min, read
  // independently by a newcomer with DuckDB; only the wording is under test here.
  const delayDown = { direction: 'down' as const, higherIsBetter: false, statement: 'average delay in March 2001 was 23.4% below February 2001' };
  it('answers "better" through the metric\'s direction: a fall in delay is better', () => {
    expect(verdictLine('Was March better than February for average delay?', delayDown)).toBe('Yes: average delay in March 2001 was 23.4% below February 2001.');
    expect(verdictLine('Was March worse than February for average delay?', delayDown)).toBe('No: average delay in March 2001 was 23.4% below February 2001.');
  });
  it('answers "better" as up for a measure where more is better', () => {
    const up = { direction: 'up' as const, higherIsBetter: true, statement: 'bookings in summer 2025 were 4.1% above summer 2024' };
    expect(verdictLine('Did this summer beat last summer?', up)).toMatch(/^Yes: /);
    expect(verdictLine('Did this summer beat last summer?', { ...up, direction: 'down' })).toMatch(/^No: /);
  });
  it('says no yes or no when the measure has no direction set', () => {
    const line = verdictLine('Was March better than February?', { ...delayDown, higherIsBetter: null });
    expect(line).not.toMatch(/^(?:Yes|No):/);
    expect(line).toContain('not set for this measure');
  });
});
