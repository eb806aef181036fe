// Small-group suppression (statistical disclosure control): a dataset's `min_group_size` keeps
// any segment or comparison group with fewer rows than that from being shown on its own. Segment
// templates fold such segments into "All others" in SQL (with a complementary segment when the
// fold alone would still be small); group comparisons null a small group's
// numbers in SQL and say "too few to show". A minimum of 0 or 1 hides nothing, and then every
// query compiles exactly as without this feature.
import type { DatasetConfig } from '../../config/schema.js';
import type { Caveat } from '../types.js';

/** The minimum rows a group needs to be shown, or null when the dataset suppresses nothing. */
export function minGroupSize(ds: Pick<DatasetConfig, 'min_group_size'>): number | null {
  const n = ds.min_group_size ?? 0;
  return n > 1 ? n : null;
}

/**
 * The caveat for `count` segments folded into "All others" because each had fewer rows than the
 * minimum, and `complementary` segments folded with them so they cannot be worked out from the total.
 */
export function suppressedSegmentsCaveat(count: number, minimum: number, extra: Caveat['data'] = {}, complementary = 0): Caveat {
  return { code: 'suppressed_small_groups', data: { ...extra, count, minimum, ...(complementary > 0 ? { complementary } : {}) } };
}

/**
 * Complementary (secondary) suppression of the "All others" row, as SQL common table expressions.
 *
 * Folding the segments below the minimum (primary suppression) is not enough when the fold itself
 * is small: with the total and the named segments shown, a fold holding one small segment, or
 * fewer rows than the minimum in all, gives that segment away by subtraction. Statistical
 * disclosure control answers this with secondary suppression: more cells are withheld until the
 * withheld part is itself safe (Hundepool et al., ESSnet Handbook on Statistical Disclosure
 * Control, the chapters on magnitude and frequency tables; https://sdctools.github.io/HandbookSDC/).
 * In a one-way table with a total the rule is: while the fold holds fewer rows than the minimum,
 * fold the next-smallest named segment too. Every named segment has at least the minimum rows, so
 * the fold then holds two or more segments and is above the minimum itself.
 *
 * Periods: a template that shows the fold in several periods (two windows, a snapshot's three
 * periods) passes one cell per segment and period; the fold must reach the minimum in every
 * period where it has rows. Candidates are the named segments with rows in a period that falls
 * short, ranked by their rows there (smallest first, ties by value); the fewest that lift every
 * such period are folded. A period where no named segment has rows cannot be lifted and is let
 * be: its fold already is that period's whole total, which is shown anyway.
 *
 * Inputs: `cells`, one row per (segment, period) with its row count, and `segments`, one row per
 * segment with a boolean already-folded column (below the minimum, or ranked out). Defines the CTE
 * `name` with the segments to fold as complements: tc_sdc_key, and tc_sdc_fold (TRUE, so a LEFT
 * JOIN tells a complement whose key is the missing value from no match). `minimum` is a bound
 * parameter. Only row counts are read, so the SQL is the same for every metric.
 */
export function complementaryFoldCtes(o: {
  name: string;
  cells: string;
  segments: string;
  key: string;
  period: string;
  rows: string;
  folded: string;
  minimum: string;
}): string {
  const { name: n, cells, segments, key, period, rows, folded, minimum } = o;
  return `${n}_short AS (
  SELECT c.${period} AS tc_sdc_period, SUM(c.${rows}) AS tc_sdc_rows
  FROM ${cells} c
  JOIN ${segments} s ON c.${key} IS NOT DISTINCT FROM s.${key}
  WHERE s.${folded}
  GROUP BY c.${period}
  HAVING SUM(c.${rows}) < ${minimum}
), ${n}_order AS (
  SELECT c.${key} AS tc_sdc_key,
    ROW_NUMBER() OVER (ORDER BY SUM(c.${rows}), c.${key} NULLS LAST) AS tc_sdc_step
  FROM ${cells} c
  JOIN ${n}_short sh ON c.${period} = sh.tc_sdc_period
  JOIN ${segments} s ON c.${key} IS NOT DISTINCT FROM s.${key}
  WHERE NOT s.${folded}
  GROUP BY c.${key}
), ${n}_reach AS (
  SELECT o.tc_sdc_step, sh.tc_sdc_period,
    sh.tc_sdc_rows + SUM(COALESCE(c.${rows}, 0)) OVER (PARTITION BY sh.tc_sdc_period ORDER BY o.tc_sdc_step ROWS BETWEEN UNBOUNDED PRECEDING AND CURRENT ROW) AS tc_sdc_rows
  FROM ${n}_order o
  CROSS JOIN ${n}_short sh
  LEFT JOIN ${cells} c ON c.${key} IS NOT DISTINCT FROM o.tc_sdc_key AND c.${period} = sh.tc_sdc_period
), ${n}_enough AS (
  SELECT MIN(tc_sdc_step) AS tc_sdc_step
  FROM (
    SELECT tc_sdc_step
    FROM (SELECT tc_sdc_step, tc_sdc_rows, MAX(tc_sdc_rows) OVER (PARTITION BY tc_sdc_period) AS tc_sdc_best FROM ${n}_reach) tc_sdc_r
    GROUP BY tc_sdc_step
    HAVING MIN(CASE WHEN tc_sdc_rows >= ${minimum} OR tc_sdc_best < ${minimum} THEN 1 ELSE 0 END) = 1
  ) tc_sdc_ok
), ${n} AS (
  SELECT o.tc_sdc_key, TRUE AS tc_sdc_fold
  FROM ${n}_order o CROSS JOIN ${n}_enough e
  WHERE e.tc_sdc_step IS NULL OR o.tc_sdc_step <= e.tc_sdc_step
)`;
}

