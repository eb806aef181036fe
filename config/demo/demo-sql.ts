// Builds the SQL that generates the demo `bookings` table inside DuckDB. Every random draw is
// hash(row, seed, stream) mapped to [0,1): random() is not reproducible under parallel execution.
import {
  CHANNELS,
  DAY_NOISE,
  DECEMBER_BUMP,
  DUNLIN_GAP,
  FARE_CLASSES,
  FULL_REFUND_SHARE,
  MAX_LEAD_DAYS,
  MONTH_FACTOR,
  OTHERS,
  PASS,
  PERIOD_END,
  PERIOD_START,
  PRICE_LEVEL,
  PRICE_NOISE,
  ROUTES,
  STORM,
  WARTS,
  WEEKDAY_FACTOR,
  YEAR_LEVEL,
} from './demo-effects.js';

export interface DemoSqlParams {
  /** Rows in the final table, duplicates included. */
  rows: number;
  seed: number;
}

/** Statements to run in order on a connection to an empty database; they create `bookings`. */
export function demoStatements({ rows, seed }: DemoSqlParams): string[] {
  const duplicates = duplicateCount(rows);
  const base = rows - duplicates;
  return [
    // Uniform draw in [0,1) for row i and stream k; 1000000007 is prime, so the modulo spreads evenly.
    `CREATE OR REPLACE TEMP MACRO demo_u(i, k) AS
       CAST(hash(CAST(i AS BIGINT), CAST(${seed} AS BIGINT), CAST(k AS INTEGER)) % 1000000007 AS DOUBLE) / 1000000007.0`,
    // Booking references: i -> (i * 48271 + offset) mod 10^8 is one-to-one because 48271 is prime to 10^8.
    `CREATE OR REPLACE TEMP MACRO demo_booking_id(i) AS
       printf('BK%08d', (CAST(i AS BIGINT) * 48271 + ${Number(BigInt(seed) % 100_000_000n + 100_000_000n) % 100_000_000}) % 100000000)`,
    daysSql(base),
    poolsSql(),
    // range() and unnest() feed one thread; a table scan feeds all of them, so the heavy pass reads this.
    `CREATE TEMP TABLE demo_index AS
       SELECT day AS sail_date, pass_share, unnest(range(lo, hi)) AS i FROM demo_days`,
    createBookingsSql(),
    insertBookingsSql({ base, seed }),
    duplicateRowsSql({ base, duplicates, seed }),
  ];
}

/** Duplicated whole rows: a few dozen at the default size, growing slowly with the size. */
export function duplicateCount(rows: number): number {
  return Math.max(WARTS.minDuplicates, Math.round(WARTS.duplicatesAt200k * Math.sqrt(rows / 200_000)));
}

/**
 * One row per sail date with its share of the rows as a half-open range [lo, hi) of row numbers:
 * inverse-CDF sampling done by allocation, so monthly volumes carry no sampling noise.
 */
function daysSql(base: number): string {
  const years = Object.entries(YEAR_LEVEL)
    .map(([y, level]) => `WHEN ${y} THEN ${dbl(level)}`)
    .join(' ');
  const passShare = `(CASE WHEN day < DATE '${PASS.launch}' THEN 0.0 ELSE ${dbl(PASS.shareAtLaunch)} + ${dbl(PASS.shareFinal - PASS.shareAtLaunch)}
      * least(1.0, date_diff('day', DATE '${PASS.launch}', day) / ${dbl(PASS.rampDays)}) END)`;
  return `CREATE TEMP TABLE demo_days AS
    WITH dates AS (
      SELECT CAST(range AS DATE) AS day
      FROM range(DATE '${PERIOD_START}', DATE '${PERIOD_END}' + INTERVAL 1 DAY, INTERVAL 1 DAY)
    ), weighted AS (
      SELECT day,
        (CASE year(day) ${years} END)
        * ${dblList(MONTH_FACTOR)}[month(day)]
        * ${dblList(WEEKDAY_FACTOR)}[dayofweek(day) + 1]
        * (CASE WHEN month(day) = 12 AND day(day) >= ${DECEMBER_BUMP.fromDay} THEN ${dbl(DECEMBER_BUMP.factor)} ELSE 1.0 END)
        * (${dbl(1 - DAY_NOISE)} + ${dbl(2 * DAY_NOISE)} * demo_u(date_diff('day', DATE '${PERIOD_START}', day), 1))
        AS weight
      FROM dates
    ), cumulative AS (
      SELECT day, sum(weight) OVER (ORDER BY day ROWS UNBOUNDED PRECEDING) AS cum FROM weighted
    ), bounds AS (
      SELECT day, coalesce(lag(cum) OVER (ORDER BY day), 0.0) AS cum_lo, cum AS cum_hi FROM cumulative
    )
    SELECT day,
      CAST(floor(${base} * cum_lo / total) AS BIGINT) AS lo,
      CAST(floor(${base} * cum_hi / total) AS BIGINT) AS hi,
      ${passShare} AS pass_share
    FROM bounds, (SELECT max(cum) AS total FROM cumulative)`;
}

