// What the benchmark measures: the demo request as a stakeholder wrote it (demo-scenario.md),
// the scripted answers that take it to a plan, and the windows that plan reads the request as.
// The peers compute the same numbers over the same windows; bench/numbers.ts checks they agree.

export const DEMO_REQUEST =
  'Ops review is on the 15th. Could the data team tell us whether this summer beat last summer, which routes and booking channels drove the difference, whether SkerryPass holders really travel more often than other customers since it launched, and where average fare per passenger and the share of revenue we refunded stand for the last full month?';

/** The answers file: revenue for the summer question, written for managers, plan agreed. */
export const DEMO_ANSWERS = 'metrics: revenue\naudience: managers\nplan: go\n';

/** A fixed clock, so every run reads the deadline the same way (the data ends 18 June 2025). */
export const DEMO_NOW = '2025-07-01T09:00:00Z';

/**
 * The windows the plan reads the request as (half-open [from, to) ISO dates), as the plan's own
 * SQL binds them: "this summer" is the latest summer the data covers, compared with the one before;
 * "since it launched" is the SkerryPass launch to the end of the data; "the last full month" is
 * May 2025, with its history from the start of the data.
 */
export interface PlanWindows {
  all: [string, string];
  summer: [string, string];
  summerBefore: [string, string];
  sinceLaunch: [string, string];
  history: [string, string];
  /** Frequency buckets of bookings per customer: [lo, hi] inclusive, hi null for open. */
  buckets: [number, number | null][];
}

export const PLAN_WINDOWS: PlanWindows = {
  all: ['2022-01-01', '2025-06-19'],
  summer: ['2024-06-01', '2024-09-01'],
  summerBefore: ['2023-06-01', '2023-09-01'],
  sinceLaunch: ['2023-04-01', '2025-06-19'],
  history: ['2022-01-01', '2025-06-01'],
  buckets: [
    [1, 1],
    [2, 5],
    [6, null],
  ],
};
