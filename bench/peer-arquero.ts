// Peer: an analyst in JavaScript with arquero. The bookings are loaded from the DuckDB file into
// JS arrays (timed on its own), then arquero computes the plan's numbers from the rows.
import { DuckDBInstance, type DuckDBValue, type DuckDBVector } from '@duckdb/node-api';
import * as aq from 'arquero';
import { ALL, MISSING, type Numbers } from './numbers.js';
import { PLAN_WINDOWS, type PlanWindows } from './plan.js';

export interface PeerResult {
  loadMs: number;
  computeMs: number;
  totalMs: number;
  rows: number;
  numbers: Numbers;
  maxRssKb: number;
}

/**
 * The columns the plan touches, with the date as epoch milliseconds, decimals as doubles, and the
 * few-valued text columns dictionary-encoded (an ENUM of their values) so each row does not decode
 * its own copy of the text. The values come from the benchmark's own demo file.
 */
function loadSql(routes: string[], channels: string[]): string {
  const enumOf = (values: string[]) => `ENUM(${values.map((v) => `'${v.replaceAll("'", "''")}'`).join(', ')})`;
  return `SELECT CAST(date_diff('day', DATE '1970-01-01', sail_date) AS DOUBLE) * 86400000 AS ms,
  CAST(route AS ${enumOf(routes)}) AS route, CAST(channel AS ${enumOf(channels)}) AS channel, pass_holder, customer_id,
  CAST(fare_total AS DOUBLE) AS fare, passengers AS pax, CAST(refund_amount AS DOUBLE) AS refund
FROM bookings`;
}

interface Columns {
  ms: Float64Array;
  route: (string | null)[];
  channel: (string | null)[];
  pass: (boolean | null)[];
  customer: (string | null)[];
  fare: Float64Array;
  pax: Float64Array;
  refund: Float64Array;
}

async function load(databasePath: string): Promise<Columns> {
  const instance = await DuckDBInstance.create(databasePath, { access_mode: 'READ_ONLY' });
  const connection = await instance.connect();
  try {
    const count = await connection.runAndReadAll('SELECT count(*)::DOUBLE FROM bookings');
    const n = Number(count.getRows()[0]![0]);
    const c: Columns = {
      ms: new Float64Array(n),
      route: new Array<string | null>(n),
      channel: new Array<string | null>(n),
      pass: new Array<boolean | null>(n),
      customer: new Array<string | null>(n),
      fare: new Float64Array(n),
      pax: new Float64Array(n),
      refund: new Float64Array(n),
    };
    // Few distinct values: keep one copy of each string, as a dictionary would.
    const dictionary = new Map<string, string>();
    const intern = (s: string | null) => {
      if (s === null) return null;
      const known = dictionary.get(s);
      if (known !== undefined) return known;
      dictionary.set(s, s);
      return s;
    };
    const distinct = async (column: string) =>
      (await connection.runAndReadAll(`SELECT DISTINCT ${column} FROM bookings WHERE ${column} IS NOT NULL ORDER BY 1`)).getRows().map((r) => String(r[0]));
    const result = await connection.stream(loadSql(await distinct('route'), await distinct('channel')));
    let offset = 0;
    for (;;) {
      const chunk = await result.fetchChunk();
      if (!chunk || chunk.rowCount === 0) break;
      const rows = chunk.rowCount;
      const v = (i: number) => chunk.getColumnVector(i) as DuckDBVector<DuckDBValue>;
      const [ms, route, channel, pass, customer, fare, pax, refund] = [0, 1, 2, 3, 4, 5, 6, 7].map(v) as DuckDBVector<DuckDBValue>[];
      for (let r = 0; r < rows; r++) {
        const at = offset + r;
        c.ms[at] = ms!.getItem(r) as number;
        c.route[at] = intern(route!.getItem(r) as string | null);
        c.channel[at] = intern(channel!.getItem(r) as string | null);
        c.pass[at] = pass!.getItem(r) as boolean | null;
        c.customer[at] = customer!.getItem(r) as string | null;
        c.fare[at] = numberOrNaN(fare!.getItem(r));
        c.pax[at] = numberOrNaN(pax!.getItem(r));
        c.refund[at] = numberOrNaN(refund!.getItem(r));
      }
      offset += rows;
    }
    if (offset !== n) throw new Error(`loaded ${offset} rows of ${n}`);
    return c;
  } finally {
    connection.closeSync();
    instance.closeSync();
  }
}

function numberOrNaN(v: unknown): number {
  if (v === null) throw new Error('a measure column has a missing value; the benchmark loader expects none');
  return v as number;
}

const day = (iso: string) => Date.parse(`${iso}T00:00:00Z`);
const monthKey = (k: number) => `${Math.floor(k / 100)}-${String(k % 100).padStart(2, '0')}`;

type Row = Record<string, unknown>;