/**
 * The caveat for a comparison group (or groups) whose numbers are withheld: "too few to show".
 * `extra` may say they are single periods of the groups (`periods: true`, `count` periods) or cells within segments (`cells: true`).
 */
export function suppressedGroupsCaveat(labels: readonly string[], minimum: number, extra: Caveat['data'] = {}): Caveat {
  return { code: 'suppressed_small_groups', data: { count: labels.length, minimum, groups: labels.join(', '), ...extra } };
}

/**
 * Wraps a grouped summary query so a cell with fewer than `minimum` rows (its `sizeColumn`) keeps
 * its key columns but returns NULL for every other column, with `tc_suppressed` TRUE. The numbers
 * of a small cell never leave the database. `columns` are the SELECT-list entries of the inner
 * query ("expr AS alias"); `keys` are the aliases kept as they are.
 */
export function suppressSmallCells(opts: {
  inner: string;
  keys: readonly string[];
  columns: readonly string[];
  sizeColumn: string;
  minimum: string;
  orderBy: string;
  /**
   * Complementary suppression within each value of this column (a comparison group's side of a
   * segment table, whose overall figure is shown too): when exactly one cell of a side is small,
   * its smallest other cell (ties by `complementTieBreak`) is withheld as well, so the small one
   * is not the side's total minus the cells shown. Those cells have `tc_complement` TRUE.
   */
  complementWithin?: string;
  complementTieBreak?: string;
}): string {
  if (opts.complementWithin) return suppressWithComplement({ ...opts, complementWithin: opts.complementWithin });
  const small = `tc_cells.${opts.sizeColumn} < ${opts.minimum}`;
  const values = opts.columns
    .map(aliasOf)
    .filter((a) => !opts.keys.includes(a))
    .map((a) => `CASE WHEN ${small} THEN NULL ELSE tc_cells.${a} END AS ${a}`);
  return `SELECT ${opts.keys.map((k) => `tc_cells.${k}`).join(', ')},
  (${small}) AS tc_suppressed,
  ${values.join(',\n  ')}
FROM (
${opts.inner}
) tc_cells
ORDER BY ${opts.orderBy}`;
}

function suppressWithComplement(opts: Parameters<typeof suppressSmallCells>[0] & { complementWithin: string }): string {
  const size = `tc_raw.${opts.sizeColumn}`;
  const tie = opts.complementTieBreak ? `, tc_marked.${opts.complementTieBreak}` : '';
  const values = opts.columns
    .map(aliasOf)
    .filter((a) => !opts.keys.includes(a))
    .map((a) => `CASE WHEN tc_cells.tc_hide THEN NULL ELSE tc_cells.${a} END AS ${a}`);
  // NULL sizes (a side with no rows at all) are not cells to withhold.
  return `SELECT ${opts.keys.map((k) => `tc_cells.${k}`).join(', ')},
  tc_cells.tc_hide AS tc_suppressed,
  (tc_cells.tc_hide AND NOT tc_cells.tc_small) AS tc_complement,
  ${values.join(',\n  ')}
FROM (
  SELECT tc_marked.*,
    (tc_marked.tc_small OR (
      SUM(CASE WHEN tc_marked.tc_small THEN 1 ELSE 0 END) OVER (PARTITION BY tc_marked.${opts.complementWithin}) = 1
      AND ROW_NUMBER() OVER (PARTITION BY tc_marked.${opts.complementWithin}, tc_marked.tc_small ORDER BY tc_marked.${opts.sizeColumn}${tie}) = 1
    )) AS tc_hide
  FROM (
    SELECT tc_raw.*, COALESCE(${size} < ${opts.minimum}, FALSE) AS tc_small
    FROM (
${opts.inner}
    ) tc_raw
  ) tc_marked
) tc_cells
ORDER BY ${opts.orderBy}`;
}

/** The alias of a SELECT-list entry written "expression AS alias" (aliases here are plain or double-quoted). */
export function aliasOf(entry: string): string {
  const m = /\sAS\s+("(?:[^"]|"")+"|[A-Za-z_][A-Za-z0-9_]*)\s*$/i.exec(entry);
  if (!m) throw new Error(`a summary column has no alias: ${entry}`);
  return m[1]!;
}
