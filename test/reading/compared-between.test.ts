// "How X compared between A and B": two periods set against each other, not one stretch from A to
// B. Read on vega-datasets' US unemployment by industry (BLS, January 2000 to February 2010; see
// public-data.ts). A stretch "between A and B" with no word of comparison stays one stretch.
import { describe, expect, it } from 'vitest';
import { readUnemployment } from './public-data.js';

describe('periods compared "between A and B"', () => {
  it.each([
    "Hi team, hope you're well! Could you pull together how the jobless rate in Finance compared between 2008 and 2009 for the leadership deck? Thanks so much",
    'how did the jobless rate in Finance compare between 2008 and 2009?',
    'What is the difference in the unemployment rate in Finance between 2008 and 2009?',
  ])('%s', async (text) => {
    const b = await readUnemployment(text);
    expect(b.questions).toHaveLength(1);
    expect(b.questions[0]).toMatchObject({
      metrics: ['rate'],
      filters: [{ dimension: 'series', values: ['Finance'] }],
      window: { from: '2009-01-01', to: '2009-12-31' },
      compareWindow: { from: '2008-01-01', to: '2008-12-31' },
    });
  });

  it('months of one year: the later is the current, the earlier its base', async () => {
    const b = await readUnemployment('how did the unemployment rate differ between March and June 2009?');
    expect(b.questions[0]).toMatchObject({ window: { from: '2009-06-01', to: '2009-06-30' }, compareWindow: { from: '2009-03-01', to: '2009-03-31' } });
  });

  it('"between 2008 and 2009" with no word of comparison is one stretch', async () => {
    const b = await readUnemployment('Could you show how the number of unemployed rose in manufacturing between 2008 and 2009?');
    expect(b.questions[0]).toMatchObject({ window: { from: '2008-01-01', to: '2009-12-31' }, compareWindow: null });
  });
});
