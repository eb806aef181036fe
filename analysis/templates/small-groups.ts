// Small-group suppression (statistical disclosure control): a dataset's `min_group_size` keeps
// any segment or comparison group with fewer rows than that from being shown on its own. Segment
// templates fold such segments into "All others" in SQL; group comparisons null a small group's
// numbers in SQL and say "too few to show". A minimum of 0 or 1 hides nothing, and then every
// query compiles exactly as without this feature.
import type { DatasetConfig } from '../../config/schema.js';
import type { Caveat } from '../types.js';

/** The minimum rows a group needs to be shown, or null when the dataset suppresses nothing. */
export function minGroupSize(ds: Pick<DatasetConfig, 'min_group_size'>): number | null {
  const n = ds.min_group_size ?? 0;
  return n > 1 ? n : null;
}

/** The caveat for `count` segments folded into "All others" because each had fewer rows than the minimum. */
export function suppressedSegmentsCaveat(count: number, minimum: number, extra: Caveat['data'] = {}): Caveat {
  return { code: 'suppressed_small_groups', data: { ...extra, count, minimum } };
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
}): string {
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

/** The alias of a SELECT-list entry written "expression AS alias" (aliases here are plain or double-quoted). */
export function aliasOf(entry: string): string {
  const m = /\sAS\s+("(?:[^"]|"")+"|[A-Za-z_][A-Za-z0-9_]*)\s*$/i.exec(entry);
  if (!m) throw new Error(`a summary column has no alias: ${entry}`);
  return m[1]!;
}
