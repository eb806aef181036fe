// "The same numbers": every figure the plan's answers rest on, as flat keys, so our CSVs and each
// peer's output can be compared one by one. Keys:
//   month:YYYY-MM:revenue|rows          monthly revenue and bookings over the whole data
//   year:YYYY:revenue, ytd:YYYY:revenue yearly revenue, and revenue up to the data's last day-of-year
//   summer:current|prior:SEGMENT:revenue|rows   routes and channels, both summers (SEGMENT "(all)" is the total)
//   freq:true|false:n|mean|var|median|p90|total|b0|b1|b2   bookings per customer since the launch (Welch inputs and more)
//   monthpass:YYYY-MM:true|false        bookings by month and pass holding
//   launch:SEGMENT:true|false           bookings since the launch by route and pass holding ("(all)" for both groups)
//   fpp:YYYY-MM, refshare:YYYY-MM       fare per passenger and refunded share of revenue by complete month
//                                       (the period table's figures for those months must be the same)
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';

export type Numbers = Record<string, number>;

export const ALL = '(all)';
export const MISSING = '(missing)';

/** RFC 4180 rows (quotes and doubled quotes), enough for the CSVs the bot writes. */
export function parseCsv(text: string): Record<string, string>[] {
  const rows: string[][] = [];
  let row: string[] = [];
  let field = '';
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i]!;
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') {
        field += '"';
        i++;
      } else if (ch === '"') quoted = false;
      else field += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === ',') {
      row.push(field);
      field = '';
    } else if (ch === '\n' || ch === '\r') {
      if (ch === '\r' && text[i + 1] === '\n') i++;
      row.push(field);
      rows.push(row);
      row = [];
      field = '';
    } else field += ch;
  }
  if (field !== '' || row.length > 0) {
    row.push(field);
    rows.push(row);
  }
  const [head, ...body] = rows;
  if (!head) return [];
  return body.map((r) => Object.fromEntries(head.map((h, i) => [h, r[i] ?? ''])));
}

/** Our numbers, read back from the CSV tables the bot attached to its answers (tables/ in the thread folder). */
export function numbersFromThreadTables(tablesDir: string): Numbers {
  const out: Numbers = {};
  const put = (key: string, value: string | number | undefined) => {
    if (value === undefined || value === '') return;
    const n = Number(value);
    if (!Number.isFinite(n)) throw new Error(`not a number in our tables: ${key} = ${value}`);
    const before = out[key];
    // The same figure reached by two answers must be the same figure.
    if (before !== undefined && !sameNumber(before, n)) throw new Error(`our answers disagree on ${key}: ${before} vs ${n}`);
    out[key] = n;
  };
  const month = (iso: string) => iso.slice(0, 7);
  // The period table repeats the KPI metrics month by month, partial months included: its figures
  // must equal the KPI tables' for the months those hold; it adds no keys of its own.
  const repeated: [string, string | undefined][] = [];
  for (const file of readdirSync(tablesDir).sort()) {
    const rows = parseCsv(readFileSync(join(tablesDir, file), 'utf8'));
    const kind = file.replace(/^\d+-/, '').replace(/\.csv$/, '');
    if (kind === 'series-revenue') {
      for (const r of rows) {
        put(`month:${month(r.period!)}:revenue`, r.revenue);
        put(`month:${month(r.period!)}:rows`, r.row_count);
      }
    } else if (kind === 'growth_series-revenue' || kind === 'growth_summary-revenue') {
      for (const r of rows) {
        if (r.g_period === '0') put(`month:${month(r.period!)}:revenue`, r.revenue);
        else if (r.g_ytd === '1') put(`year:${r.year!.slice(0, 4)}:revenue`, r.revenue);
        else if (r.ytd === 'true') put(`ytd:${r.year!.slice(0, 4)}:revenue`, r.revenue);
      }
    } else if (kind === 'growth_drivers-revenue' || kind === 'growth_share_shift-revenue') {
      for (const r of rows) {
        const segment = r.g_segment === '1' ? ALL : r.segment === '' ? MISSING : r.segment!;
        put(`summer:${r.window_name}:${segment}:revenue`, r.revenue);
        put(`summer:${r.window_name}:${segment}:rows`, r.row_count);
      }
    } else if (kind === 'performance_frequency-bookings') {
      for (const r of rows) {
        const g = r.tc_member;
        for (const [col, name] of [
          ['tc_n', 'n'],
          ['tc_mean', 'mean'],
          ['tc_var', 'var'],
          ['tc_median', 'median'],
          ['tc_p90', 'p90'],
          ['tc_total', 'total'],
          ['tc_bucket_0', 'b0'],
          ['tc_bucket_1', 'b1'],
          ['tc_bucket_2', 'b2'],
        ] as const) {
          put(`freq:${g}:${name}`, r[col]);
        }
      }
    } else if (kind === 'performance_before_after-bookings') {
      for (const r of rows) put(`monthpass:${month(r.period!)}:${r.tc_member}`, r.tc_value);
    } else if (kind === 'performance_by_segment-bookings-segments') {
      for (const r of rows) put(`launch:${r.tc_segment}:${r.tc_member}`, r.tc_value);
    } else if (kind === 'performance_by_segment-bookings-groups' || kind === 'performance_compare-bookings') {
      for (const r of rows) put(`launch:${ALL}:${r.tc_member}`, r.tc_value);
    } else if (kind === 'kpi_snapshot-fare_per_passenger' || kind === 'kpi_context-fare_per_passenger') {
      for (const r of rows) put(`fpp:${month(r.period!)}`, r.fare_per_passenger);
    } else if (kind === 'kpi_snapshot-refunded_revenue_share' || kind === 'kpi_context-refunded_revenue_share') {
      for (const r of rows) put(`refshare:${month(r.period!)}`, r.refunded_revenue_share);
    } else if (kind === 'period_table-fare_per_passenger-refunded_revenue_share-by_period') {
      // Whole periods (g_period 0, g_window 1); the other rows are the window's parts and totals.
      const whole = rows.filter((x) => x.g_period === '0' && x.g_window === '1');
      if (whole.length === 0) throw new Error(`no whole periods in ${file}: its columns have changed`);
      for (const r of whole) {
        repeated.push([`fpp:${month(r.period!)}`, r.fare_per_passenger], [`refshare:${month(r.period!)}`, r.refunded_revenue_share]);
      }
    } else if (kind === 'period_table-fare_per_passenger-refunded_revenue_share') {
      // The period table as shown (rounded, with its changes and marks): its figures are checked above, from its query's result.
    } else {
      throw new Error(`the plan answered with a table the benchmark does not know: ${file}`);
    }
  }
  for (const [key, value] of repeated) if (out[key] !== undefined) put(key, value);
  return out;
}

export const RELATIVE_TOLERANCE = 1e-9;

export function sameNumber(a: number, b: number): boolean {
  return Math.abs(a - b) <= RELATIVE_TOLERANCE * Math.max(Math.abs(a), Math.abs(b)) || Math.abs(a - b) < 1e-12;
}

export interface Agreement {
  /** Keys checked (every key of ours). */
  checked: number;
  /** Keys where the peer differs or has no value, with both values. */
  differences: { key: string; ours: number; peer: number | null }[];
}

export function compareNumbers(ours: Numbers, peer: Numbers): Agreement {
  const differences: Agreement['differences'] = [];
  for (const [key, value] of Object.entries(ours)) {
    const theirs = peer[key];
    if (theirs === undefined || !sameNumber(value, theirs)) differences.push({ key, ours: value, peer: theirs ?? null });
  }
  return { checked: Object.keys(ours).length, differences };
}
