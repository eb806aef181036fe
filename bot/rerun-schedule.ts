// A finished thread's scheduled reruns: what was asked (a cron expression read by
// bot/reading/schedule.ts), in which time zone, and when the next one is due. Kept in the thread's
// state, so every state store persists it and a replica that takes the thread's lock sees the
// due time another has already moved on (each due time runs once).
import { CronExpressionParser } from 'cron-parser';

export interface RerunSchedule {
  /** Five fields: minute hour day-of-month month day-of-week. */
  cron: string;
  /** As said back to the requester: "every Monday at 09:00". */
  words: string;
  /** IANA name the cron expression is read in. */
  timeZone: string;
  /** The next due time (ISO instant). */
  nextDue: string;
}

/**
 * The first due time strictly after `after`. cron-parser (already in the tree through pg-boss)
 * does the calendar and time-zone arithmetic, summer time included.
 */
export function nextDueAfter(cron: string, timeZone: string, after: Date): Date {
  return CronExpressionParser.parse(cron, { currentDate: after, tz: timeZone }).next().toDate();
}

/** Whether a thread's schedule is due at `now`. */
export function isDue(schedule: RerunSchedule | undefined, now: Date): schedule is RerunSchedule {
  return !!schedule && Date.parse(schedule.nextDue) <= now.getTime();
}
