import { DuckDBInstance } from '@duckdb/node-api';
const [file, sql] = process.argv.slice(2);
const db = await DuckDBInstance.create(file.endsWith('.duckdb') ? file : ':memory:');
const c = await db.connect();
const r = await c.runAndReadAll(sql);
console.log(r.getRowObjectsJson().map((o) => JSON.stringify(o)).join('\n'));
