// The demo generator plants the effects the scenario promises. These tests use generated demo data
// by design: Skerrywake Ferries is invented, so the generator is the only source of truth. Every
// check is a plain JS reduction over raw rows read back from the file, not the generator's SQL.
import { readFileSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { generateDemo, type DemoResult } from '../../config/demo/generate-demo.js';
import { demoFixture } from '../helpers/demo-fixture.js';

interface Booking {
  booking_id: string;
  booked_at: string;
  sail_date: string;
  route: string;
  fare_class: string;
  channel: string | null;
  passengers: number;
  fare_total: number;
  customer_id: string;
  customer_email: string;
  pass_holder: boolean;
  refunded: boolean;
  refund_amount: number;
}

const ROUTES = [
  'Mainland–Tern Holm',
  'Mainland–Saltreach',
  'Mainland–Kelpie Sound',
  'Mainland–Dunlin Quay',
  'Tern Holm–Saltreach',
];
const LAUNCH = '2023-04-01';
const inStorm = (b: Booking): boolean => b.sail_date >= '2024-01-15' && b.sail_date <= '2024-01-21';
const month = (b: Booking): string => b.sail_date.slice(0, 7);
const year = (b: Booking): number => Number(b.sail_date.slice(0, 4));

let demo: DemoResult;
let rows: Booking[];
const scratch: string[] = [];

async function withDatabase<T>(path: string, use: (sql: (q: string) => Promise<unknown[][]>) => Promise<T>): Promise<T> {
  const db = await DuckDBInstance.create(path, { access_mode: 'READ_ONLY' });
  const con = await db.connect();
  try {
    return await use(async (q) => (await con.runAndReadAll(q)).getRows() as unknown[][]);
  } finally {
    con.closeSync();
    db.closeSync();
  }
}

async function readBookings(path: string): Promise<Booking[]> {
  return withDatabase(path, async (sql) => {
    const raw = await sql(`SELECT booking_id, CAST(booked_at AS VARCHAR), CAST(sail_date AS VARCHAR), route, fare_class,
      channel, passengers, CAST(fare_total AS VARCHAR), customer_id, customer_email, pass_holder, refunded,
      CAST(refund_amount AS VARCHAR) FROM bookings`);
    return raw.map((r) => ({
      booking_id: r[0] as string,
      booked_at: r[1] as string,
      sail_date: r[2] as string,
      route: r[3] as string,
      fare_class: r[4] as string,
      channel: r[5] as string | null,
      passengers: r[6] as number,
      fare_total: Number(r[7]),
      customer_id: r[8] as string,
      customer_email: r[9] as string,
      pass_holder: r[10] as boolean,
      refunded: r[11] as boolean,
      refund_amount: Number(r[12]),
    }));
  });
}

/** A digest of the whole table in a fixed row order: equal digests mean equal content. */
async function contentDigest(path: string): Promise<string> {
  return withDatabase(path, async (sql) => {
    const [[digest]] = (await sql(`SELECT md5(string_agg(line, chr(10) ORDER BY line)) FROM (
      SELECT concat_ws('|', booking_id, booked_at, sail_date, route, fare_class, coalesce(channel, '<null>'), passengers,
        fare_total, customer_id, customer_email, pass_holder, refunded, refund_amount) AS line FROM bookings)`)) as [[string]];
    return digest;
  });
}

function countBy<K>(items: Booking[], key: (b: Booking) => K): Map<K, number> {
  const out = new Map<K, number>();
  for (const b of items) out.set(key(b), (out.get(key(b)) ?? 0) + 1);
  return out;
}

function sumBy<K>(items: Booking[], key: (b: Booking) => K, value: (b: Booking) => number): Map<K, number> {
  const out = new Map<K, number>();
  for (const b of items) out.set(key(b), (out.get(key(b)) ?? 0) + value(b));
  return out;
}

const mean = (xs: number[]): number => xs.reduce((a, b) => a + b, 0) / xs.length;
const rate = (items: Booking[], test: (b: Booking) => boolean): number => items.filter(test).length / items.length;

beforeAll(async () => {
  demo = await demoFixture();
  rows = await readBookings(demo.databasePath);
});

afterAll(async () => {
  await Promise.all(scratch.map((dir) => rm(dir, { recursive: true, force: true })));
});

describe('generateDemo output', () => {
  it('writes the requested number of rows with the scenario columns and period', () => {
    expect(demo.rows).toBe(200_000);
    expect(rows).toHaveLength(200_000);
    const dates = rows.map((b) => b.sail_date).sort();
    expect(dates[0]).toBe('2022-01-01');
    expect(dates[dates.length - 1]).toBe('2025-06-18');
    expect(new Set(rows.map((b) => b.route))).toEqual(new Set(ROUTES));
    expect(new Set(rows.map((b) => b.fare_class))).toEqual(new Set(['foot', 'bicycle', 'car', 'van']));
    expect(new Set(rows.map((b) => b.channel))).toEqual(new Set(['app', 'web', 'phone', 'kiosk', null]));
  });

  it('declares the column types of the scenario', async () => {
    const types = await withDatabase(demo.databasePath, (sql) =>
      sql(`SELECT column_name, data_type FROM information_schema.columns WHERE table_name = 'bookings' ORDER BY ordinal_position`),
    );
    expect(types).toEqual([
      ['booking_id', 'VARCHAR'],
      ['booked_at', 'TIMESTAMP'],
      ['sail_date', 'DATE'],
      ['route', 'VARCHAR'],
      ['fare_class', 'VARCHAR'],
      ['channel', 'VARCHAR'],
      ['passengers', 'INTEGER'],
      ['fare_total', 'DECIMAL(10,2)'],
      ['customer_id', 'VARCHAR'],
      ['customer_email', 'VARCHAR'],
      ['pass_holder', 'BOOLEAN'],
      ['refunded', 'BOOLEAN'],
      ['refund_amount', 'DECIMAL(10,2)'],
    ]);
  });

  it('copies the example config, whose columns all exist in the table', () => {
    const copied = readFileSync(demo.configPath, 'utf8');
    expect(copied).toBe(readFileSync(new URL('../../config/examples/skerrywake.yaml', import.meta.url), 'utf8'));
    const dataset = (parse(copied) as { datasets: { source: { path: string }; dimensions: { column: string }[] }[] }).datasets[0]!;
    expect(dataset.source.path).toBe('skerrywake.duckdb');
    const columns = new Set(Object.keys(rows[0]!));
    for (const d of dataset.dimensions) expect(columns).toContain(d.column);
  });

  it('keeps the other columns plausible', () => {
    expect(rows.every((b) => b.passengers >= 1 && b.passengers <= 6)).toBe(true);
    expect(rows.every((b) => /^C\d{7}$/.test(b.customer_id))).toBe(true);
    expect(rows.every((b) => b.customer_email === `${b.customer_id.toLowerCase()}@example.invalid`)).toBe(true);
    expect(rows.every((b) => b.refunded || b.refund_amount === 0)).toBe(true);
    expect(rows.every((b) => !b.refunded || (b.refund_amount > 0 && b.refund_amount <= b.fare_total))).toBe(true);
    const leadDays = rows.map((b) => (Date.parse(b.sail_date) - Date.parse(b.booked_at.slice(0, 10))) / 86_400_000);
    expect(leadDays.reduce((a, b) => Math.min(a, b))).toBe(0);
    expect(leadDays.reduce((a, b) => Math.max(a, b))).toBe(60);
    const fareOf = (cls: string): number =>
      mean(rows.filter((b) => b.fare_class === cls && b.passengers === 1 && b.fare_total > 0).map((b) => b.fare_total));
    expect(fareOf('foot')).toBeLessThan(fareOf('bicycle'));
    expect(fareOf('bicycle')).toBeLessThan(fareOf('car'));
    expect(fareOf('car')).toBeLessThan(fareOf('van'));
  });
});

describe('planted effects', () => {
  it('1. seasonality: July/August busiest, January/February quietest each full year; late-December bump', () => {
    for (const y of [2022, 2023, 2024]) {
      const byMonth = [...countBy(rows.filter((b) => year(b) === y), (b) => Number(b.sail_date.slice(5, 7)))];
      byMonth.sort((a, b) => b[1] - a[1]);
      expect(new Set(byMonth.slice(0, 2).map(([m]) => m))).toEqual(new Set([7, 8]));
      expect(new Set(byMonth.slice(-2).map(([m]) => m))).toEqual(new Set([1, 2]));
    }
    const december = rows.filter((b) => b.sail_date.slice(5, 7) === '12');
    const perDay = (half: Booking[]): number => half.length / new Set(half.map((b) => b.sail_date)).size;
    const firstHalf = perDay(december.filter((b) => Number(b.sail_date.slice(8)) <= 15));
    const secondHalf = perDay(december.filter((b) => Number(b.sail_date.slice(8)) >= 16));
    expect(secondHalf / firstHalf).toBeGreaterThan(1.15);
  });

  it('2. trend: +8% in 2023, flat 2024, about -5% in the first half of 2025', () => {
    const byYear = countBy(rows, year);
    expect(Math.abs(byYear.get(2023)! / byYear.get(2022)! - 1.08)).toBeLessThan(0.02);
    expect(Math.abs(byYear.get(2024)! / byYear.get(2023)! - 1)).toBeLessThan(0.03);
    // Same calendar span in both years: data ends 18 June 2025.
    const span = (y: number): number => rows.filter((b) => year(b) === y && b.sail_date.slice(5) <= '06-18').length;
    expect(Math.abs(span(2025) / span(2024) - 0.95)).toBeLessThan(0.02);
  });

  it('3. SkerryPass: from launch only, ~15% cheaper, ~2.5x as frequent, fewer refunds', () => {
    expect(rows.some((b) => b.pass_holder && b.sail_date < LAUNCH)).toBe(false);
    const since = rows.filter((b) => b.sail_date >= LAUNCH);
    const pass = since.filter((b) => b.pass_holder);
    const others = since.filter((b) => !b.pass_holder);
    expect(pass.length / since.length).toBeGreaterThan(0.15);

    const fareRatio = mean(pass.map((b) => b.fare_total)) / mean(others.map((b) => b.fare_total));
    expect(fareRatio).toBeGreaterThan(0.82);
    expect(fareRatio).toBeLessThan(0.88);

    const perCustomer = (group: Booking[]): number => group.length / new Set(group.map((b) => b.customer_id)).size;
    const frequency = perCustomer(pass) / perCustomer(others);
    expect(frequency).toBeGreaterThan(2.2);
    expect(frequency).toBeLessThan(2.8);

    const calm = (group: Booking[]): Booking[] => group.filter((b) => !inStorm(b));
    expect(Math.abs(rate(calm(pass), (b) => b.refunded) - 0.04)).toBeLessThan(0.006);
    expect(Math.abs(rate(calm(others), (b) => b.refunded) - 0.06)).toBeLessThan(0.006);
  });

  it('4. concentration: two routes ~70% of revenue, three over 80%', () => {
    const revenue = [...sumBy(rows, (b) => b.route, (b) => b.fare_total).values()].sort((a, b) => b - a);
    const total = revenue.reduce((a, b) => a + b, 0);
    const top2 = (revenue[0]! + revenue[1]!) / total;
    const top3 = top2 + revenue[2]! / total;
    expect(top2).toBeGreaterThan(0.66);
    expect(top2).toBeLessThan(0.75);
    expect(top3).toBeGreaterThan(0.8);
  });

  it('5. storm week: most bookings refunded in full; January 2024 refund rate spikes', () => {
    const storm = rows.filter(inStorm);
    expect(rate(storm, (b) => b.refunded)).toBeGreaterThan(0.75);
    expect(storm.filter((b) => b.refunded).every((b) => b.refund_amount === b.fare_total)).toBe(true);
    const refunds = countBy(rows.filter((b) => b.refunded), month);
    const refundRate = new Map<string, number>();
    for (const [m, n] of countBy(rows, month)) refundRate.set(m, (refunds.get(m) ?? 0) / n);
    const january = refundRate.get('2024-01')!;
    const otherMonths = [...refundRate].filter(([m]) => m !== '2024-01').map(([, r]) => r);
    expect(january).toBeGreaterThan(3 * Math.max(...otherMonths));
  });

  it('6. maintenance: Mainland–Dunlin Quay carries nothing in November and December 2023', () => {
    const dunlin = countBy(rows.filter((b) => b.route === 'Mainland–Dunlin Quay'), month);
    expect(dunlin.get('2023-11')).toBeUndefined();
    expect(dunlin.get('2023-12')).toBeUndefined();
    expect(dunlin.get('2023-10')).toBeGreaterThan(100);
    expect(dunlin.get('2024-01')).toBeGreaterThan(100);
  });

  it('7. the kiosk channel starts in June 2023, selling same-day', () => {
    const kiosk = rows.filter((b) => b.channel === 'kiosk');
    expect(kiosk.map(month).sort()[0]).toBe('2023-06');
    expect(kiosk.every((b) => b.booked_at.slice(0, 10) === b.sail_date)).toBe(true);
  });

  it('8. warts: ~0.3% null channel, a few dozen duplicate rows, a handful of negative fares', () => {
    const nullShare = rate(rows, (b) => b.channel === null);
    expect(nullShare).toBeGreaterThan(0.002);
    expect(nullShare).toBeLessThan(0.004);

    const seen = new Map<string, string>();
    let duplicates = 0;
    for (const b of rows) {
      const whole = JSON.stringify(b);
      const first = seen.get(b.booking_id);
      if (first === undefined) seen.set(b.booking_id, whole);
      else {
        duplicates++;
        expect(whole).toBe(first);
      }
    }
    expect(duplicates).toBeGreaterThanOrEqual(24);
    expect(duplicates).toBeLessThanOrEqual(60);

    const negatives = rows.filter((b) => b.fare_total < 0).length;
    expect(negatives).toBeGreaterThanOrEqual(5);
    expect(negatives).toBeLessThanOrEqual(12);
  });
});

describe('determinism', () => {
  it('gives the same content for the same seed and different content for another seed', async () => {
    const again = await mkdtemp(join(tmpdir(), 'threadcount-demo-same-'));
    const other = await mkdtemp(join(tmpdir(), 'threadcount-demo-other-'));
    scratch.push(again, other);
    const [same, different] = await Promise.all([
      generateDemo({ outDir: again, rows: 200_000, seed: 20250618 }),
      generateDemo({ outDir: other, rows: 200_000, seed: 7 }),
    ]);
    const reference = await contentDigest(demo.databasePath);
    expect(await contentDigest(same.databasePath)).toBe(reference);
    expect(await contentDigest(different.databasePath)).not.toBe(reference);
  });

  it('overwrites an existing demo in place', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'threadcount-demo-rerun-'));
    scratch.push(dir);
    await generateDemo({ outDir: dir, rows: 5_000 });
    const second = await generateDemo({ outDir: dir, rows: 6_000 });
    expect(second.rows).toBe(6_000);
    expect(await withDatabase(second.databasePath, (sql) => sql('SELECT count(*) FROM bookings'))).toEqual([[6000n]]);
  });

  it('rejects sizes it cannot honour', async () => {
    await expect(generateDemo({ outDir: tmpdir(), rows: 10 })).rejects.toThrow(/whole number/);
    await expect(generateDemo({ outDir: tmpdir(), rows: 1.5e5 + 0.5 })).rejects.toThrow(/whole number/);
  });
});
