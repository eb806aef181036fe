// Polls until a check returns a value (not undefined/false), or fails with what it waited for.
export async function waitFor<T>(
  what: string,
  check: () => T | undefined | false | Promise<T | undefined | false>,
  timeoutMs = 60_000,
  everyMs = 25,
): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const value = await check();
    if (value !== undefined && value !== false) return value;
    if (Date.now() > until) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
}

/**
 * Polls a measure of progress (runs finished, rows written) until `done` holds. It fails only when
 * the measure stops moving for `stallMs`: on a shared machine a long queue may take many minutes
 * and still be healthy, while a lost item shows as a count that no longer moves. The failure says
 * what `explain` finds then (which items are left and in what state).
 */
export async function waitWhileMoving(
  what: string,
  progress: () => Promise<number>,
  done: (value: number) => boolean,
  explain: () => Promise<string>,
  stallMs = 180_000,
  everyMs = 500,
): Promise<number> {
  let last = await progress();
  let movedAt = Date.now();
  for (;;) {
    if (done(last)) return last;
    if (Date.now() - movedAt > stallMs) throw new Error(`${what}: no progress for ${stallMs} ms (at ${last}). ${await explain()}`);
    await new Promise((r) => setTimeout(r, everyMs));
    const now = await progress();
    if (now !== last) movedAt = Date.now();
    last = now;
  }
}
