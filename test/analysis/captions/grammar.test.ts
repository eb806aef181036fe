// The small grammar every caption uses. Plurals follow ordinary English usage (any dictionary:
// "species" and "aircraft" are their own plurals; in "phase of flight" the head noun takes the
// plural); the labels are those of vega-datasets' birdstrikes.csv and of our demo.
import { describe, expect, it } from 'vitest';
import { capitalise, firstClause, firstSentence, inPeriod, inSentence, isPluralLabel, labelAtStart, nounFor, pluralNoun, singularNoun, verbFor, withArticle } from '../../../analysis/captions/grammar.js';

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
  // Labels as `threadcount init` drafts them from vega-datasets movies.json and iowa-electricity.csv
  // (Title Case column names), as users write them, and the demo's. Ordinary English usage (any
  // style guide): an ordinary word is lower case mid-sentence; an acronym or a name with inner
  // capitals keeps its case, even at a sentence's start ("pH", "iPhone").
  it.each([
    // label, mid-sentence, at a sentence's start
    ['Worldwide Gross', 'worldwide gross', 'Worldwide gross'],
    ['Major Genre', 'major genre', 'Major genre'],
    ['Net Generation', 'net generation', 'Net generation'],
    ['US Gross', 'US gross', 'US gross'],
    ['US DVD Sales', 'US DVD sales', 'US DVD sales'],
    ['IMDB Rating', 'IMDB rating', 'IMDB rating'],
    ['MPAA Rating', 'MPAA rating', 'MPAA rating'],
    ['Rotten Tomatoes Rating', 'rotten tomatoes rating', 'Rotten tomatoes rating'],
    ['Running Time min', 'running time min', 'Running time min'],
    ['Films released', 'films released', 'Films released'],
    ['CO2', 'CO2', 'CO2'],
    ['CO2 Emissions', 'CO2 emissions', 'CO2 emissions'],
    ['pH', 'pH', 'pH'],
    ['Water pH', 'water pH', 'Water pH'],
    ['iPhone Sales', 'iPhone sales', 'iPhone sales'],
    ['SkerryPass holders', 'SkerryPass holders', 'SkerryPass holders'],
    ['Average delay', 'average delay', 'Average delay'],
    ['Revenue (EUR)', 'revenue (EUR)', 'Revenue (EUR)'],
    ['First-payment revenue', 'first-payment revenue', 'First-payment revenue'],
    ['Route A', 'route A', 'Route A'],
    ["Director's Cut", "director's cut", "Director's cut"],
    ['', '', ''],
  ])('%s → "%s", at the start "%s"', (label, mid, start) => {
    expect(inSentence(label)).toBe(mid);
    expect(labelAtStart(label)).toBe(start);
  });
  it('capitalises a sentence, but not a name with inner capitals', () => {
    expect(capitalise('revenue rose')).toBe('Revenue rose');
    expect(capitalise('iPhone sales rose')).toBe('iPhone sales rose');
    expect(capitalise('eBay had the largest share')).toBe('eBay had the largest share');
  });
  it('counts a plural label one at a time', () => {
    expect(isPluralLabel('Films released')).toBe(true);
    expect(isPluralLabel('Tickets sold per day')).toBe(true);
    expect(isPluralLabel('Status')).toBe(false);
    expect(isPluralLabel('US Gross')).toBe(false);
    expect(singularNoun('films released')).toBe('film released');
    expect(singularNoun('fare classes')).toBe('fare class');
    expect(singularNoun('categories')).toBe('category');
    expect(singularNoun('weekday visits per site')).toBe('weekday visit per site');
    expect(singularNoun('wildlife species')).toBe('wildlife species');
    expect(singularNoun('revenue')).toBe('revenue');
    expect(nounFor(1, singularNoun('films released'), 'films released')).toBe('film released');
    expect(nounFor(3, singularNoun('films released'), 'films released')).toBe('films released');
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

describe('withArticle', () => {
  // Common English usage (any style guide): "an" before a vowel sound, "a" before a consonant sound.
  it.each([
    ['origin airport', 'an origin airport'],
    ['route', 'a route'],
    ['hour', 'an hour'],
    ['unit', 'a unit'],
    ['user segment', 'a user segment'],
    ['umbrella brand', 'an umbrella brand'],
    ['European market', 'a European market'],
    ['one-off order', 'a one-off order'],
  ])('%s', (phrase, want) => {
    expect(withArticle(phrase)).toBe(want);
  });
});
