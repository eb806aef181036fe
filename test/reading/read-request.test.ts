// Reading requests written the way people write them, on the demo catalog (invented data). Each
// window below is worked out by hand from the calendar rules in docs/reading.md; weekdays and
// ISO weeks are checked against date-fns, a general-purpose date library.
import { getISOWeek, getISOWeekYear, isFriday, startOfISOWeek } from 'date-fns';
import { describe, expect, it } from 'vitest';
import { readRequest } from '../../bot/reading/read-request.js';
import { briefToJson } from '../../bot/reading/brief-json.js';
import { exampleFacts } from '../helpers/example-facts.js';

// The demo data ends on Wednesday 18 June 2025; requests are read on Friday 20 June 2025 unless said.
const NOW = new Date('2025-06-20T09:00:00Z');
const read = (text: string, now = NOW) => briefToJson(readRequest(text, exampleFacts, { now, locale: 'en-IE' }), 'bookings');
const union = <T>(xs: T[][]) => [...new Set(xs.flat())];

describe('metrics and words', () => {
  it('finds a metric by another name, and forgives a typo, a transposition included', () => {
    expect(union(read('How have our takings moved over time?').questions.map((q) => q.metrics))).toEqual(['revenue']);
    expect(union(read('how has revnue trended month by month').questions.map((q) => q.metrics))).toEqual(['revenue']);
    // "reveune" swaps two letters: one edit in Damerau's measure, two in Levenshtein's.
    expect(union(read("how's reveune looking").questions.map((q) => q.metrics))).toEqual(['revenue']);
  });

  it('reads ordinary business words for the main amount and the row count', () => {
    expect(union(read('how much money did we make in 2024').questions.map((q) => q.metrics))).toEqual(['revenue']);
    expect(union(read('how many did we sell last month').questions.map((q) => q.metrics))).toEqual(['bookings']);
  });

  it('prefers the longest catalog phrase, and reads "X per Y" as the ratio the catalog has', () => {
    expect(union(read('where does average fare per passenger stand this month?').questions.map((q) => q.metrics))).toEqual(['fare_per_passenger']);
    expect(union(read('what is the revenue per booking this year').questions.map((q) => q.metrics))).toEqual(['average_fare']);
  });

  it('does not stretch typo tolerance to short words', () => {
    expect(union(read('do we care about the trend?').questions.map((q) => q.metrics))).toEqual([]);
  });

  it('takes a pronoun as the previous question\'s metric', () => {
    const b = read('Is revenue growing? And how has that moved by channel?');
    expect(b.questions.map((q) => q.metrics)).toEqual([['revenue'], ['revenue']]);
    expect(b.questions[1]!.dimensions).toEqual(['channel']);
  });

  it('reports words it does not know, with the closest catalog entries, and asks', () => {
    const b = read("what's our profit by region");
    expect(b.unknownTerms.map((u) => u.text)).toEqual(['profit', 'region']);
    expect(b.unknownTerms[0]!.closest.length).toBeGreaterThan(0);
    expect(b.toAsk).toEqual(expect.arrayContaining(['metrics', 'dimensions']));
  });

  it('reports a value found nowhere in the data', () => {
    const b = read('bookings in Oslo last month');
    expect(b.unknownTerms.map((u) => u.text)).toEqual(['oslo']);
    expect(b.toAsk).toContain('values');
  });

  it('never offers personal data, and refuses a value that looks like a person', () => {
    const b = read('top customers by email');
    expect(union(b.questions.map((q) => q.dimensions))).not.toContain('customer_email');
    expect(b.personalData).toEqual(['customer_email']);
    expect(read('show their e-mail adresses').personalData).toEqual(['customer_email']);
    expect(read('bookings for someone@example.com').personalValues).toEqual(['someone@example.com']);
    expect(read('bookings for someone@example.com').questions.flatMap((q) => q.filters)).toEqual([]);
  });
});

