// The verdict said first (issue 17 item 7): which way a yes-or-no request asks, and the answer
// worded against it. The requests are our own, written as a manager would type them.
import { describe, expect, it } from 'vitest';
import { askedDirection, verdictLine, wantsVerdict } from '../../../analysis/captions/verdict-words.js';

describe('askedDirection', () => {
  it.each([
    ['Is revenue up on last year so far this year?', 'up'],
    ['Are bookings growing compared with 2024?', 'up'],
    ['Did this summer beat last summer?', 'up'],
    ['Has the refund share fallen since the price change?', 'down'],
    ['Quick one. Are we behind last year on passengers?', 'down'],
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
  const below = { direction: 'down' as const, statement: 'revenue is 2.5% below last year so far (January to 18 June)' };
  it('answers yes or no against the direction asked', () => {
    expect(verdictLine('Is revenue up on last year so far?', below)).toBe('No: revenue is 2.5% below last year so far (January to 18 June).');
    expect(verdictLine('Is revenue down on last year so far?', below)).toBe('Yes: revenue is 2.5% below last year so far (January to 18 June).');
    expect(verdictLine('Is revenue up on last year?', { direction: 'level', statement: 'revenue is level with last year so far (+0.4%, January to 18 June)' })).toBe(
      'No: revenue is level with last year so far (+0.4%, January to 18 June).',
    );
  });

  it('states the finding plainly when no direction was asked', () => {
    expect(verdictLine('How is revenue doing against last year?', below)).toBe('Revenue is 2.5% below last year so far (January to 18 June).');
    expect(wantsVerdict('How is revenue doing against last year?')).toBe(true);
    expect(wantsVerdict('Revenue by route for 2024, please')).toBe(false);
  });
});
