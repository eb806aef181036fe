// `threadcount check`: a dataset's config held against its table before any conversation. Every
// column the config names exists with a usable type, every computed column and every metric runs on
// a sample, the time column gives dates and its stamp granularity is read, and each dimension's
// values are counted. Problems name the config file, line and key; facts are what a person needs
// to see that the config reads the table as they meant.
import { expressionColumns } from '../../config/expression.js';
import type { ConfigProblem, LoadedConfig } from '../../config/load.js';
import type { DatasetConfig, Dimension, Metric } from '../../config/schema.js';
import { metricKind } from '../catalog.js';
import { datasetRelation } from '../compile-context.js';
import type { StampGranularity } from '../stamps.js';
import { datesAfterWords } from '../window-words.js';
import { metricAggregate } from '../sql/metric-sql.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { ResultColumn } from '../types.js';
import type { DimensionValues } from '../values/value-index.js';
import { openSource, openWorkspace, type Workspace } from '../workspace.js';
import type { Secrets } from '../../config/environment.js';
import { SourceError, type DataSource, type TableColumn } from './data-source.js';

// Rows read to try each metric and count each dimension's values: enough to see types and
// cardinality, few enough to be quick on any table.
const SAMPLE_ROWS = 100_000;
// A breakdown shows a few segments and folds the rest; past this many values a dimension is
// probably an identifier (common practice: a breakdown is read at a glance).
const MANY_VALUES = 500;

export interface DimensionFacts {
  name: string;
  column: string;
  values: number;
  /** The most common values, most rows first. */
  top: string[];
  personal: boolean;
}

export interface DatasetFacts {
  name: string;
  rows: number;
  firstDate: string | null;
  lastDate: string | null;
  stamps: StampGranularity | undefined;
  timeColumn: string;
  timeComputed: boolean;
  metrics: { name: string; kind: string; definition: string }[];
  dimensions: DimensionFacts[];
}

export interface CheckReport {
  file: string;
  datasets: DatasetFacts[];
  problems: ConfigProblem[];
  /** Not wrong, but worth a look (a dimension with very many values, earlier keys). */
  notes: ConfigProblem[];
}

/** Where a key of the file is, for messages (the loaded config knows its lines). */
type Locate = (path: (string | number)[]) => { line: number | null; key: string };

/** Checks every dataset of a loaded config against its source. */
export async function checkConfig(config: LoadedConfig, secrets: Secrets = {}): Promise<CheckReport> {
  const report: CheckReport = { file: config.file, datasets: [], problems: [], notes: [...(config.warnings ?? [])] };
  const locate: Locate = config.locate ?? ((path) => ({ line: null, key: keyOf(path) }));
  for (const [d, ds] of config.datasets.entries()) {
    const problem = (path: (string | number)[], message: string) => report.problems.push({ file: config.file, ...locate(['datasets', d, ...path]), message });
    const note = (path: (string | number)[], message: string) => report.notes.push({ file: config.file, ...locate(['datasets', d, ...path]), message });
    // The columns first, on the bare source: a workspace reads the time column as it opens.
    let found = 0;
    try {
      const source = await openSource(config, ds, secrets);
      try {
        found = checkColumns(ds, await source.describe(ds.table), problem);
        if (found === 0) found = await checkDerived(source, ds, problem);
      } finally {
        await source.close();
      }
    } catch (err) {
      if (!(err instanceof SourceError)) throw err;
      problem(err.code === 'missing_table' ? ['table'] : ['source'], err.message);
      continue;
    }
    if (found > 0) continue;
    let ws: Workspace;
    try {
      ws = await openWorkspace(config, ds.name, secrets);
    } catch (err) {
      if (!(err instanceof SourceError)) throw err;
      problem(['time_column'], err.message);
      continue;
    }
    try {
      const facts = await readFacts(ws, problem, note);
      if (facts) report.datasets.push(facts);
    } catch (err) {
      if (!(err instanceof SourceError)) throw err;
      problem(['source'], err.message);
    } finally {
      await ws.source.close();
    }
  }
  return report;
}