describe('values of the data', () => {
  it('reads named values as filters, and two set against each other as a contrast', () => {
    const b = read('did phone sales grow faster than kiosk');
    expect(b.questions[0]!.filters).toEqual([{ dimension: 'channel', values: ['phone', 'kiosk'] }]);
    expect(b.questions[0]!.contrast).toEqual({ dimension: 'channel', values: ['phone', 'kiosk'] });
    expect(b.questions[0]!.kind).toBe('growth');
    expect(read('are van bookings up').questions[0]).toMatchObject({ kind: 'growth', metrics: ['bookings'], filters: [{ dimension: 'fare_class', values: ['van'] }] });
  });

  it('reads "excluding" as a filter that leaves the value out', () => {
    expect(read("excluding kiosk, what's the revenue trend?").questions[0]!.filters).toEqual([{ dimension: 'channel', values: ['kiosk'], exclude: true }]);
    // "leaving out" and "not counting" leave it out too (found reading a whole thread on the support-desk data, where it had been read as "only").
    expect(read("leaving out kiosk, what's the revenue trend?").questions[0]!.filters).toEqual([{ dimension: 'channel', values: ['kiosk'], exclude: true }]);
    expect(read("not counting the kiosk, what's the revenue trend?").questions[0]!.filters).toEqual([{ dimension: 'channel', values: ['kiosk'], exclude: true }]);
  });

  it('asks which value a shared part of a name means', () => {
    const b = read("how's the Saltreach route doing this year?");
    expect(b.ambiguousValues[0]!.candidates.map((c) => c.value).sort()).toEqual(['Mainland–Saltreach', 'Tern Holm–Saltreach']);
    expect(b.toAsk).toContain('values');
  });
});

describe('kinds of question', () => {
  it.each([
    ['is the skerrypass worth it', 'performance'],
    ['compare before and after the launch for pass holders revenue', 'performance'],
    ['how do pass holders compare with everyone else on average fare', 'performance'],
    ['how did May go for revenue', 'kpi'],
    ['where does the refund rate stand', 'kpi'],
    ['top 5 routes by revenue last month', 'kpi'],
    ['this year against last - revenue', 'growth'],
    ['how fast is revenue rising per year', 'growth'],
    ['which routes make up most of our takings', 'trend'],
    ['what are the busiest months for bookings', 'trend'],
  ])('%s -> %s', (text, kind) => {
    expect(read(text).questions.map((q) => q.kind)).toContain(kind);
  });

  it('takes a launch date stated in the text', () => {
    const b = read('what was the impact of the new pricing that started 9 Jan 2023 on revenue');
    expect(b.questions[0]).toMatchObject({ kind: 'performance', launchDate: '2023-01-09' });
    expect(b.unknownTerms).toEqual([]);
  });
});

