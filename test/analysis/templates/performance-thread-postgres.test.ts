// A whole group-comparison thread on PostgreSQL gives the same answer as on DuckDB (the group SQL,
// BOOL_OR membership, per-customer tallies and their bootstrap interval had run on PostgreSQL only
// through the cross-engine cases). The demo data (invented Skerrywake bookings) is copied into a
// PostgreSQL schema and read through a SELECT-only role; the same request, answers and clock run
// through `threadcount ask` on both configs, and every post and every attached table must read the
// same, word for word and figure for figure.
// The demo's SkerryPass has no holder before its launch, so its before/after has no one to follow;
// a second group made for this test on the demo's own `refunded` column (launch 2024-01-01, as in
// performance-unit-did.test.ts) has members on both sides, so the per-customer difference in
// differences and its bootstrap interval run on both engines. Figures are also checked against the
// test's own SQL on PostgreSQL, written independently of the product's (INTERSECT of the customers
// seen on each side, not its tally).
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { ask } from '../../../cli/ask.js';
import type { RecordedThread } from '../../../adapters/file-thread/FileThread.js';
import { demoFixture } from '../../helpers/demo-fixture.js';
import { copyDuckDbTableToPostgres, createReaderRole, describeWithPostgres, dropSchema, uniqueName, withClient } from '../../helpers/postgres.js';

// A comparison group made for this test on the demo's own column (a refund in 2024 marks a member).
const REFUND_GROUP = `      - name: refund_takers
        label: Refund takers
        also_called: [refunded customers, customers with a refund]
        column: refunded
        members_label: Refunded customers
        others_label: Other customers
        launch_date: "2024-01-01"
        unit_column: customer_id
`;

const REQUESTS = [
  'are pass holders travelling more since launch?',
  'do pass holders book more than other customers on the top 3 routes?',
  'are refunded customers travelling more since launch?',
];

