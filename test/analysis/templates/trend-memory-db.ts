// An in-memory DuckDB workspace for the trend and segment tests: tables built by SQL in the
// test, a config written in the test, and the same compile → run → read path as production.
import { DuckDBInstance, DuckDBTypeId, type DuckDBConnection, type DuckDBType } from '@duckdb/node-api';
import { parseConfigText } from '../../../config/load.js';
import type { CompileContext } from '../../../analysis/compile-context.js';
import { readDataCoverage } from '../../../analysis/coverage.js';
import { timeColumnTypeOf, type DataSource, type RunOptions, type TableColumn } from '../../../analysis/sources/data-source.js';
import { duckdbDialect } from '../../../analysis/sql/dialect.js';
import type { CellValue, CompiledQuery, ResultColumn, ResultTable } from '../../../analysis/types.js';
import type { Workspace } from '../../../analysis/workspace.js';

class MemorySource implements DataSource {
  readonly dialect = duckdbDialect;
  constructor(
    private readonly instance: DuckDBInstance,
    readonly connection: DuckDBConnection,
  ) {}

  async describe(table: string): Promise<TableColumn[]> {
    const r = await this.connection.runAndReadAll(
      'SELECT column_name, data_type FROM information_schema.columns WHERE table_name = $1 ORDER BY ordinal_position',
      [table],
    );
    return r.getRowObjectsJson().map((x) => ({ name: String(x.column_name), type: String(x.data_type).toUpperCase() }));
  }

  async run(query: CompiledQuery, options: RunOptions): Promise<ResultTable> {
    const reader = await this.connection.streamAndReadUntil(query.sql, options.maxRows + 1, query.params);
    const columns: ResultColumn[] = reader.columnNames().map((name, i) => ({ name, type: typeOf(reader.columnTypes()[i]!) }));
    const json = reader.getRowObjectsJson();
    const rows = json.slice(0, options.maxRows).map((r) => {
      const out: Record<string, CellValue> = {};
      for (const c of columns) {
        const v = r[c.name];
        if (v === null || v === undefined) out[c.name] = null;
        else if (c.type === 'number') out[c.name] = Number.isFinite(Number(v)) ? Number(v) : null;
        else if (c.type === 'boolean') out[c.name] = Boolean(v);
        else if (c.type === 'date') out[c.name] = String(v).slice(0, 10);
        else out[c.name] = String(v);
      }
      return out;
    });
    return { columns, rows, truncated: json.length > options.maxRows };
  }

  async close(): Promise<void> {
    this.connection.closeSync();
    this.instance.closeSync();
  }
}

function typeOf(t: DuckDBType): ResultColumn['type'] {
  if (t.typeId === DuckDBTypeId.DATE) return 'date';
  if (t.typeId === DuckDBTypeId.BOOLEAN) return 'boolean';
  const numeric = [
    DuckDBTypeId.TINYINT,
    DuckDBTypeId.SMALLINT,
    DuckDBTypeId.INTEGER,
    DuckDBTypeId.BIGINT,
    DuckDBTypeId.HUGEINT,
    DuckDBTypeId.FLOAT,
    DuckDBTypeId.DOUBLE,
    DuckDBTypeId.DECIMAL,
  ];
  return numeric.includes(t.typeId) ? 'number' : 'text';
}

/** Runs `setup` in a fresh in-memory database and opens the config's first dataset on it. */
export async function memoryWorkspace(setup: string[], configYaml: string): Promise<Workspace & { source: MemorySource }> {
  const instance = await DuckDBInstance.create(':memory:');
  const connection = await instance.connect();
  for (const sql of setup) await connection.run(sql);
  const source = new MemorySource(instance, connection);
  const config = parseConfigText(configYaml, '/virtual/threadcount-test.yaml');
  const dataset = config.datasets[0]!;
  const columns = await source.describe(dataset.table);
  const time = columns.find((c) => c.name === dataset.time_column);
  const timeColumnType = time ? timeColumnTypeOf(time.type) : null;
  if (!timeColumnType) throw new Error(`test table has no usable time column ${dataset.time_column}`);
  const context: CompileContext = { dataset, dialect: duckdbDialect, timeColumnType };
  const runOptions: RunOptions = { maxRows: config.engine.max_result_rows, timeoutMs: config.engine.statement_timeout_ms };
  const coverage = await readDataCoverage(source, context, runOptions);
  return { config, dataset, source, context, coverage, runOptions, values: new Map() };
}