type Expect = 'any' | 'number' | 'boolean' | 'time' | 'whole';

/** Every column the config names, with the key that names it and the type it needs. */
function columnUses(ds: DatasetConfig): { column: string; path: (string | number)[]; expect: Expect }[] {
  const out: { column: string; path: (string | number)[]; expect: Expect }[] = [];
  const derived = new Map((ds.derived ?? []).map((x) => [x.name, x]));
  // A computed column's own columns are reported at the key that wrote the expression.
  const use = (column: string, path: (string | number)[], expect: Expect) => {
    const d = derived.get(column);
    if (d) for (const c of expressionColumns(d.expr)) out.push({ column: c, path: d.key.split(/\.|(?=\[)/).map(stepOf).slice(2), expect: 'any' });
    else out.push({ column, path, expect });
  };
  use(ds.time_column, ['time_column'], 'time');
  if (ds.key_column) use(ds.key_column, ['key_column'], 'any');
  ds.amount_columns.forEach((c, i) => use(c, ['amount_columns', i], 'number'));
  ds.dimensions.forEach((x, i) => use(x.column, ['dimensions', i, 'column'], 'any'));
  ds.comparison_groups.forEach((g, i) => {
    use(g.column, ['comparison_groups', i, 'column'], 'boolean');
    if (g.unit_column) use(g.unit_column, ['comparison_groups', i, 'unit_column'], 'any');
  });
  ds.metrics.forEach((m, i) => {
    const def = m.definition;
    if ('column' in def) use(def.column, ['metrics', i, howKey(def.type)], def.type === 'distinct_count' ? 'any' : 'number');
    if ('where' in def && def.where) use(def.where.column, ['metrics', i, def.type === 'rate' ? 'rate' : 'when'], def.where.op === 'is_true' || def.where.op === 'is_false' ? 'boolean' : 'any');
  });
  return out;
}

function stepOf(s: string): string | number {
  const m = /^\[(\d+)\]$/.exec(s);
  return m ? Number(m[1]) : s;
}

function howKey(type: Metric['definition']['type']): string {
  return { sum: 'sum', count: 'count', distinct_count: 'count_distinct', average: 'average', ratio: 'ratio', rate: 'rate' }[type];
}

/** Missing columns and unusable types; returns how many problems it found. */
function checkColumns(ds: DatasetConfig, columns: TableColumn[], problem: (path: (string | number)[], message: string) => void): number {
  const byName = new Map(columns.map((c) => [c.name, c]));
  let found = 0;
  const seen = new Set<string>();
  for (const u of columnUses(ds)) {
    const where = `${u.column}@${u.path.join('.')}`;
    if (seen.has(where)) continue;
    seen.add(where);
    const col = byName.get(u.column);
    if (!col) {
      found++;
      problem(u.path, `column ${u.column} is missing from the table ${ds.table}${suggestion(u.column, columns)}`);
      continue;
    }
    const family = typeFamily(col.type);
    const bad =
      (u.expect === 'number' && family !== 'number') ||
      (u.expect === 'boolean' && family !== 'boolean') ||
      (u.expect === 'time' && family !== 'time');
    if (bad) {
      found++;
      const need = { number: 'a number', boolean: 'true/false', time: 'a date or timestamp (or build it: time_column: {year, month, day} or {expr: ...})' }[u.expect as 'number' | 'boolean' | 'time'];
      problem(u.path, `column ${u.column} is ${col.type}, but this needs ${need}`);
    }
  }
  return found;
}

function suggestion(name: string, columns: TableColumn[]): string {
  const lower = name.toLowerCase().replace(/[^a-z0-9]/g, '');
  const close = columns.filter((c) => c.name.toLowerCase().replace(/[^a-z0-9]/g, '') === lower);
  const list = close.length ? close : [];
  return list.length ? ` (did you mean ${list.map((c) => c.name).join(' or ')}?)` : ` (it has ${columns.slice(0, 12).map((c) => c.name).join(', ')}${columns.length > 12 ? ', …' : ''})`;
}

export function typeFamily(engineType: string): 'number' | 'boolean' | 'time' | 'text' | 'other' {
  const t = engineType.toUpperCase();
  if (/^(TINYINT|SMALLINT|INTEGER|INT|BIGINT|HUGEINT|UTINYINT|USMALLINT|UINTEGER|UBIGINT|UHUGEINT|FLOAT|REAL|DOUBLE|DECIMAL|NUMERIC|DOUBLE PRECISION)/.test(t)) return 'number';
  if (t === 'BOOLEAN') return 'boolean';
  if (t === 'DATE' || t.startsWith('TIMESTAMP')) return 'time';
  if (t === 'VARCHAR' || t === 'TEXT' || t.startsWith('CHARACTER')) return 'text';
  return 'other';
}

/** Each computed column on a sample: it must run, and a sum's or average's must be a number. */
async function checkDerived(source: DataSource, ds: DatasetConfig, problem: (path: (string | number)[], message: string) => void): Promise<number> {
  let found = 0;
  for (const d of ds.derived ?? []) {
    const q = new QueryBuilder(source.dialect);
    const rows = datasetRelation(q, ds);
    try {
      const t = await source.run(q.finish(`SELECT ${q.ident(d.name)} AS v FROM ${rows} LIMIT 1000`), { maxRows: 1000, timeoutMs: 120_000 });
      const needsNumber = ds.metrics.some((m) => 'column' in m.definition && m.definition.column === d.name && m.definition.type !== 'distinct_count');
      const type = t.columns[0]?.type;
      if (needsNumber && type !== 'number') {
        found++;
        problem(keySteps(d.key), `the expression ${d.name} gives ${describeType(type)}, but a sum or average needs a number`);
      }
    } catch (err) {
      if (!(err instanceof SourceError)) throw err;
      found++;
      problem(keySteps(d.key), `the expression ${d.name} does not run on the table: ${engineMessage(err)}`);
    }
  }
  return found;
}

async function readFacts(
  ws: Workspace,
  problem: (path: (string | number)[], message: string) => void,
  note: (path: (string | number)[], message: string) => void,
): Promise<DatasetFacts | null> {
  const ds = ws.dataset;
  let failed = false;
  // Each metric on a sample of rows.
  for (const [i, m] of ds.metrics.entries()) {
    const q = new QueryBuilder(ws.source.dialect);
    const rows = datasetRelation(q, ds);
    try {
      await ws.source.run(q.finish(`SELECT ${metricAggregate(q, ds, m)} AS v FROM (SELECT * FROM ${rows} LIMIT ${SAMPLE_ROWS}) AS tc_sample`), ws.runOptions);
    } catch (err) {
      failed = true;
      problem(['metrics', i], `metric ${m.name} does not run on the table: ${engineMessage(err)}`);
    }
  }
  if (failed) return null;
  for (const [i, m] of ds.metrics.entries()) await checkPercentScale(ws, m, (message) => note(['metrics', i, 'unit'], message));
  const coverage = ws.coverage;
  if (coverage.firstDate === null) problem(['time_column'], `the time column ${ds.time_column} has no dates (every row is empty there, or the table is empty)`);
  if (coverage.afterToday) note(['time_column'], datesAfterWords(coverage.afterToday));
  const dimensions: DimensionFacts[] = [];
  for (const [i, d] of ds.dimensions.entries()) {
    const q = new QueryBuilder(ws.source.dialect);
    const rows = datasetRelation(q, ds);
    const col = q.ident(d.column);
    const t = await ws.source.run(
      q.finish(`SELECT CAST(${col} AS ${ws.source.dialect.name === 'postgres' ? 'TEXT' : 'VARCHAR'}) AS v, COUNT(*) AS n, COUNT(*) OVER () AS tc_values
FROM (SELECT * FROM ${rows} LIMIT ${SAMPLE_ROWS}) AS tc_sample
GROUP BY 1
ORDER BY 2 DESC, 1
LIMIT 6`),
      ws.runOptions,
    );
    const values = Number(t.rows[0]?.tc_values ?? 0);
    const facts: DimensionFacts = { name: d.name, column: d.column, values, top: d.personal_data ? [] : t.rows.map((r) => (r.v === null ? '(empty)' : String(r.v))), personal: d.personal_data };
    dimensions.push(facts);
    if (!d.personal_data && values > MANY_VALUES) {
      note(['dimensions', i], `dimension ${d.name} has ${values.toLocaleString('en')} values in the first ${SAMPLE_ROWS.toLocaleString('en')} rows: a breakdown shows a few and folds the rest; is it an identifier?`);
    }
    if (values === 1) note(['dimensions', i], `dimension ${d.name} has one value only: a breakdown by it shows nothing`);
    checkValueNames(d, ws.values.get(d.name), (message) => problem(['dimensions', i, 'value_names'], message), (message) => note(['dimensions', i, 'value_names'], message));
  }
  return {
    name: ds.name,
    rows: coverage.rows,
    firstDate: coverage.firstDate,
    lastDate: coverage.lastDate,
    stamps: coverage.stamps,
    timeColumn: ds.time_column,
    timeComputed: ds.derived?.some((x) => x.name === ds.time_column) ?? false,
    metrics: ds.metrics.map((m) => ({ name: m.name, kind: metricKind(ds, m), definition: describeDefinition(m) })),
    dimensions,
  };
}

/**
 * A dimension's other names for its values must name values the data holds (a mistyped "APPL" would
 * never match), and one name must not stand for two values. Past the value index's cap a value may
 * exist unread, so an unknown one is only a note there.
 */
function checkValueNames(d: Dimension, index: DimensionValues | undefined, problem: (message: string) => void, note: (message: string) => void): void {
  if (!d.value_names) return;
  if (d.personal_data) {
    problem(`dimension ${d.name} is personal data, so its values are never read from a request: remove value_names`);
    return;
  }
  if (!index) {
    note(`the values of dimension ${d.name} are not read from requests (it is a comparison group's column), so value_names is not used`);
    return;
  }
  const known = new Set(index.values.map((v) => v.value) ?? []);
  const owners = new Map<string, string[]>();
  for (const [value, names] of Object.entries(d.value_names)) {
    if (!known.has(value)) {
      const some = [...known].slice(0, 8).join(', ');
      const message = `value_names names ${value}, which is not a value of ${d.column}${some ? ` (it has: ${some}${known.size > 8 ? ', …' : ''})` : ''}`;
      if (!index.complete) note(`${message} in the values read`);
      else problem(message);
    }
    for (const n of names) {
      const key = n.trim().toLowerCase();
      owners.set(key, [...(owners.get(key) ?? []), value]);
    }
  }
  for (const [name, values] of owners) {
    if (values.length > 1) problem(`value_names gives "${name}" to ${values.join(' and ')}: a request saying it could mean either`);
  }
}

// A share written as a fraction stays within about ±1; values mostly above this are percent points
// (2.1 for 2.1%), which unit: percent would show as 210% (common practice: 1.5 leaves room for a
// share that overshoots, such as a 120% load factor).
const PERCENT_POINTS_ABOVE = 1.5;

/** A percent metric over a column must read fractions (0.021 for 2.1%); says so when its values look like points. */
async function checkPercentScale(ws: Workspace, m: Metric, note: (message: string) => void): Promise<void> {
  const def = m.definition;
  if (m.unit !== 'percent' || (def.type !== 'average' && def.type !== 'sum')) return;
  const q = new QueryBuilder(ws.source.dialect);
  const rows = datasetRelation(q, ws.dataset);
  const col = q.ident(def.column);
  const t = await ws.source.run(
    q.finish(`SELECT AVG(CASE WHEN ABS(${col}) > ${PERCENT_POINTS_ABOVE} THEN 1.0 ELSE 0.0 END) AS above, MAX(${col}) AS top FROM (SELECT * FROM ${rows} LIMIT ${SAMPLE_ROWS}) AS tc_sample WHERE ${col} IS NOT NULL`),
    ws.runOptions,
  );
  const above = Number(t.rows[0]?.above ?? 0);
  if (above <= 0.5) return;
  const written = /^[A-Za-z_][A-Za-z0-9_]*$/.test(def.column) ? def.column : `(${def.column})`;
  note(
    `metric ${m.name} has unit percent, which reads its values as fractions (0.021 is 2.1%), but ${Math.round(above * 100)}% of its values are above ${PERCENT_POINTS_ABOVE} (up to ${Number(t.rows[0]?.top)}): if they are percent points (2.1 for 2.1%), write ${def.type}: "${written} / 100"`,
  );
}

function keySteps(key: string): (string | number)[] {
  // `datasets[0].metrics[1].sum` -> ['metrics', 1, 'sum'] (relative to the dataset).
  return key.split(/\.|(?=\[)/).map(stepOf).slice(2);
}

function describeType(type: ResultColumn['type'] | undefined): string {
  return type === 'text' ? 'text' : type === 'boolean' ? 'true/false' : type === 'date' ? 'dates' : 'no values';
}

function describeDefinition(m: Metric): string {
  const d = m.definition;
  switch (d.type) {
    case 'sum':
      return `sum of ${d.column}`;
    case 'count':
      return 'count of rows';
    case 'distinct_count':
      return `distinct ${d.column}`;
    case 'average':
      return `average of ${d.column}`;
    case 'ratio':
      return `${d.numerator} per ${d.denominator}`;
    case 'rate':
      return `share${d.of ? ` of ${d.of}` : ' of rows'} where ${d.where.column}`;
  }
}

function engineMessage(err: unknown): string {
  const text = err instanceof Error ? err.message : String(err);
  return text.replace(/^the query failed: /, '');
}

function keyOf(path: (string | number)[]): string {
  return path.map((k, i) => (typeof k === 'number' ? `[${k}]` : i === 0 ? k : `.${k}`)).join('');
}

/** The report as text for a person: what was found, then problems and notes as file:line: key: message. */
export function formatCheckReport(r: CheckReport): string {
  const lines: string[] = [];
  for (const d of r.datasets) {
    lines.push(`dataset ${d.name}: ${d.rows.toLocaleString('en')} rows, ${d.firstDate ?? '?'} to ${d.lastDate ?? '?'}, stamped ${d.stamps ?? 'irregular'}`);
    lines.push(`  time column: ${d.timeColumn}${d.timeComputed ? ' (built by the config)' : ''}`);
    lines.push('  metrics:');
    for (const m of d.metrics) lines.push(`    ${m.name}: ${m.kind}, ${m.definition}`);
    if (d.dimensions.length) lines.push('  dimensions:');
    for (const x of d.dimensions) {
      lines.push(`    ${x.name}: ${x.values.toLocaleString('en')} value${x.values === 1 ? '' : 's'}${x.personal ? ' (personal data: never shown)' : x.top.length ? ` (${x.top.join(', ')}${x.values > x.top.length ? ', …' : ''})` : ''}`);
    }
  }
  const at = (p: ConfigProblem) => `${p.line === null ? p.file : `${p.file}:${p.line}`}: ${p.key}: ${p.message}`;
  for (const n of r.notes) lines.push(`note: ${at(n)}`);
  for (const p of r.problems) lines.push(`problem: ${at(p)}`);
  lines.push(r.problems.length ? `${r.problems.length} problem${r.problems.length === 1 ? '' : 's'}: fix the config (or the table) and check again.` : 'ok: the config reads the table.');
  return `${lines.join('\n')}\n`;
}
