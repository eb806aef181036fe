// Calendar phrases in a request ("this summer", "last full month", "since it launched") read
// against the data's own coverage: "this summer" means the latest summer the data covers in
// full, and the reply says which one that was.
import type { Coverage } from '../analysis/coverage.js';
import { addDays, addMonths, periodStart } from '../analysis/periods.js';
import type { DateWindow } from '../analysis/types.js';

export interface PeriodPhrase {
  window: DateWindow;
  /** What the phrase was read as, said back to the requester. */
  reading: string;
  /** For "this X vs last X" questions: the earlier window. */
  compareTo?: DateWindow;
}

// Meteorological summer (June to August) in the northern hemisphere: common practice.
const SEASONS: Record<string, [number, number]> = { spring: [3, 6], summer: [6, 9], autumn: [9, 12], fall: [9, 12], winter: [12, 15] };

export function readPeriodPhrase(text: string, coverage: Coverage, launchDate?: string): PeriodPhrase | undefined {
  if (!coverage.lastDate || !coverage.firstDate) return undefined;
  const dataEnd = addDays(coverage.lastDate, 1);
  const t = text.toLowerCase();

  const season = /\b(this|last|latest)\s+(spring|summer|autumn|fall|winter)\b/.exec(t);
  if (season) {
    const [startMonth, endMonth] = SEASONS[season[2]!]!;
    // The latest season the data covers in full.
    let year = Number(coverage.lastDate.slice(0, 4));
    const windowOf = (y: number): DateWindow => ({ start: monthStart(y, startMonth), end: monthStart(y, endMonth) });
    while (windowOf(year).end > dataEnd) year--;
    const current = windowOf(year);
    const compared = windowOf(year - 1);
    const comparing = /\b(beat|than|vs\.?|versus|compared)\b/.test(t) || /\blast\s+(spring|summer|autumn|fall|winter)\b/.test(t);
    if (current.start < coverage.firstDate) return undefined;
    return {
      window: current,
      reading: `the ${season[2]} of ${year} (${current.start} to ${addDays(current.end, -1)}), the latest the data covers in full`,
      ...(comparing && compared.start >= periodStart(coverage.firstDate, 'month') ? { compareTo: compared } : {}),
    };
  }
  if (/\b(last full month|latest full month|last complete month|last month|this month)\b/.test(t)) {
    const end = periodStart(dataEnd, 'month');
    return { window: { start: addMonths(end, -1), end }, reading: `the latest complete month in the data (${addMonths(end, -1).slice(0, 7)})` };
  }
  if (launchDate && /\bsince (it|the program|the programme|launch|it launched|the launch)\b/.test(t)) {
    return { window: { start: launchDate, end: dataEnd }, reading: `from the launch on ${launchDate} to the end of the data` };
  }
  return undefined;
}

function monthStart(year: number, month: number): string {
  const y = year + Math.floor((month - 1) / 12);
  const m = ((month - 1) % 12) + 1;
  return `${y}-${String(m).padStart(2, '0')}-01`;
}
