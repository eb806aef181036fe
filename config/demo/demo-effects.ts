// The Skerrywake Ferries demo (an invented company): every planted effect as a named constant,
// so the SQL in demo-sql.ts reads as "apply effect X" and the numbers live in one place.

export const PERIOD_START = '2022-01-01';
/** Inclusive; June 2025 is deliberately partial. */
export const PERIOD_END = '2025-06-18';

/** Yearly volume level: +8% in 2023, flat 2024, about -5% year over year in 2025. */
export const YEAR_LEVEL: Record<number, number> = { 2022: 1.0, 2023: 1.08, 2024: 1.08, 2025: 1.08 * 0.95 };

/** Month factors, January first: July/August busiest, January/February quietest. */
export const MONTH_FACTOR = [0.55, 0.6, 0.75, 0.9, 1.0, 1.25, 1.6, 1.55, 1.1, 0.85, 0.7, 0.72] as const;

/** Day-of-week factors, Sunday first (DuckDB's dayofweek() numbering). */
export const WEEKDAY_FACTOR = [1.05, 0.95, 0.92, 0.93, 1.0, 1.1, 1.08] as const;

/** Christmas travel: the second half of December gets a small bump. */
export const DECEMBER_BUMP = { fromDay: 16, factor: 1.35 } as const;

/** Each day's weight is scaled by a seeded factor in [1 - n, 1 + n] so daily counts look organic. */
export const DAY_NOISE = 0.08;

/**
 * Booking shares and fare factors (route length). Revenue shares come out at about 71% for the
 * top two routes and 85% for the top three. Dunlin Quay is last so the maintenance gap can cut it off.
 */
export const ROUTES = [
  { name: 'Mainland–Tern Holm', share: 0.35, fareFactor: 1.1 },
  { name: 'Mainland–Saltreach', share: 0.3, fareFactor: 1.0 },
  { name: 'Mainland–Kelpie Sound', share: 0.15, fareFactor: 0.9 },
  { name: 'Tern Holm–Saltreach', share: 0.09, fareFactor: 0.6 },
  { name: 'Mainland–Dunlin Quay', share: 0.11, fareFactor: 0.85 },
] as const;

/** Mainland–Dunlin Quay carries nothing in these months (maintenance). */
export const DUNLIN_GAP = { from: '2023-11-01', to: '2023-12-31' } as const;

/**
 * Fare classes: share of bookings, fare for the first passenger, fare per extra passenger, and
 * the cumulative distribution of passengers 1..6 (vehicle classes carry more people).
 */
export const FARE_CLASSES = [
  { name: 'foot', share: 0.55, first: 14, extra: 14, paxCdf: [0.6, 0.85, 0.93, 0.98, 0.995, 1] },
  { name: 'bicycle', share: 0.1, first: 19, extra: 19, paxCdf: [0.7, 0.95, 1, 1, 1, 1] },
  { name: 'car', share: 0.28, first: 48, extra: 9, paxCdf: [0.25, 0.6, 0.75, 0.92, 0.98, 1] },
  { name: 'van', share: 0.07, first: 78, extra: 9, paxCdf: [0.5, 0.85, 1, 1, 1, 1] },
] as const;

/** Price level by year (fares rise a little each year). */
export const PRICE_LEVEL: Record<number, number> = { 2022: 1.0, 2023: 1.04, 2024: 1.07, 2025: 1.09 };
/** Each fare is scaled by a seeded factor in [1 - n, 1 + n]. */
export const PRICE_NOISE = 0.05;

/** SkerryPass: launch, discount, uptake ramp and the target "bookings per customer" multiple. */
export const PASS = {
  launch: '2023-04-01',
  fareFactor: 0.85,
  shareAtLaunch: 0.08,
  shareFinal: 0.3,
  rampDays: 270,
  refundRate: 0.04,
  // Bookings per customer pool member since launch; a pool member seen at least once books
  // lambda / (1 - e^-lambda) times, so 4.23 against 1.2 gives the 2.5x frequency.
  bookingsPerPoolMember: 4.23,
} as const;
export const OTHERS = { refundRate: 0.06, bookingsPerPoolMemberSinceLaunch: 1.2 } as const;
/** Ordinary refunds: most are full, the rest refund half the fare. */
export const FULL_REFUND_SHARE = 0.75;

/** Storm week: most sailings cancelled, their bookings refunded in full. */
export const STORM = { from: '2024-01-15', to: '2024-01-21', refundRate: 0.85 } as const;

/** Channels: kiosk opens on this date; the app gains share over the period at the phone's and web's expense. */
export const CHANNELS = {
  kioskFrom: '2023-06-01',
  kioskShare: 0.07,
  appShareStart: 0.35,
  appShareEnd: 0.5,
  phoneShareStart: 0.15,
  phoneShareEnd: 0.09,
} as const;

/** Booking lead time: 0..60 days before sailing, skewed to short leads; kiosk sales are same-day. */
export const MAX_LEAD_DAYS = 60;

/** Data-quality warts. */
export const WARTS = {
  nullChannelRate: 0.003,
  // Duplicated whole rows: 40 at 200k rows, growing with the square root of the size.
  duplicatesAt200k: 40,
  minDuplicates: 4,
  negativeFareRows: 8,
} as const;

export const DEFAULT_ROWS = 200_000;
export const DEFAULT_SEED = 20250618;