describe('periods', () => {
  it('reads absolute periods of every form', () => {
    expect(read('revenue since March 2023').window).toEqual({ from: '2023-03-01', to: '2025-06-18' });
    expect(read('revenue for Q3 2024').window).toEqual({ from: '2024-07-01', to: '2024-09-30' });
    expect(read('revenue 2024 Q3').window).toEqual({ from: '2024-07-01', to: '2024-09-30' });
    expect(read('bookings between Jan and Mar 2024').window).toEqual({ from: '2024-01-01', to: '2024-03-31' });
    expect(read('revenue from 2023-04 to 2024-03').window).toEqual({ from: '2023-04-01', to: '2024-03-31' });
    expect(read('revenue in the first half of 2024').window).toEqual({ from: '2024-01-01', to: '2024-06-30' });
    expect(read('passengers in summer 2023').window).toEqual({ from: '2023-06-01', to: '2023-08-31' });
  });

  it('reads an ISO week as Monday to Sunday', () => {
    const w = read('revenue in 2024-W03').window!;
    // Checked against date-fns: the Monday of ISO week 3 of 2024.
    expect(w.from).toBe(startOfISOWeek(new Date('2024-01-17T12:00:00Z')).toISOString().slice(0, 10));
    expect([getISOWeekYear(new Date(`${w.from}T12:00:00Z`)), getISOWeek(new Date(`${w.from}T12:00:00Z`))]).toEqual([2024, 3]);
    expect(w.to).toBe('2024-01-21');
  });

  it('counts relative periods back from the data when the data is older than today', () => {
    const later = new Date('2026-12-04T09:00:00Z');
    // The data ends on 18 June 2025: "last month" is May 2025, whenever the request is read.
    expect(read('revenue last month', later).window).toEqual({ from: '2025-05-01', to: '2025-05-31' });
    expect(read('revenue last month', later).anchor.today).toBe('2025-06-19');
    expect(read('bookings for last week').window).toEqual({ from: '2025-06-09', to: '2025-06-15' });
    expect(read('bookings over the last 6 weeks').window).toEqual({ from: '2025-05-05', to: '2025-06-15' });
    expect(read('revenue for the last 3 months').window).toEqual({ from: '2025-03-01', to: '2025-05-31' });
    expect(read('what was revenue last quarter').window).toEqual({ from: '2025-01-01', to: '2025-03-31' });
    expect(read('revenue year to date').window).toEqual({ from: '2025-01-01', to: '2025-06-18' });
    expect(read('what were bookings yesterday').window).toEqual({ from: '2025-06-18', to: '2025-06-18' });
  });

  it('reads a bare month, quarter or season as its latest occurrence that has begun', () => {
    expect(read('revenue for Q3').window).toEqual({ from: '2024-07-01', to: '2024-09-30' });
    expect(read('how did April go for revenue').window).toEqual({ from: '2025-04-01', to: '2025-04-30' });
  });

  it('compares like for like: the same length and calendar position', () => {
    const summer = read('did this summer beat last summer on revenue');
    expect([summer.window, summer.compareWindow]).toEqual([{ from: '2025-06-01', to: '2025-06-18' }, { from: '2024-06-01', to: '2024-06-18' }]);
    const h1 = read('H1 vs H1 last year for passengers');
    expect([h1.window, h1.compareWindow]).toEqual([{ from: '2025-01-01', to: '2025-06-18' }, { from: '2024-01-01', to: '2024-06-18' }]);
    const dec = read('December vs the December before, bookings by route');
    expect([dec.window, dec.compareWindow]).toEqual([{ from: '2024-12-01', to: '2024-12-31' }, { from: '2023-12-01', to: '2023-12-31' }]);
    const years = read('revenue 2024 vs 2023');
    expect([years.window, years.compareWindow]).toEqual([{ from: '2024-01-01', to: '2024-12-31' }, { from: '2023-01-01', to: '2023-12-31' }]);
    const quarters = read("what's the revenue per passenger this quarter vs last quarter");
    expect([quarters.window, quarters.compareWindow]).toEqual([{ from: '2025-04-01', to: '2025-06-18' }, { from: '2025-01-01', to: '2025-03-18' }]);
    const implicit = read('is revenue up on last year?');
    expect([implicit.window, implicit.compareWindow]).toEqual([{ from: '2025-01-01', to: '2025-06-18' }, { from: '2024-01-01', to: '2024-06-18' }]);
  });

  it('reads two periods with no comparison as the stretch covering both', () => {
    const b = read('revenue, bookings and average fare per booking month by month for 2023 and 2024, with the growth on the year before');
    expect(b.window).toEqual({ from: '2023-01-01', to: '2024-12-31' });
    expect(b.compareWindow).toBeNull();
    expect(b.grain).toBe('month');
  });

  it('never reads a period as a deadline', () => {
    expect(read('bookings for last week').deadline).toBeNull();
    expect(read('revenue for the last 3 months please').deadline).toBeNull();
  });
});

describe('rates per decade', () => {
  it('reads "per decade" as the unit of a rate, never as a term of the data', () => {
    const b = read('How fast has revenue risen per year and per decade?');
    expect(b.questions[0]!.rateUnit).toBe('decade');
    expect(b.unknownTerms ?? []).toEqual([]);
  });
});

