// A result table as RFC 4180 CSV (csv-stringify: quoting and escaping done by a well-kept library).
import { stringify } from 'csv-stringify/sync';
import type { ResultTable } from './types.js';

export function tableToCsv(table: ResultTable): string {
  const header = table.columns.map((c) => c.name);
  const rows = table.rows.map((r) => table.columns.map((c) => r[c.name] ?? ''));
  return stringify([header, ...rows], { cast: { boolean: (b) => (b ? 'true' : 'false') } });
}
