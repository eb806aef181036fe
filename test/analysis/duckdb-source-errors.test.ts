// The DuckDB source maps its engine's errors to the same SourceError codes as the PostgreSQL
// source, so the bot's replies do not depend on the engine.
import { expect, it } from 'vitest';
import { SourceError } from '../../analysis/sources/data-source.js';
import { useDemoWorkspace } from '../helpers/demo-fixture.js';

const demoWorkspace = useDemoWorkspace();

async function failureOf(sql: string): Promise<SourceError> {
  try {
    await demoWorkspace().source.run({ sql, params: [] }, demoWorkspace().runOptions);
  } catch (err) {
    if (err instanceof SourceError) return err;
    throw err;
  }
  throw new Error('expected the query to fail');
}
const codeOf = async (sql: string) => (await failureOf(sql)).code;
const messageOf = async (sql: string) => (await failureOf(sql)).message;

it('reports a missing table, a missing column and other errors with their own codes', async () => {
  expect(await codeOf('SELECT * FROM "nowhere"')).toBe('missing_table');
  expect(await codeOf('SELECT "gone" FROM "bookings"')).toBe('dataset_changed');
  expect(await messageOf('SELECT "gone" FROM "bookings"')).toMatch(/^column gone is missing from the table/);
  expect(await codeOf('SELECT CAST(\'x\' AS INTEGER)')).toBe('query_failed');
});
