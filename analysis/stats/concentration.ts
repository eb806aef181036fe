// How concentrated a total is across segments: shares, Pareto curve, top-N share and the HHI.

export interface Segment {
  key: string;
  value: number;
}

export interface ParetoRow {
  key: string;
  value: number;
  /** 1-based rank by value, largest first. */
  rank: number;
  /** value / total, in [0, 1]. */
  share: number;
  /** Share of the total held by this segment and all larger ones. */
  cumulativeShare: number;
}

/** Market-concentration bands of the 2010 U.S. DoJ/FTC Horizontal Merger Guidelines, section 5.3. */
export type HhiBand = 'unconcentrated' | 'moderately_concentrated' | 'highly_concentrated';

export type ConcentrationResult =
  | {
      kind: 'ok';
      total: number;
      /** Segments largest first (ties by key), with shares and cumulative shares. */
      pareto: ParetoRow[];
      /** Fewest segments whose combined share reaches `threshold`. */
      countToThreshold: number;
      threshold: number;
      /** Combined share of the `topN` largest segments. */
      topNShare: number;
      topN: number;
      /** Herfindahl–Hirschman index on the 0–10,000 scale. */
      hhi: number;
      band: HhiBand;
      /** HHI above 1,800, the "highly concentrated" line of the 2023 DoJ/FTC Merger Guidelines. */
      highlyConcentrated2023: boolean;
    }
  | { kind: 'non_positive_total'; total: number }
  | { kind: 'negative_values'; total: number; negativeKeys: string[] };

// 2010 Horizontal Merger Guidelines §5.3: below 1,500 unconcentrated, 1,500–2,500 moderately, above 2,500 highly.
const HHI_MODERATE_FROM = 1500;
const HHI_HIGH_ABOVE = 2500;
// 2023 Merger Guidelines: markets with an HHI greater than 1,800 are highly concentrated.
const HHI_HIGH_ABOVE_2023 = 1800;
// Cumulative sums of shares that should reach a threshold exactly may fall short by rounding.
const EPS = 1e-12;

/** Each value's share of the total; null when the total is not positive or any value is negative or non-finite. */
export function sharesOfTotal(values: readonly number[]): number[] | null {
  const total = validTotal(values);
  return total === null ? null : values.map((v) => v / total);
}

/** Segments sorted largest first with share and cumulative share; null when shares are undefined (see sharesOfTotal). */
export function paretoCurve(segments: readonly Segment[]): ParetoRow[] | null {
  if (validTotal(segments.map((s) => s.value)) === null) return null;
  const sorted = [...segments].sort((a, b) => b.value - a.value || (a.key < b.key ? -1 : a.key > b.key ? 1 : 0));
  // Summing in sorted order and dividing running sums by that same total makes the last cumulative share exactly 1.
  let total = 0;
  for (const s of sorted) total += s.value;
  let running = 0;
  return sorted.map((s, i) => {
    running += s.value;
    return { key: s.key, value: s.value, rank: i + 1, share: s.value / total, cumulativeShare: running / total };
  });
}

/** Fewest segments (largest first) whose combined share reaches `threshold` (default 0.8); null when shares are undefined. */
export function countToReachShare(values: readonly number[], threshold = 0.8): number | null {
  if (!(threshold > 0 && threshold <= 1)) throw new RangeError(`threshold must be in (0, 1], got ${threshold}`);
  const pareto = paretoCurve(values.map((value, i) => ({ key: String(i), value })));
  if (pareto === null) return null;
  const row = pareto.find((r) => r.cumulativeShare >= threshold - EPS);
  return row === undefined ? pareto.length : row.rank;
}

/** Combined share of the `n` largest values; null when shares are undefined. */
export function topNShare(values: readonly number[], n: number): number | null {
  if (!(Number.isInteger(n) && n >= 0)) throw new RangeError(`n must be a non-negative integer, got ${n}`);
  const total = validTotal(values);
  if (total === null) return null;
  const top = [...values].sort((a, b) => b - a).slice(0, n);
  return Math.min(1, top.reduce((acc, v) => acc + v, 0) / total);
}

/** Herfindahl–Hirschman index: sum of squared percentage shares, 0–10,000; null when shares are undefined. */
export function herfindahlHirschman(values: readonly number[]): number | null {
  const shares = sharesOfTotal(values);
  if (shares === null) return null;
  return shares.reduce((acc, s) => acc + 100 * s * (100 * s), 0);
}

/** Band of an HHI under the 2010 DoJ/FTC Horizontal Merger Guidelines, section 5.3. */
export function hhiBand(hhi: number): HhiBand {
  if (hhi < HHI_MODERATE_FROM) return 'unconcentrated';
  if (hhi <= HHI_HIGH_ABOVE) return 'moderately_concentrated';
  return 'highly_concentrated';
}

/** All concentration measures of one breakdown, or the reason they are undefined. */
export function concentration(
  segments: readonly Segment[],
  options: { threshold?: number; topN?: number } = {},
): ConcentrationResult {
  const threshold = options.threshold ?? 0.8;
  const topN = options.topN ?? 3;
  const values = segments.map((s) => s.value);
  if (values.some((v) => !Number.isFinite(v))) throw new RangeError('segment values must be finite numbers');
  const total = values.reduce((acc, v) => acc + v, 0);
  const negativeKeys = segments.filter((s) => s.value < 0).map((s) => s.key);
  if (negativeKeys.length > 0) return { kind: 'negative_values', total, negativeKeys };
  if (!(total > 0)) return { kind: 'non_positive_total', total };
  const pareto = paretoCurve(segments)!;
  const hhi = herfindahlHirschman(values)!;
  return {
    kind: 'ok',
    total,
    pareto,
    countToThreshold: countToReachShare(values, threshold)!,
    threshold,
    topNShare: topNShare(values, topN)!,
    topN,
    hhi,
    band: hhiBand(hhi),
    highlyConcentrated2023: hhi > HHI_HIGH_ABOVE_2023,
  };
}

function validTotal(values: readonly number[]): number | null {
  let total = 0;
  for (const v of values) {
    if (!Number.isFinite(v) || v < 0) return null;
    total += v;
  }
  return total > 0 ? total : null;
}
