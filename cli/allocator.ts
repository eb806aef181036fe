// glibc's allocator settings for a long-running `serve`. glibc reads them once, as the process
// starts, so a running process cannot set them for itself: the Docker image and the memory bench
// set them, and `serve` started without them says so (README, "Memory"). Measured by
// bench:chat-memory (BENCHMARKS.md, issue 18).
export const SERVE_ALLOCATOR_ENV: Readonly<Record<string, string>> = {
  // Otherwise each thread that allocates (DuckDB's workers, libuv's pool) gets an arena of its own,
  // up to 8 per core, and each keeps what it once held.
  MALLOC_ARENA_MAX: '2',
  // A fixed threshold: blocks of 128 KiB and more (a chart's bitmap, a file's buffer) are mapped on
  // their own and handed back when freed. Left unset, glibc raises the threshold after the first
  // such block is freed (up to 32 MiB), and later ones stay in the heap, which keeps its high mark.
  MALLOC_MMAP_THRESHOLD_: '131072',
  // Free memory above this much at the top of the heap is handed back (unset: the same 128 KiB,
  // but raised along with the threshold above).
  MALLOC_TRIM_THRESHOLD_: '131072',
};

/** Whether this process runs on glibc (where the settings above mean something). */
export function runsOnGlibc(): boolean {
  const header = (process.report?.getReport() as { header?: { glibcVersionRuntime?: string } } | undefined)?.header;
  return Boolean(header?.glibcVersionRuntime);
}

/** The start-up note when some of the settings are missing on glibc; undefined when all are set or elsewhere. */
export function allocatorNote(env: NodeJS.ProcessEnv, glibc: boolean): string | undefined {
  if (!glibc) return undefined;
  const missing = Object.entries(SERVE_ALLOCATOR_ENV).filter(([name]) => !env[name]);
  if (missing.length === 0) return undefined;
  return (
    `threadcount: memory grows run after run unless glibc's allocator is set before start: ` +
    `${missing.map(([name, value]) => `${name}=${value}`).join(' ')} (the Docker image sets them; see README, Memory)`
  );
}