/**
 * Customer pool sizes from the expected bookings, so the frequency multiple holds at any size
 * (without a pass over the rows).
 */
function poolsSql(): string {
  return `CREATE TEMP TABLE demo_pools AS
    SELECT
      CAST(greatest(1, round(sum((hi - lo) * pass_share) / ${dbl(PASS.bookingsPerPoolMember)})) AS BIGINT) AS pass_pool,
      CAST(greatest(1, round(sum((hi - lo) * (1 - pass_share)) FILTER (WHERE day >= DATE '${PASS.launch}')
        / ${dbl(OTHERS.bookingsPerPoolMemberSinceLaunch)})) AS BIGINT) AS other_pool
    FROM demo_days`;
}

function createBookingsSql(): string {
  return `CREATE OR REPLACE TABLE bookings (
    booking_id VARCHAR,
    booked_at TIMESTAMP,
    sail_date DATE,
    route VARCHAR,
    fare_class VARCHAR,
    channel VARCHAR,
    passengers INTEGER,
    fare_total DECIMAL(10,2),
    customer_id VARCHAR,
    customer_email VARCHAR,
    pass_holder BOOLEAN,
    refunded BOOLEAN,
    refund_amount DECIMAL(10,2)
  )`;
}

/**
 * Rows 0..base-1 in one streaming pass (no sorts, no joins besides one-row tables). Negative fares
 * (manual adjustments, never refunded) are one row per equal stratum of row numbers.
 */
