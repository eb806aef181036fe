// Reading a schedule for a finished thread, and its next due time. Due times are checked against
// calendar facts computed by date-fns (a general-purpose date library, independent of cron-parser
// which computes them) and against the published summer-time rule for the UK (last Sunday of March
// to last Sunday of October, 01:00 UTC; EU Directive 2000/84/EC, kept in UK law).
import { getDate, getDay, getHours, getMinutes, lastDayOfMonth } from 'date-fns';
import { describe, expect, it } from 'vitest';
import { readSchedule } from '../../bot/reading/schedule.js';
import { nextDueAfter } from '../../bot/rerun-schedule.js';

/** A Friday evening, UTC (date-fns confirms the weekday below). */
const FRIDAY_EVENING = new Date('2026-12-04T21:00:00Z');

function set(text: string) {
  const r = readSchedule(text);
  expect(r?.kind, `"${text}" is read as a schedule`).toBe('set');
  return (r as Extract<typeof r, { kind: 'set' }>).schedule;
}

/** date-fns reads local time; the tests run with TZ=UTC, checked here. */
it('runs in UTC, so date-fns reads instants in UTC', () => {
  expect(new Date('2026-12-04T21:00:00Z').getTimezoneOffset()).toBe(0);
  expect(getDay(FRIDAY_EVENING)).toBe(5);
});

describe('reading a schedule', () => {
  it.each([
    ['every Monday at 9', '0 9 * * 1', 'every Monday at 09:00'],
    ['each weekday at 8am', '0 8 * * 1-5', 'every weekday (Monday to Friday) at 08:00'],
    ['monthly on the 1st', '0 9 1 * *', 'on the 1st of every month at 09:00'],
    ['every day at 7:30', '30 7 * * *', 'every day at 07:30'],
    ['Rerun this every Friday at 5pm please', '0 17 * * 5', 'every Friday at 17:00'],
    ['every tuesday and thursday at 10:15', '15 10 * * 2,4', 'every Tuesday and Thursday at 10:15'],
    ['send me this each morning at 7', '0 7 * * *', 'every day at 07:00'],
    ['every week on sunday at noon', '0 12 * * 0', 'every Sunday at 12:00'],
    ['at 9 every Monday', '0 9 * * 1', 'every Monday at 09:00'],
    ['daily at 6.45pm', '45 18 * * *', 'every day at 18:45'],
    ['on the 15th of every month at 08:00', '0 8 15 * *', 'on the 15th of every month at 08:00'],
    ['every month on the first at midnight', '0 0 1 * *', 'on the 1st of every month at 00:00'],
    ['run it again every Wednesday at 12 am', '0 0 * * 3', 'every Wednesday at 00:00'],
  ])('"%s"', (text, cron, words) => {
    const r = readSchedule(text);
    expect(r).toEqual({ kind: 'set', schedule: expect.objectContaining({ cron, words }) });
  });

  it('says what it assumed when the time or the day is left out', () => {
    expect(set('monthly on the 1st').assumed).toEqual(['no time was given: 09:00']);
    expect(set('rerun it weekly at 9').assumed).toEqual(['no day was given: Monday']);
    expect(set('every month at 8').assumed).toEqual(['no day was given: the 1st']);
    expect(set('every Monday at 9').assumed).toEqual([]);
    expect(set('on the 31st of every month at 6')).toMatchObject({ cron: '0 6 L * *', words: 'on the last day of every month at 06:00' });
    expect(set('on the 31st of every month at 6').assumed).toEqual(['not every month has a 31st: the last day of the month']);
  });

  it('reads stopping and asking', () => {
    for (const t of ['stop the schedule', 'cancel the weekly rerun', 'please turn off the reruns', 'unschedule', 'no more reruns', 'stop the daily update']) expect(readSchedule(t), t).toEqual({ kind: 'stop' });
    for (const t of ['when does it run?', "what's the schedule?", 'When is the next rerun?', 'is this scheduled?', 'when will it run']) expect(readSchedule(t), t).toEqual({ kind: 'ask' });
  });

  it.each([
    'daily revenue by route',
    'how many bookings every Monday at 9am',
    'show me every Monday in 2024',
    'monthly bookings since march 2024',
    'compare each weekday',
    'revenue by weekday',
    'when does revenue peak?',
    'stop',
    'cancel',
    'use 2025',
    'what happened on the 1st of every month',
    'every Monday at 25',
    'every day at 13pm',
    'on the 32nd of every month',
    'weekly revenue for 2025 at route level',
    'go',
    'weekly',
    // A follow-up that changes the grain (README), not a schedule.
    'rerun it weekly',
    'same again monthly',
    'monthly',
    'daily',
    'every day',
    'drop the weekly chart',
    'remove the daily breakdown',
  ])('"%s" is not a schedule', (text) => {
    expect(readSchedule(text)).toBeUndefined();
  });
});