export function computeWithArquero(c: Columns, w: PlanWindows): Numbers {
  const out: Numbers = {};
  const t = aq.table(c as unknown as Record<string, ArrayLike<unknown>>).params({
    allFrom: day(w.all[0]),
    allTo: day(w.all[1]),
    sumFrom: day(w.summer[0]),
    sumTo: day(w.summer[1]),
    befFrom: day(w.summerBefore[0]),
    befTo: day(w.summerBefore[1]),
    launchFrom: day(w.sinceLaunch[0]),
    launchTo: day(w.sinceLaunch[1]),
    histTo: day(w.history[1]),
  });

  // Monthly totals, and from them the monthly ratios of the complete months.
  const scoped = t
    .filter('(d, $) => d.ms >= $.allFrom && d.ms < $.allTo')
    .derive({ month: 'd => op.utcyear(d.ms) * 100 + op.utcmonth(d.ms) + 1', year: 'd => op.utcyear(d.ms)', md: 'd => (op.utcmonth(d.ms) + 1) * 100 + op.utcdate(d.ms)' });
  const histTo = new Date(day(w.history[1]));
  const histKey = histTo.getUTCFullYear() * 100 + histTo.getUTCMonth() + 1;
  for (const r of scoped
    .groupby('month')
    .rollup({ revenue: 'd => op.sum(d.fare)', rows: 'd => op.count()', pax: 'd => op.sum(d.pax)', refund: 'd => op.sum(d.refund)' })
    .objects() as Row[]) {
    const m = monthKey(r.month as number);
    out[`month:${m}:revenue`] = r.revenue as number;
    out[`month:${m}:rows`] = r.rows as number;
    if ((r.month as number) < histKey) {
      out[`fpp:${m}`] = (r.revenue as number) / (r.pax as number);
      out[`refshare:${m}`] = (r.refund as number) / (r.revenue as number);
    }
  }

  // Years, and each year up to the day-of-year of the data's last day.
  const last = new Date((scoped.rollup({ last: 'd => op.max(d.ms)' }).objects()[0] as Row).last as number);
  const lastMd = (last.getUTCMonth() + 1) * 100 + last.getUTCDate();
  for (const r of scoped
    .params({ lastMd })
    .groupby('year')
    .rollup({ revenue: 'd => op.sum(d.fare)', ytd: '(d, $) => op.sum(d.md <= $.lastMd ? d.fare : 0)' })
    .objects() as Row[]) {
    out[`year:${r.year}:revenue`] = r.revenue as number;
    out[`ytd:${r.year}:revenue`] = r.ytd as number;
  }

  // The two summers by route and by channel.
  for (const [name, filter] of [
    ['current', '(d, $) => d.ms >= $.sumFrom && d.ms < $.sumTo'],
    ['prior', '(d, $) => d.ms >= $.befFrom && d.ms < $.befTo'],
  ] as const) {
    const summer = t.filter(filter);
    for (const column of ['route', 'channel']) {
      for (const r of summer.groupby(column).rollup({ revenue: 'd => op.sum(d.fare)', rows: 'd => op.count()' }).objects() as Row[]) {
        const segment = r[column] === null || r[column] === undefined ? MISSING : String(r[column]);
        out[`summer:${name}:${segment}:revenue`] = r.revenue as number;
        out[`summer:${name}:${segment}:rows`] = r.rows as number;
      }
    }
    const total = summer.rollup({ revenue: 'd => op.sum(d.fare)', rows: 'd => op.count()' }).objects()[0] as Row;
    out[`summer:${name}:${ALL}:revenue`] = total.revenue as number;
    out[`summer:${name}:${ALL}:rows`] = total.rows as number;
  }

  // Bookings per customer since the launch: a customer is a pass holder if any booking was.
  const [b0, b1, b2] = w.buckets;
  const bucket = (b: [number, number | null] | undefined) =>
    b ? (b[1] === null ? `d => op.sum(d.value >= ${b[0]} ? 1 : 0)` : `d => op.sum(d.value >= ${b[0]} && d.value <= ${b[1]} ? 1 : 0)`) : 'd => 0';
  const sinceLaunch = t.filter('(d, $) => d.ms >= $.launchFrom && d.ms < $.launchTo');
  const perCustomer = sinceLaunch
    .filter('d => d.customer != null')
    .groupby('customer')
    .rollup({ flag: 'd => op.max(d.pass === true ? 1 : 0)', value: 'd => op.count()' })
    .derive({ member: 'd => d.flag === 1' });
  for (const r of perCustomer
    .groupby('member')
    .rollup({
      n: 'd => op.count()',
      mean: 'd => op.mean(d.value)',
      var: 'd => op.variance(d.value)',
      median: 'd => op.median(d.value)',
      p90: 'd => op.quantile(d.value, 0.9)',
      total: 'd => op.sum(d.value)',
      b0: bucket(b0),
      b1: bucket(b1),
      b2: bucket(b2),
    })
    .objects() as Row[]) {
    for (const k of ['n', 'mean', 'var', 'median', 'p90', 'total', 'b0', 'b1', 'b2']) out[`freq:${r.member}:${k}`] = r[k] as number;
  }

  // Bookings by month and pass holding; since the launch by route and pass holding.
  for (const r of scoped.filter('d => d.pass != null').groupby('month', 'pass').count().objects() as Row[]) {
    out[`monthpass:${monthKey(r.month as number)}:${r.pass}`] = r.count as number;
  }
  const launchRows = sinceLaunch.filter('d => d.pass != null');
  for (const r of launchRows.groupby('route', 'pass').count().objects() as Row[]) out[`launch:${r.route}:${r.pass}`] = r.count as number;
  for (const r of launchRows.groupby('pass').count().objects() as Row[]) out[`launch:${ALL}:${r.pass}`] = r.count as number;
  return out;
}

export async function runArquero(args: { databasePath: string }): Promise<PeerResult> {
  const started = performance.now();
  const columns = await load(args.databasePath);
  const loaded = performance.now();
  const numbers = computeWithArquero(columns, PLAN_WINDOWS);
  const done = performance.now();
  return {
    loadMs: loaded - started,
    computeMs: done - loaded,
    totalMs: done - started,
    rows: columns.ms.length,
    numbers,
    maxRssKb: process.resourceUsage().maxRSS,
  };
}
