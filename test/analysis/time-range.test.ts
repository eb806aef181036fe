// A local calendar date's first instant in an IANA zone, the bound a TIMESTAMPTZ column's window
// is read with. Checked against transitions of the IANA tz database (recalled from memory, each
// noted below) and, on PostgreSQL, against the server's own zone data: the instant found has that
// local date there and the microsecond before it does not.
import { describe, expect, it } from 'vitest';
import { firstInstantOfLocalDate, localDateOf, mergeWindows } from '../../analysis/sql/time-range.js';
import { describeWithPostgres, withClient } from '../helpers/postgres.js';

describe('the first instant of a local date', () => {
  it('is local midnight on an ordinary day, in zones east and west of UTC', () => {
    // Recalled from memory: Dublin is on GMT in January, Kolkata on UTC+05:30 all year, New York on UTC-05:00 in January.
    expect(firstInstantOfLocalDate('2024-01-15', 'Europe/Dublin')).toBe('2024-01-15T00:00:00.000Z');
    expect(firstInstantOfLocalDate('2024-01-01', 'Asia/Kolkata')).toBe('2023-12-31T18:30:00.000Z');
    expect(firstInstantOfLocalDate('2024-01-15', 'America/New_York')).toBe('2024-01-15T05:00:00.000Z');
  });

  it('is midnight of the day the clocks change at night (Dublin, 2024: 31 March forward, 27 October back)', () => {
    // Recalled from memory: in 2024 Irish Standard Time (UTC+1) ran from 01:00 UTC on 31 March to 01:00 UTC on 27 October.
    expect(firstInstantOfLocalDate('2024-03-31', 'Europe/Dublin')).toBe('2024-03-31T00:00:00.000Z');
    expect(firstInstantOfLocalDate('2024-04-01', 'Europe/Dublin')).toBe('2024-03-31T23:00:00.000Z');
    expect(firstInstantOfLocalDate('2024-10-27', 'Europe/Dublin')).toBe('2024-10-26T23:00:00.000Z');
    expect(firstInstantOfLocalDate('2024-10-28', 'Europe/Dublin')).toBe('2024-10-28T00:00:00.000Z');
  });

  it('is the first of two midnights where the clocks fall back from 01:00 to 00:00 (Havana, 3 November 2024)', () => {
    // Recalled from memory: Cuba ends daylight time on the first Sunday of November at 01:00 CDT (UTC-4), back to 00:00 CST (UTC-5).
    // Both engines read "2024-11-03 00:00 in Havana" as the later midnight (05:00 UTC), which would drop the first hour.
    expect(firstInstantOfLocalDate('2024-11-03', 'America/Havana')).toBe('2024-11-03T04:00:00.000Z');
  });

  it('is the end of the gap where midnight is skipped (Havana, 10 March 2024; Santiago, 8 September 2024)', () => {
    // Recalled from memory: Cuba starts daylight time on the second Sunday of March at 00:00 CST, jumping to 01:00 CDT;
    // Chile on the first Sunday of September at 24:00 of Saturday (UTC-4), jumping to 01:00 (UTC-3).
    expect(firstInstantOfLocalDate('2024-03-10', 'America/Havana')).toBe('2024-03-10T05:00:00.000Z');
    expect(firstInstantOfLocalDate('2024-09-08', 'America/Santiago')).toBe('2024-09-08T04:00:00.000Z');
  });

  it('is the start of the next date for a date a zone skipped entirely (Samoa, 30 December 2011)', () => {
    // Recalled from memory: Samoa moved from UTC-10 to UTC+14 at the end of 29 December 2011, so 30 December never happened there.
    expect(firstInstantOfLocalDate('2011-12-30', 'Pacific/Apia')).toBe('2011-12-30T10:00:00.000Z');
    expect(firstInstantOfLocalDate('2011-12-31', 'Pacific/Apia')).toBe('2011-12-30T10:00:00.000Z');
  });

  it('has that local date, and the millisecond before it has an earlier one, every day of 2024 in zones with and without daylight time', () => {
    for (const zone of ['Europe/Dublin', 'America/Havana', 'America/Santiago', 'Australia/Lord_Howe', 'Asia/Tehran', 'UTC']) {
      for (let day = Date.UTC(2024, 0, 1); day < Date.UTC(2025, 0, 1); day += 86_400_000) {
        const date = new Date(day).toISOString().slice(0, 10);
        const first = Date.parse(firstInstantOfLocalDate(date, zone));
        expect(localDateOf(first, zone)).toBe(date);
        expect(localDateOf(first - 1, zone) < date).toBe(true);
      }
    }
  });
});

describe('merging windows', () => {
  it('joins touching and overlapping windows, drops empty ones, and keeps date order', () => {
    expect(
      mergeWindows([
        { start: '2025-05-01', end: '2025-06-01' },
        { start: '2024-05-01', end: '2024-06-01' },
        { start: '2025-04-01', end: '2025-05-01' },
        { start: '2024-05-15', end: '2024-05-20' },
        { start: '2023-01-01', end: '2023-01-01' },
      ]),
    ).toEqual([
      { start: '2024-05-01', end: '2024-06-01' },
      { start: '2025-04-01', end: '2025-06-01' },
    ]);
  });
});

describeWithPostgres('the first instant of a local date, against PostgreSQL\'s own zone data', (url) => {
  it('has the date there, and the microsecond before has not, across 2024 in zones that change at midnight', async () => {
    const cases: { date: string; zone: string; first: string }[] = [];
    for (const zone of ['America/Havana', 'America/Santiago', 'Europe/Dublin', 'Asia/Beirut']) {
      for (let day = Date.UTC(2024, 0, 1); day < Date.UTC(2025, 0, 1); day += 86_400_000) {
        const date = new Date(day).toISOString().slice(0, 10);
        cases.push({ date, zone, first: firstInstantOfLocalDate(date, zone) });
      }
    }
    const wrong = await withClient(url, async (c) => {
      const r = await c.query<{ date: string; zone: string }>(
        `SELECT x.date, x.zone
         FROM json_to_recordset($1::json) AS x(date text, zone text, first text)
         WHERE CAST((CAST(x.first AS timestamptz) AT TIME ZONE x.zone) AS date) <> CAST(x.date AS date)
            OR CAST(((CAST(x.first AS timestamptz) - INTERVAL '1 microsecond') AT TIME ZONE x.zone) AS date) >= CAST(x.date AS date)`,
        [JSON.stringify(cases)],
      );
      return r.rows;
    });
    expect(cases.length).toBe(4 * 366);
    expect(wrong).toEqual([]);
  });
});
