// Reading requests written the way people write them (Skerrywake demo catalog).
import { describe, expect, it } from 'vitest';
import { readRequest } from '../../bot/intake.js';
import { exampleDataset } from '../helpers/example-config.js';

const now = new Date('2026-12-01T10:00:00Z');
const read = (text: string) => readRequest(text, exampleDataset, { now, timeZone: 'Europe/Dublin' });

describe('intake', () => {
  it('finds a metric by synonym and a trend request', () => {
    const b = read('How have our takings moved over time?');
    expect(b.metrics).toEqual(['revenue']);
    expect(b.kinds).toContain('trend');
  });

  it('tolerates a typo in a metric name', () => {
    expect(read('how has revnue trended month by month').metrics).toEqual(['revenue']);
    expect(read('trend of pasengers please').metrics).toEqual(['passengers']);
  });

  it('prefers the longest catalog phrase', () => {
    expect(read('where does average fare per passenger stand this month?').metrics).toEqual(['fare_per_passenger']);
  });

  it('does not stretch typo tolerance to short words', () => {
    // "care" is one edit from "fare" but short words get no tolerance.
    expect(read('do we care about the trend?').metrics).toEqual([]);
  });

  it('reports a metric-like phrase that matches nothing, with the closest entries', () => {
    const b = read('Show me the trend of churn over time');
    expect(b.metrics).toEqual([]);
    expect(b.unknownTerms[0]?.text).toBe('churn');
    expect(b.unknownTerms[0]?.closest.length).toBeGreaterThan(0);
  });

  it('reads grain, audience and a relative deadline', () => {
    const b = read('For the leadership offsite: monthly revenue trend, needed by the 15th');
    expect(b.grain).toBe('month');
    expect(b.audience).toBe('leadership');
    expect(b.deadline).toBe('2026-12-15');
  });

  it('reads "asap" as today in the dataset time zone', () => {
    expect(read('revenue trend asap').deadline).toBe('2026-12-01');
  });

  it('finds several kinds in the demo request', () => {
    const b = read(
      'Ops review is on the 15th. Could the data team tell us whether this summer beat last summer, which routes and booking channels drove the difference, whether SkerryPass holders really travel more often than other customers since it launched, and where average fare per passenger and the share of revenue we refunded stand for the last full month?',
    );
    expect(b.kinds).toEqual(expect.arrayContaining(['growth', 'performance', 'kpi']));
    expect(b.metrics).toEqual(expect.arrayContaining(['fare_per_passenger', 'refunded_revenue_share']));
    expect(b.dimensions).toEqual(expect.arrayContaining(['route', 'channel']));
    expect(b.comparisonGroup).toBe('skerrypass');
    expect(b.deadline).toBe('2026-12-15');
  });

  it('never offers personal data as a dimension', () => {
    expect(read('revenue by customer email').dimensions).not.toContain('customer_email');
  });
});
