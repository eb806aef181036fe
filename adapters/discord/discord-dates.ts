// Discord has no date picker, so a card's date control becomes a select of a few sensible days:
// today, tomorrow, the end of this week and of next week (Friday, the end of a working week), the
// end of the month, and no deadline; the day in force is kept when it is none of these.
import type { PostControl } from '../../bot/port.js';
import { dateReply, dayInWords } from '../post-view.js';

export interface DayChoice {
  value: string;
  label: string;
  current: boolean;
}

/** The words that clear a deadline, as the card's reader takes them. */
export const NO_DEADLINE = 'no deadline';

/** `today` is an ISO day (the adapter's clock, in the server's time zone). */
export function deadlineChoices(control: PostControl, today: string): DayChoice[] {
  const day = (offset: number) => addDays(today, offset);
  const weekday = new Date(`${today}T12:00:00Z`).getUTCDay(); // 0 Sunday .. 6 Saturday
  const toFriday = (5 - weekday + 7) % 7;
  const named: [string, string][] = [
    ['Today', today],
    ['Tomorrow', day(1)],
    ['End of this week', day(toFriday)],
    ['End of next week', day(toFriday + 7)],
    ['End of the month', endOfMonth(today)],
  ];
  const seen = new Set<string>();
  const choices: DayChoice[] = [];
  for (const [name, iso] of named) {
    if (seen.has(iso)) continue;
    seen.add(iso);
    choices.push({ value: dateReply(control, iso), label: `${name} (${dayInWords(iso)})`, current: control.current === iso });
  }
  const current = control.current && /^\d{4}-\d{2}-\d{2}$/.test(control.current) ? control.current : undefined;
  if (current && !seen.has(current)) choices.unshift({ value: dateReply(control, current), label: dayInWords(current), current: true });
  choices.push({ value: NO_DEADLINE, label: 'No deadline', current: !current });
  return choices;
}

function addDays(iso: string, days: number): string {
  const d = new Date(`${iso}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + days);
  return d.toISOString().slice(0, 10);
}

function endOfMonth(iso: string): string {
  const d = new Date(`${iso}T00:00:00Z`);
  return new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 0)).toISOString().slice(0, 10);
}
