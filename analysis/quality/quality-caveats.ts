// Chooses the data-quality caveats an answer carries from the report: missing values and
// negative amounts only in the columns the answer used; repeated keys always, since a repeated
// row inflates every count and sum; stale data when the latest date is older than allowed.
import { finestGrain } from '../grains.js';
import { addDays, nextPeriod, parseIsoDate, periodStart, toIsoDate } from '../periods.js';
import type { StampGranularity } from '../stamps.js';
import type { Caveat } from '../types.js';
import type { QualityReport } from './quality-checks.js';

const DAY_MS = 86_400_000;

export interface QualityCaveatOptions {
  /** The moment of the run; only its UTC calendar date is used. */
  now: Date;
  /** Data whose latest date is more than this many days before `now` is flagged as stale. */
  staleAfterDays: number;
  /** How often the data is stamped: data stamped monthly is as fresh as the end of its last month, and said as that month. */
  stamps?: StampGranularity;
  /** Names to say instead of a column computed by the config (a breakdown's `expr`): its label. */
  labels?: ReadonlyMap<string, string>;
}

export function qualityCaveats(report: QualityReport, columnsUsed: string[], opts: QualityCaveatOptions): Caveat[] {
  const used = new Set(columnsUsed);
  const caveats: Caveat[] = [];
  for (const n of report.nulls) {
    if (used.has(n.column) && n.count > 0) caveats.push({ code: 'null_share', data: { column: opts.labels?.get(n.column) ?? n.column, share: n.share, count: n.count } });
  }
  const dup = report.duplicateKeys;
  if (dup && dup.extraRows > 0) {
    // A count over a sample of keys is an estimate, and the caveat says so.
    const data: Caveat['data'] = { count: dup.extraRows, column: dup.column, keys: dup.keys };
    if (dup.sampledOneIn > 1) data.sampledOneIn = dup.sampledOneIn;
    caveats.push({ code: 'duplicate_keys', data });
  }
  for (const n of report.negatives) {
    if (used.has(n.column) && n.count > 0) caveats.push({ code: 'negative_amounts', data: { count: n.count, column: n.column } });
  }
  const grain = finestGrain(opts.stamps);
  // The last day the latest stamp stands for: 30 April for a monthly reading stamped 1 April.
  const lastCovered = report.lastDate !== null && grain !== 'day' ? addDays(nextPeriod(periodStart(report.lastDate, grain), grain), -1) : report.lastDate;
  const days = daysSince(lastCovered, opts.now);
  if (report.lastDate !== null && days !== null && days > opts.staleAfterDays) {
    caveats.push({ code: 'stale_data', data: { lastDate: report.lastDate, days, ...(grain !== 'day' ? { grain } : {}) } });
  }
  return caveats;
}

/** Whole calendar days from `lastDate` to the UTC date of `now`; null when either is not a date. */
export function daysSince(lastDate: string | null, now: Date): number | null {
  if (lastDate === null || !Number.isFinite(now.getTime())) return null;
  const last = parseIsoDate(lastDate).getTime();
  const today = parseIsoDate(toIsoDate(now)).getTime();
  if (!Number.isFinite(last)) return null;
  return Math.round((today - last) / DAY_MS);
}