describeWithPostgres('a group comparison thread on PostgreSQL reads as on DuckDB', (adminUrl) => {
  const schema = uniqueName('tc_groups_thread');
  const urlEnv = 'TC_GROUPS_THREAD_URL';
  const table = `${pg.escapeIdentifier(schema)}.bookings`;
  let dir: string;
  let role: string | undefined;
  let duckConfig: string;
  let pgConfig: string;

  beforeAll(async () => {
    const demo = await demoFixture();
    await copyDuckDbTableToPostgres({ duckdbPath: demo.databasePath, table: 'bookings', url: adminUrl, schema });
    const reader = await createReaderRole(adminUrl, schema);
    role = reader.role;
    process.env[urlEnv] = reader.url;
    dir = await mkdtemp(join(tmpdir(), 'tc-groups-thread-'));
    // The demo's config beside its data file (relative path), with the test's group added.
    const text = (await readFile(demo.configPath, 'utf8')).replace(/(\n\s+unit_column: customer_id\n)/, `$1${REFUND_GROUP}`);
    expect(text).toContain('name: refund_takers');
    duckConfig = join(dir, 'threadcount-duck.yaml');
    await writeFile(duckConfig, text.replace(/path: ([^\n/]+\.duckdb)/, `path: ${demo.databasePath}`));
    const onPg = text.replace(/source:\n(\s+)kind: duckdb\n\s+path: [^\n]+\n/, (_m, indent: string) => `source:\n${indent}kind: postgres\n${indent}url_env: ${urlEnv}\n${indent}schema: ${schema}\n`);
    expect(onPg).not.toBe(text);
    pgConfig = join(dir, 'threadcount-pg.yaml');
    await writeFile(pgConfig, onPg);
    await writeFile(join(dir, 'answers.yaml'), 'plan: go\n');
  }, 300_000);

  afterAll(async () => {
    delete process.env[urlEnv];
    await dropSchema(adminUrl, schema, role ? [role] : []);
    if (dir) await rm(dir, { recursive: true, force: true });
  });

  const run = async (configFile: string, request: string, out: string): Promise<RecordedThread> => {
    const r = await ask({ configFile, request, answersFile: join(dir, 'answers.yaml'), outDir: join(dir, out), now: new Date('2025-06-19T09:00:00Z') });
    expect(r.end).toBe('done');
    return r.thread.thread;
  };
  /** Every table (CSV) attached to the thread, by its path. */
  const tables = async (t: RecordedThread, out: string) => {
    const paths = t.posts.flatMap((p) => (p.files ?? []).filter((f) => f.kind === 'table').map((f) => f.path));
    return Object.fromEntries(await Promise.all(paths.map(async (p) => [p, await readFile(join(dir, out, p), 'utf8')] as const)));
  };
  const answersOf = (t: RecordedThread) => t.posts.filter((p) => /^\*\d+\. /.test(p.text)).map((p) => p.text);
  const fmt = (n: number) => n.toLocaleString('en-IE');
  const query = <T extends pg.QueryResultRow>(sql: string) => withClient(adminUrl, async (c) => (await c.query<T>(sql)).rows);

  const threads: { duck: RecordedThread; pg: RecordedThread }[] = [];

  REQUESTS.forEach((request, i) => {
    it(`"${request}" reads the same on both engines`, async () => {
      const duck = await run(duckConfig, request, `duck-${i}`);
      const onPg = await run(pgConfig, request, `pg-${i}`);
      threads[i] = { duck, pg: onPg };
      expect(onPg.posts.map((p) => p.text)).toEqual(duck.posts.map((p) => p.text));
      const duckTables = await tables(duck, `duck-${i}`);
      expect(Object.keys(duckTables).length).toBeGreaterThan(1);
      expect(await tables(onPg, `pg-${i}`)).toEqual(duckTables);
      // The thread answered the group comparison (not an error reply): its answers name the group.
      const answers = answersOf(duck);
      expect(answers.length).toBeGreaterThan(1);
      expect(answers.every((a) => /(pass holders|refunded customers)/i.test(a))).toBe(true);
      expect(answers.some((a) => a.includes('per customer per month'))).toBe(true);
    }, 300_000);
  });

  it('states the pass holders\u2019 bookings since the launch as the test\u2019s own SQL counts them', async () => {
    const answer = answersOf(threads[0]!.pg)[0]!;
    // The data ends on 18 June 2025 (the demo's last sail date); the answer's period is launch to end.
    const [row] = await query<{ members: string; others: string; m: string; o: string }>(
      `SELECT count(*) FILTER (WHERE pass_holder) AS members, count(*) FILTER (WHERE NOT pass_holder) AS others,
         avg(passengers) FILTER (WHERE pass_holder) AS m, avg(passengers) FILTER (WHERE NOT pass_holder) AS o
       FROM ${table} WHERE sail_date >= DATE '2023-04-01'`,
    );
    expect(answer).toContain(`over ${fmt(Number(row!.members))} and ${fmt(Number(row!.others))} bookings`);
    expect(answer).toContain(`are ${Number(row!.m).toFixed(2)} against ${Number(row!.o).toFixed(2)}`);
  });

  it('follows the refunded customers across the launch as the test\u2019s own SQL finds them', async () => {
    const answer = answersOf(threads[2]!.pg).find((a) => a.includes('per customer per month'))!;
    // Customers seen in both 12-month windows around 2024-01-01, split by a refund after it; each
    // side's passengers per customer per month (12 months a side).
    const [row] = await query<{ n: string; before: string; after: string }>(
      `WITH panel AS (
         SELECT customer_id FROM ${table} WHERE sail_date >= DATE '2023-01-01' AND sail_date < DATE '2024-01-01'
         INTERSECT
         SELECT customer_id FROM ${table} WHERE sail_date >= DATE '2024-01-01' AND sail_date < DATE '2025-01-01' AND refunded
       )
       SELECT (SELECT count(*) FROM panel) AS n,
         sum(passengers) FILTER (WHERE sail_date < DATE '2024-01-01') / 12.0 / (SELECT count(*) FROM panel) AS before,
         sum(passengers) FILTER (WHERE sail_date >= DATE '2024-01-01') / 12.0 / (SELECT count(*) FROM panel) AS after
       FROM ${table} WHERE customer_id IN (SELECT customer_id FROM panel) AND sail_date >= DATE '2023-01-01' AND sail_date < DATE '2025-01-01'`,
    );
    expect(Number(row!.n)).toBeGreaterThan(100);
    expect(answer).toContain(`${fmt(Number(row!.n))} refunded customers went from ${Number(row!.before).toFixed(3)} to ${Number(row!.after).toFixed(3)} passengers a month each`);
    // The verdict and its bootstrap interval are the same on both engines (the posts above match word for word).
    expect(answer).toMatch(/95% interval [+−-][\d.]+% to [+−-][\d.]+%, bootstrap over customers/);
  });
});
