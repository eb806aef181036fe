// How long a peer may take before it is stopped: it is then far slower than us, and the whole
// benchmark stays bounded (about a quarter of an hour for 1M, 10M and 30M rows).

/** A peer is stopped after this many times our median at the same size... */
export const PEER_LIMIT_TIMES_OURS = 15;
/** ...but never before this. */
export const PEER_MIN_LIMIT_MS = 60_000;
