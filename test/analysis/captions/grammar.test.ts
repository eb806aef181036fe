// The small grammar every caption uses. Plurals follow ordinary English usage (any dictionary:
// "species" and "aircraft" are their own plurals; in "phase of flight" the head noun takes the
// plural); the labels are those of vega-datasets' birdstrikes.csv and of our demo.
import { describe, expect, it } from 'vitest';
import { firstClause, firstSentence, inPeriod, inSentence, pluralNoun, verbFor } from '../../../analysis/captions/grammar.js';

describe('pluralNoun', () => {
  it.each([
    ['route', 'routes'],
    ['fare class', 'fare classes'],
    ['category', 'categories'],
    ['industry', 'industries'],
    ['phase of flight', 'phases of flight'],
    ['species', 'species'],
    ['wildlife species', 'wildlife species'],
    ['aircraft', 'aircraft'],
    ['aircraft make model', 'aircraft make models'],
    ['origin state', 'origin states'],
  ])('%s → %s', (one, many) => expect(pluralNoun(one)).toBe(many));
});

describe('labels in a sentence', () => {
  it('keeps an acronym or a capitalised brand, lower-cases an ordinary label', () => {
    expect(inSentence('CO2')).toBe('CO2');
    expect(inSentence('SkerryPass holders')).toBe('SkerryPass holders');
    expect(inSentence('Average delay')).toBe('average delay');
  });
  it('agrees the verb with the head noun', () => {
    expect(verbFor('Bookings')).toBe('are');
    expect(verbFor('Average delay')).toBe('is');
    expect(verbFor('Strikes per airport', 'was')).toBe('were');
  });
});

describe('periods and sentences', () => {
  it('gives a day "on", a week "in the", a month "in"', () => {
    expect(inPeriod('2001-02-25', 'day', 'en-IE')).toBe('on 25 February 2001');
    expect(inPeriod('2001-03-05', 'week', 'en-IE')).toBe('in the week commencing 5 March 2001');
    expect(inPeriod('2001-03-01', 'month', 'en-IE')).toBe('in March 2001');
  });
  it('cuts a headline at its first semicolon outside brackets', () => {
    expect(firstClause('Flights peaked in the week commencing 5 February 2001 at 6; its lowest week was 5 March at 0.')).toBe('Flights peaked in the week commencing 5 February 2001 at 6');
    expect(firstClause('Yes: average delay is 23.4% below Feb 2001 (Mar 2001; 7.4 min against 9.6 min).')).toBe('Yes: average delay is 23.4% below Feb 2001 (Mar 2001; 7.4 min against 9.6 min).');
  });
  it('cuts a caption at its first full stop, never at a decimal point', () => {
    expect(firstSentence('CO2 rose by about 1.56 ppm a year. Decade by decade, more.')).toBe('CO2 rose by about 1.56 ppm a year.');
    expect(firstSentence('No full stop here')).toBe('No full stop here');
  });
});
