// `threadcount init --source FILE|URL [--table T] --out FILE`: reads the data and writes a first
// config (analysis/sources/draft-config.ts) for the user to review, then check, then serve.
import { existsSync, writeFileSync } from 'node:fs';
import { basename, dirname, extname, isAbsolute, relative, resolve } from 'node:path';
import { Document, isMap, isScalar, isSeq } from 'yaml';
import { SourceError } from '../analysis/sources/data-source.js';
import { catalogNameOf, draftConfig, profileColumns, type Draft } from '../analysis/sources/draft-config.js';
import { DuckDbSource } from '../analysis/sources/duckdb-source.js';
import { PostgresSource } from '../analysis/sources/postgres-source.js';
import type { SourceConfig } from '../config/schema.js';
import type { DataSource } from '../analysis/sources/data-source.js';

export interface InitOptions {
  source: string;
  table?: string;
  out: string;
  /** For a PostgreSQL URL: the environment variable the config names for it (the URL holds a password). */
  urlEnv?: string;
}

const FILE_KINDS: Record<string, 'csv' | 'parquet' | 'json' | 'duckdb'> = {
  '.csv': 'csv',
  '.tsv': 'csv',
  '.txt': 'csv',
  '.parquet': 'parquet',
  '.json': 'json',
  '.jsonl': 'json',
  '.ndjson': 'json',
  '.duckdb': 'duckdb',
  '.db': 'duckdb',
};

export async function draftConfigFile(opts: InitOptions): Promise<{ summary: string; file: string }> {
  if (existsSync(opts.out)) throw new SourceError('query_failed', `${opts.out} already exists; init never overwrites a config (choose another --out)`);
  const { source, config, table, name } = await openFor(opts);
  try {
    const profile = await profileColumns(source, table);
    const draft = draftConfig({ datasetName: name, label: name.replace(/_/g, ' ').replace(/^./, (c) => c.toUpperCase()), source: config, ...(config.kind === 'duckdb' || config.kind === 'postgres' || opts.table ? { table } : {}), ...profile });
    const header = [
      `# Drafted by threadcount init from ${config.kind === 'postgres' ? `the table ${table}` : opts.source} (${profile.rows.toLocaleString('en')} rows read).`,
      '# Review it: each metric says how it adds up (sum, count, count_distinct, average, ratio, rate)',
      '# and its kind (flow: adds up over time; level: a reading averaged over time; ratio). Fill in',
      '# `also_called` with the words requesters use, set units and currency, set higher_is_better where',
      '# more is better (true) or worse (false): left out, changes are told as rises and falls. Keep',
      '# personal_data on columns that hold people\'s details. Then: threadcount check --config FILE',
      '',
    ].join('\n');
    writeFileSync(opts.out, `${header}${withComments(draft)}`);
    return { file: opts.out, summary: `Wrote ${opts.out}.\n${draft.notes.map((n) => `  ${n}`).join('\n')}\nNext: review it, then threadcount check --config ${opts.out}\n` };
  } finally {
    await source.close();
  }
}

async function openFor(opts: InitOptions): Promise<{ source: DataSource; config: SourceConfig; table: string; name: string }> {
  const engine = { statement_timeout_ms: 120_000, max_result_rows: 10_000 };
  if (/^postgres(ql)?:\/\//i.test(opts.source)) {
    if (!opts.table) throw new SourceError('missing_table', 'a PostgreSQL source needs --table (the table or view to read)');
    const [schema, table] = opts.table.includes('.') ? (opts.table.split('.', 2) as [string, string]) : [undefined, opts.table];
    const urlEnv = opts.urlEnv ?? 'THREADCOUNT_DATA_URL';
    const source = PostgresSource.open({ url: opts.source, ...(schema ? { schema } : {}), timeoutMs: engine.statement_timeout_ms });
    return { source, config: { kind: 'postgres', url_env: urlEnv, ...(schema ? { schema } : {}) }, table, name: catalogNameOf(table) };
  }
  if (/^[a-z]+:\/\//i.test(opts.source)) {
    throw new SourceError('unreachable', `threadcount reads files on this machine and PostgreSQL URLs; download ${opts.source} first and pass the file`);
  }
  const path = resolve(opts.source);
  const kind = FILE_KINDS[extname(path).toLowerCase()];
  if (!kind) throw new SourceError('query_failed', `cannot tell what kind of file ${opts.source} is from its name: use .csv, .tsv, .parquet, .json, .jsonl or .duckdb`);
  // Source paths in the config are relative to the config's folder.
  const rel = relative(dirname(resolve(opts.out)), path);
  // Relative only for a file beside the config or below it; one elsewhere keeps its absolute path.
  const shown = isAbsolute(rel) || rel === '' || rel.startsWith('..') ? path : rel;
  const fileName = catalogNameOf(basename(path, extname(path)).replace(/\*/g, ''));
  if (kind === 'duckdb') {
    const table = opts.table ?? (await onlyTable(path, engine));
    const source = await DuckDbSource.open({ source: { kind: 'duckdb', path: shown }, paths: [path], table, engine });
    return { source, config: { kind: 'duckdb', path: shown }, table, name: catalogNameOf(table) };
  }
  const table = opts.table ?? fileName;
  const config = { kind, paths: [shown] };
  const source = await DuckDbSource.open({ source: config, paths: [path], table, engine });
  return { source, config, table, name: fileName };
}

/** The one table of a DuckDB file (init needs --table when it has several). */
async function onlyTable(path: string, engine: { statement_timeout_ms: number; max_result_rows: number }): Promise<string> {
  const probe = await DuckDbSource.open({ source: { kind: 'duckdb', path }, paths: [path], table: '', engine });
  try {
    const t = await probe.run({ sql: 'SELECT table_name FROM information_schema.tables WHERE table_catalog = current_database() ORDER BY 1', params: [] }, { maxRows: 100, timeoutMs: 60_000 });
    const names = t.rows.map((r) => String(r.table_name));
    if (names.length === 1) return names[0]!;
    throw new SourceError('missing_table', names.length ? `the file has several tables (${names.join(', ')}): pass --table` : 'the file has no tables');
  } finally {
    await probe.close();
  }
}

/** The draft as YAML, with what init guessed about each metric and dimension (and a text time column, and left-out columns) as a comment above it. */
function withComments(draft: Draft): string {
  const doc = new Document(draft.config);
  const datasets = doc.get('datasets');
  if (isSeq(datasets)) {
    for (const ds of datasets.items) {
      if (!isMap(ds)) continue;
      const keyed = (key: string) => ds.items.find((p) => isScalar(p.key) && p.key.value === key)?.key;
      const time = keyed('time_column');
      if (draft.timeComment && isScalar(time)) time.commentBefore = draft.timeComment;
      const metricsKey = keyed('metrics');
      if (draft.leftOutComment && isScalar(metricsKey)) metricsKey.commentBefore = draft.leftOutComment;
      for (const [list, comments] of [['metrics', draft.comments], ['dimensions', draft.dimensionComments]] as const) {
        const items = ds.get(list);
        if (!isSeq(items)) continue;
        for (const m of items.items) {
          const name = isMap(m) ? m.get('name') : undefined;
          if (isMap(m) && typeof name === 'string' && comments[name]) m.commentBefore = comments[name];
        }
      }
    }
  }
  return doc.toString({ lineWidth: 0 });
}
