// Raw booking rows for the performance tests, read back from the demo file with a plain SELECT
// (no grouping, no arithmetic), so the engine's aggregates can be checked against plain JavaScript.
import { DuckDBInstance } from '@duckdb/node-api';

export interface PerfRow {
  booking_id: string;
  sail_date: string;
  route: string | null;
  channel: string | null;
  passengers: number | null;
  fare_total: number | null;
  refunded: boolean | null;
  refund_amount: number | null;
  customer_id: string | null;
  pass_holder: boolean | null;
}

const cache = new Map<string, Promise<PerfRow[]>>();

export function perfRows(databasePath: string): Promise<PerfRow[]> {
  let p = cache.get(databasePath);
  if (!p) cache.set(databasePath, (p = read(databasePath)));
  return p;
}

async function read(path: string): Promise<PerfRow[]> {
  const instance = await DuckDBInstance.create(path, { access_mode: 'READ_ONLY' });
  try {
    const conn = await instance.connect();
    try {
      const reader = await conn.runAndReadAll(
        'SELECT booking_id, sail_date, route, channel, passengers, fare_total, refunded, refund_amount, customer_id, pass_holder FROM bookings',
      );
      // JSON conversion gives DECIMAL as exact text and DATE as 'YYYY-MM-DD'; Number() is the only conversion.
      const n = (v: unknown) => (v === null ? null : Number(v));
      return reader.getRowObjectsJson().map((r) => ({
        booking_id: String(r.booking_id),
        sail_date: String(r.sail_date).slice(0, 10),
        route: r.route === null ? null : String(r.route),
        channel: r.channel === null ? null : String(r.channel),
        passengers: n(r.passengers),
        fare_total: n(r.fare_total),
        refunded: r.refunded === null ? null : Boolean(r.refunded),
        refund_amount: n(r.refund_amount),
        customer_id: r.customer_id === null ? null : String(r.customer_id),
        pass_holder: r.pass_holder === null ? null : Boolean(r.pass_holder),
      }));
    } finally {
      conn.closeSync();
    }
  } finally {
    instance.closeSync();
  }
}

/** Mean and sample variance by two passes. */
export function plainMoments(values: number[]): { n: number; mean: number; variance: number } {
  const n = values.length;
  let sum = 0;
  for (const v of values) sum += v;
  const mean = sum / n;
  let ss = 0;
  for (const v of values) ss += (v - mean) ** 2;
  return { n, mean, variance: n > 1 ? ss / (n - 1) : 0 };
}

/** Linear-interpolation quantile of sorted values (the definition of SQL percentile_cont). */
export function plainQuantile(sorted: number[], p: number): number {
  const pos = p * (sorted.length - 1);
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return sorted[lo]! + (sorted[hi]! - sorted[lo]!) * (pos - lo);
}