function insertBookingsSql({ base, seed }: { base: number; seed: number }): string {
  const routeCum = cumulative(ROUTES.map((r) => r.share));
  const withoutDunlin = routeCum[routeCum.length - 2] ?? 1;
  const classCum = cumulative(FARE_CLASSES.map((c) => c.share));
  const paxByClass = FARE_CLASSES.map(
    (c, n) => `WHEN ${n + 1} THEN ${pick('u_pax', c.paxCdf, c.paxCdf.map((_, p) => String(p + 1)))}`,
  ).join(' ');
  const prices = Object.entries(PRICE_LEVEL)
    .map(([y, level]) => `WHEN ${y} THEN ${dbl(level)}`)
    .join(' ');
  const periodDays = daysBetween(PERIOD_START, PERIOD_END);
  const t = `(date_diff('day', DATE '${PERIOD_START}', sail_date) / ${dbl(periodDays)})`;
  const kiosk = `(CASE WHEN sail_date >= DATE '${CHANNELS.kioskFrom}' THEN ${dbl(CHANNELS.kioskShare)} ELSE 0.0 END)`;
  const app = `((${dbl(CHANNELS.appShareStart)} + ${dbl(CHANNELS.appShareEnd - CHANNELS.appShareStart)} * ${t}) * (1 - ${kiosk}))`;
  const phone = `((${dbl(CHANNELS.phoneShareStart)} + ${dbl(CHANNELS.phoneShareEnd - CHANNELS.phoneShareStart)} * ${t}) * (1 - ${kiosk}))`;
  const negativeStratum = Math.floor(base / WARTS.negativeFareRows);
  const negative = `(i // ${negativeStratum} < ${WARTS.negativeFareRows}
      AND i % ${negativeStratum} = hash(i // ${negativeStratum}, CAST(${seed} AS BIGINT), 40) % ${negativeStratum})`;

  return `INSERT INTO bookings
    WITH draws AS (
      SELECT i, sail_date, pass_share,
        demo_u(i, 10) AS u_route, demo_u(i, 11) AS u_class, demo_u(i, 12) AS u_pax,
        demo_u(i, 13) AS u_price, demo_u(i, 14) AS u_pass, demo_u(i, 15) AS u_null,
        demo_u(i, 16) AS u_channel, demo_u(i, 17) AS u_lead, demo_u(i, 18) AS u_time,
        demo_u(i, 19) AS u_refund, demo_u(i, 20) AS u_full, demo_u(i, 21) AS u_customer
      FROM demo_index
    ), shaped AS (
      SELECT *,
        ${pick(
          `u_route * (CASE WHEN sail_date BETWEEN DATE '${DUNLIN_GAP.from}' AND DATE '${DUNLIN_GAP.to}' THEN ${dbl(withoutDunlin)} ELSE 1.0 END)`,
          routeCum,
          ROUTES.map((_, n) => String(n + 1)),
        )} AS route_no,
        ${pick('u_class', classCum, FARE_CLASSES.map((_, n) => String(n + 1)))} AS class_no,
        u_pass < pass_share AS pass_holder,
        (sail_date BETWEEN DATE '${STORM.from}' AND DATE '${STORM.to}') AS storm,
        CASE
          WHEN u_null < ${dbl(WARTS.nullChannelRate)} THEN NULL
          WHEN u_channel < ${kiosk} THEN 'kiosk'
          WHEN u_channel < ${kiosk} + ${app} THEN 'app'
          WHEN u_channel < ${kiosk} + ${app} + ${phone} THEN 'phone'
          ELSE 'web'
        END AS channel,
        ${negative} AS adjustment
      FROM draws
    ), priced AS (
      SELECT *,
        CAST(CASE class_no ${paxByClass} END AS INTEGER) AS passengers
      FROM shaped
    ), fared AS (
      SELECT *,
        round(
          (${dblList(FARE_CLASSES.map((c) => c.first))}[class_no] + ${dblList(FARE_CLASSES.map((c) => c.extra))}[class_no] * (passengers - 1))
          * ${dblList(ROUTES.map((r) => r.fareFactor))}[route_no]
          * (CASE year(sail_date) ${prices} END)
          * (${dbl(1 - PRICE_NOISE)} + ${dbl(2 * PRICE_NOISE)} * u_price)
          * (CASE WHEN pass_holder THEN ${dbl(PASS.fareFactor)} ELSE 1.0 END),
          2) AS fare,
        NOT adjustment AND u_refund < CASE WHEN storm THEN ${dbl(STORM.refundRate)}
          WHEN pass_holder THEN ${dbl(PASS.refundRate)} ELSE ${dbl(OTHERS.refundRate)} END AS refunded,
        CASE WHEN channel = 'kiosk' THEN 0
             ELSE CAST(floor(${MAX_LEAD_DAYS + 1} * u_lead * u_lead) AS INTEGER) END AS lead_days,
        CASE WHEN pass_holder THEN p.other_pool + 1 + CAST(floor(u_customer * p.pass_pool) AS BIGINT)
             ELSE 1 + CAST(floor(u_customer * p.other_pool) AS BIGINT) END AS customer_no
      FROM priced, demo_pools p
    )
    SELECT
      demo_booking_id(i) AS booking_id,
      CAST(sail_date AS TIMESTAMP) + to_days(-lead_days)
        + to_seconds(CAST(6 * 3600 + floor(u_time * 17 * 3600) AS BIGINT)) AS booked_at,
      sail_date,
      ${stringList(ROUTES.map((r) => r.name))}[route_no] AS route,
      ${stringList(FARE_CLASSES.map((c) => c.name))}[class_no] AS fare_class,
      channel,
      passengers,
      CAST(CASE WHEN adjustment THEN -fare ELSE fare END AS DECIMAL(10,2)) AS fare_total,
      printf('C%07d', customer_no) AS customer_id,
      printf('c%07d@example.invalid', customer_no) AS customer_email,
      pass_holder,
      refunded,
      CAST(CASE WHEN NOT refunded THEN 0.0
                WHEN storm OR u_full < ${dbl(FULL_REFUND_SHARE)} THEN fare
                ELSE round(fare / 2, 2) END AS DECIMAL(10,2)) AS refund_amount
    FROM fared`;
}

/** Whole duplicated rows appended at the end, one per equal stratum of row numbers. */
function duplicateRowsSql({ base, duplicates, seed }: { base: number; duplicates: number; seed: number }): string {
  const size = Math.floor(base / duplicates);
  return `INSERT INTO bookings
    SELECT * FROM bookings
    WHERE booking_id IN (
      SELECT demo_booking_id(s * ${size} + hash(s, CAST(${seed} AS BIGINT), 41) % ${size}) FROM range(${duplicates}) t(s)
    )`;
}

/** CASE expression: the first value whose cumulative bound exceeds u; the last value otherwise. */
function pick(u: string, bounds: readonly number[], values: readonly string[]): string {
  const whens = values
    .slice(0, -1)
    .map((v, n) => `WHEN ${u} < ${dbl(bounds[n] ?? 1)} THEN ${v}`)
    .join(' ');
  return `(CASE ${whens} ELSE ${values[values.length - 1]} END)`;
}

function cumulative(shares: readonly number[]): number[] {
  let sum = 0;
  return shares.map((s) => (sum += s));
}

function daysBetween(from: string, to: string): number {
  return Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000);
}

function dbl(x: number): string {
  if (!Number.isFinite(x)) throw new Error(`not a finite number: ${x}`);
  return `CAST(${x} AS DOUBLE)`;
}

function dblList(xs: readonly number[]): string {
  return `CAST([${xs.map(String).join(', ')}] AS DOUBLE[])`;
}

function stringList(xs: readonly string[]): string {
  return `[${xs.map((x) => `'${x.replaceAll("'", "''")}'`).join(', ')}]`;
}