describe('the next due time', () => {
  it('every Monday at 9 (UTC), from a Friday evening: the coming Monday', () => {
    const due = nextDueAfter(set('every Monday at 9').cron, 'UTC', FRIDAY_EVENING);
    expect(due.toISOString()).toBe('2026-12-07T09:00:00.000Z');
    expect(getDay(due)).toBe(1);
  });

  it('each weekday at 8am skips the weekend, and a due time is strictly after the last', () => {
    const cron = set('each weekday at 8am').cron;
    const first = nextDueAfter(cron, 'UTC', FRIDAY_EVENING);
    expect(first.toISOString()).toBe('2026-12-07T08:00:00.000Z');
    const second = nextDueAfter(cron, 'UTC', first);
    expect(second.toISOString()).toBe('2026-12-08T08:00:00.000Z');
    // A week of due times: Monday to Friday at 08:00, by date-fns.
    let at = FRIDAY_EVENING;
    const days: number[] = [];
    for (let i = 0; i < 5; i++) {
      at = nextDueAfter(cron, 'UTC', at);
      days.push(getDay(at));
      expect([getHours(at), getMinutes(at)]).toEqual([8, 0]);
    }
    expect(days).toEqual([1, 2, 3, 4, 5]);
  });

  it('monthly on the 1st and every day at 7:30', () => {
    expect(nextDueAfter(set('monthly on the 1st').cron, 'UTC', FRIDAY_EVENING).toISOString()).toBe('2027-01-01T09:00:00.000Z');
    expect(nextDueAfter(set('every day at 7:30').cron, 'UTC', FRIDAY_EVENING).toISOString()).toBe('2026-12-05T07:30:00.000Z');
  });

  it('the last day of each month, February of a common year included', () => {
    const cron = set('on the 31st of every month at 6').cron;
    let at = new Date('2027-01-01T00:00:00Z');
    for (let i = 0; i < 12; i++) {
      at = nextDueAfter(cron, 'UTC', at);
      expect(getDate(at), at.toISOString()).toBe(getDate(lastDayOfMonth(at)));
    }
    expect(nextDueAfter(cron, 'UTC', new Date('2027-02-01T00:00:00Z')).toISOString()).toBe('2027-02-28T06:00:00.000Z');
  });

  it('reads the time in the configured zone, summer time included', () => {
    const cron = set('every Monday at 9').cron;
    // 1 June 2026 is a Monday in British Summer Time (UTC+1): 09:00 there is 08:00 UTC.
    expect(getDay(new Date('2026-06-01T12:00:00Z'))).toBe(1);
    expect(nextDueAfter(cron, 'Europe/London', new Date('2026-06-01T00:00:00Z')).toISOString()).toBe('2026-06-01T08:00:00.000Z');
    // 7 December 2026 is in winter time (UTC+0).
    expect(nextDueAfter(cron, 'Europe/London', FRIDAY_EVENING).toISOString()).toBe('2026-12-07T09:00:00.000Z');
  });
});
