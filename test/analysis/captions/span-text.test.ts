// How a compared span is written in captions (growth-words.ts spanText): the ends of a run say what
// they share once, as the locale writes date ranges (the CLDR interval formats behind Intl's
// formatRange), and a calendar quarter is named as the quarter grain names it.
import { describe, expect, it } from 'vitest';
import { spanText } from '../../../analysis/captions/growth-words.js';

describe('spanText', () => {
  it.each([
    // [start, end (exclusive), expected]
    ['2025-01-01', '2025-06-19', /^1 Jan\s–\s18 Jun 2025$/],
    ['2015-11-16', '2015-11-23', /^16\s?–\s?22 Nov 2015$/],
    ['2024-12-20', '2025-01-06', /^20 Dec 2024\s–\s5 Jan 2025$/],
    ['2024-06-01', '2024-09-01', /^Jun\s–\sAug 2024$/],
    ['2001-01-01', '2001-04-01', /^Q1 2001$/],
    ['2001-02-01', '2001-05-01', /^Feb\s–\sApr 2001$/],
    ['2024-03-01', '2024-04-01', /^Mar 2024$/],
    ['2012-01-01', '2016-01-01', /^2012 to 2015$/],
  ])('%s to %s', (start, end, expected) => {
    expect(spanText({ start, end }, 'en-GB')).toMatch(expected);
  });
});
