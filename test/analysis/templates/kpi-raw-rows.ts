// Raw booking rows read back from the demo file with a plain SELECT (no grouping, no arithmetic),
// so tests can check the engine's aggregates against an independent reduction in JavaScript.
import { DuckDBInstance } from '@duckdb/node-api';

export interface RawBooking {
  booking_id: string | null;
  sail_date: string;
  route: string | null;
  channel: string | null;
  fare_class: string | null;
  passengers: number | null;
  fare_total: number | null;
  refunded: boolean | null;
  refund_amount: number | null;
}

const cache = new Map<string, Promise<RawBooking[]>>();

export function rawBookings(databasePath: string): Promise<RawBooking[]> {
  let p = cache.get(databasePath);
  if (!p) cache.set(databasePath, (p = read(databasePath)));
  return p;
}

async function read(path: string): Promise<RawBooking[]> {
  const instance = await DuckDBInstance.create(path, { access_mode: 'READ_ONLY' });
  try {
    const conn = await instance.connect();
    try {
      const reader = await conn.runAndReadAll(
        'SELECT booking_id, sail_date, route, channel, fare_class, passengers, fare_total, refunded, refund_amount FROM bookings',
      );
      // JSON conversion gives DECIMAL as exact text and DATE as 'YYYY-MM-DD'; Number() here is the only conversion.
      return reader.getRowObjectsJson().map((r) => ({
        booking_id: r.booking_id === null ? null : String(r.booking_id),
        sail_date: String(r.sail_date).slice(0, 10),
        route: r.route === null ? null : String(r.route),
        channel: r.channel === null ? null : String(r.channel),
        fare_class: r.fare_class === null ? null : String(r.fare_class),
        passengers: r.passengers === null ? null : Number(r.passengers),
        fare_total: r.fare_total === null ? null : Number(r.fare_total),
        refunded: r.refunded === null ? null : Boolean(r.refunded),
        refund_amount: r.refund_amount === null ? null : Number(r.refund_amount),
      }));
    } finally {
      conn.closeSync();
    }
  } finally {
    instance.closeSync();
  }
}

/** 'YYYY-MM-01' of a raw sail date. */
export const monthOf = (isoDate: string): string => `${isoDate.slice(0, 7)}-01`;

/** Sums of a month's rows, in plain JavaScript. */
export function monthTotals(rows: RawBooking[], month: string, keep: (r: RawBooking) => boolean = () => true) {
  let revenue = 0;
  let passengers = 0;
  let refunded = 0;
  let refundedRows = 0;
  let n = 0;
  for (const r of rows) {
    if (monthOf(r.sail_date) !== month || !keep(r)) continue;
    n++;
    revenue += r.fare_total ?? 0;
    passengers += r.passengers ?? 0;
    refunded += r.refund_amount ?? 0;
    if (r.refunded === true) refundedRows++;
  }
  return { n, revenue, passengers, refunded, refundedRows };
}