describe('per day', () => {
  it('compares months of the year per day on a monthly plan, never a daily one', () => {
    for (const text of ['Which months have the most bookings per day?', 'Which month of the year is busiest for bookings per day?']) {
      const b = read(text);
      expect(b.grain).toBe('month');
      expect(b.questions[0]!.perDay).toBe(true);
    }
    expect(read('bookings per day by month').grain).toBe('month');
  });

  it('"per day" alone is an average daily figure at the default grain; daily points only when asked ("each day", "daily") or over a few weeks', () => {
    const alone = read('How many bookings per day?');
    expect(alone.grain).toBeNull();
    expect(alone.questions[0]!.perDay).toBe(true);
    const monthly = read('bookings per day on the Northern route, monthly');
    expect([monthly.grain, monthly.questions[0]!.perDay]).toEqual(['month', true]);
    for (const text of ['bookings each day in May 2025', 'daily bookings in May 2025', 'bookings day by day in May 2025']) {
      const b = read(text);
      expect([text, b.grain, b.questions[0]!.perDay]).toEqual([text, 'day', false]);
    }
    // Over two weeks the daily points are the per-day figures.
    expect(read('bookings per day from 1 to 14 June 2025').grain).toBe('day');
    // "a day of the week" is no per-day figure.
    expect(read('which day of the week has the most bookings?').questions[0]!.perDay).toBe(false);
  });
});

describe('grain, audience, deadline', () => {
  it('reads grain, audience and a relative deadline', () => {
    const b = read('For the leadership offsite: monthly revenue trend, needed by the 15th', new Date('2026-12-01T10:00:00Z'));
    expect(b.grain).toBe('month');
    expect(b.audience).toBe('leadership');
    expect(b.deadline).toBe('2026-12-15');
  });

  it('reads "asap" as today in the dataset time zone, and "by Friday" as the coming Friday', () => {
    expect(read('revenue trend asap', new Date('2026-12-01T10:00:00Z')).deadline).toBe('2026-12-01');
    const friday = read('refund rate trend for the board by Friday please', new Date('2026-12-01T10:00:00Z')).deadline!;
    expect(isFriday(new Date(`${friday}T12:00:00Z`))).toBe(true);
    expect(friday).toBe('2026-12-04');
  });

  it('does not take addressing the data team as an audience, and reads an ops review as managers', () => {
    expect(read('Could the data team tell us how revenue is trending?').audience).toBeNull();
    expect(read('Ops review is on the 15th: how is revenue trending?').audience).toBe('managers');
  });

  it('never sets a deadline in the past', () => {
    const b = read('revenue trend, needed by 2026-11-30', new Date('2026-12-01T10:00:00Z'));
    expect(b.deadline).toBeNull();
  });
});

describe('the demo request', () => {
  const b = read(
    'Ops review is on the 15th. Could the data team tell us whether this summer beat last summer, which routes and booking channels drove the difference, whether SkerryPass holders really travel more often than other customers since it launched, and where average fare per passenger and the share of revenue we refunded stand for the last full month?',
  );
  it('splits into a growth, a performance and a KPI question', () => {
    expect(b.questions.map((q) => q.kind)).toEqual(['growth', 'performance', 'kpi']);
    expect(b.questions[0]!.dimensions).toEqual(['route', 'channel']);
    expect(b.questions[1]).toMatchObject({ comparisonGroup: 'skerrypass', frequency: true, metrics: ['bookings'], launchDate: '2023-04-01' });
    expect(b.questions[2]!.metrics).toEqual(['fare_per_passenger', 'refunded_revenue_share']);
    expect(b.questions[2]!.window).toEqual({ from: '2025-05-01', to: '2025-05-31' });
  });
  it('reads the review date as the deadline and the ops review as the audience', () => {
    expect(b.deadline).toBe('2025-07-15');
    expect(b.audience).toBe('managers');
  });
});
