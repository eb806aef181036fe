// Segments ranked by their own growth rate ("which channel is growing fastest"), and which of the
// leaders are too close to tell apart. The drivers' order (by size of change) answers "what drove
// it"; this order answers "which grew fastest", where a small segment can lead.
import type { GrowthDriverSegment, GrowthRateRanking } from '../findings/growth.js';
import { CLEAR_LEAD } from '../findings/segments.js';
import type { GrowthRank } from '../types.js';

/**
 * Two standard errors: rates of two segments closer than this (on the log scale, under Poisson
 * counting noise) are called about the same. Common practice for an approximate 95% band.
 */
const NOISE_BAND_SE = 2;

/**
 * A segment whose earlier value (or, for a metric that does not add up, its earlier rows) is under
 * this share of the total's is a small base: its rate swings on little. Common practice, not a test.
 */
export const SMALL_BASE_SHARE = 0.05;

/**
 * The segments with a rate, fastest (or slowest) first, and how many lead together. `counts`: the
 * metric counts events (orders, bookings), so a segment's yearly total carries Poisson noise of
 * about its square root; otherwise only the common-practice lead of CLEAR_LEAD separates two rates.
 */
export function rankByGrowthRate(segments: readonly GrowthDriverSegment[], order: GrowthRank, counts: boolean, points = false): GrowthRateRanking {
  // A rate or share (points) grows by its change in points; anything else by its relative change.
  const rate = (s: GrowthDriverSegment) => (points ? s.change : s.relative);
  const rated = segments.filter((s) => s.relative !== null && Number.isFinite(s.relative) && rate(s) !== null);
  const sign = order === 'fastest' ? -1 : 1;
  const ranked = [...rated].sort((a, b) => sign * (rate(a)! - rate(b)!) || String(a.segment).localeCompare(String(b.segment)));
  // A small base swings on little (1 strike to 6 is +500%): it is listed, flagged, but the answer is
  // named among the segments of some size, unless too few have any.
  const sized = ranked.filter((s) => s.baseShare === undefined || s.baseShare === null || s.baseShare >= SMALL_BASE_SHARE);
  const candidates = sized.length >= 2 ? sized : ranked;
  const first = candidates[0];
  const noise = counts ? 'poisson' : 'lead';
  if (!first) return { order, segments: [], leaders: [], aheadOnSmallBase: [], standsOut: false, noise };
  const close = (s: GrowthDriverSegment) => {
    const lead = Math.abs(rate(first)! - rate(s)!);
    if (lead < CLEAR_LEAD) return true;
    if (!counts) return false;
    const [a, b] = [poissonLogRatioSe(first), poissonLogRatioSe(s)];
    return a !== null && b !== null && Math.abs(Math.log1p(first.relative!) - Math.log1p(s.relative!)) < NOISE_BAND_SE * Math.hypot(a, b);
  };
  let n = 1;
  while (n < candidates.length && close(candidates[n]!)) n++;
  return {
    order,
    segments: ranked.map((s) => s.segment),
    leaders: candidates.slice(0, n).map((s) => s.segment),
    aheadOnSmallBase: ranked.slice(0, ranked.indexOf(first)).map((s) => s.segment),
    standsOut: n < candidates.length,
    noise,
  };
}

/** Standard error of log(after / before) for two Poisson counts: √(1/before + 1/after). */
function poissonLogRatioSe(s: GrowthDriverSegment): number | null {
  if (s.before === null || s.after === null || s.before <= 0 || s.after <= 0) return null;
  return Math.sqrt(1 / s.before + 1 / s.after);
}
