// Team deployment, end to end with real processes: two `threadcount serve` replicas on one
// PostgreSQL, driven only through the local channel's HTTP API.
//  - 200 requests sent at once, split across both: every one is recorded and answered, once.
//  - 100 requests taken through their prompts and plan, each message sent to the replica the
//    previous one did not go to; one replica is killed with SIGKILL while it is running plans,
//    and nothing else is started. Every request finishes exactly once, counted from the audit
//    log (one finished run per thread) and from the messages the threads show.
// Runs are cheap (a 5,000-row demo, a four-item plan); nothing here asserts a duration.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pg from 'pg';
import pLimit from 'p-limit';
import { afterAll, beforeAll, expect, it } from 'vitest';
import type { LocalMessage } from '../../adapters/local-channel/local-thread-log.js';
import { generateDemo } from '../../config/demo/generate-demo.js';
import { describeWithPostgres, uniqueName, withClient } from '../helpers/postgres.js';
import { waitWhileMoving } from '../helpers/wait-for.js';
import { buildCli, startReplica, withSharedState, type Replica, pollReplica, replicaApi } from './replica-process.js';

const REQUEST = 'How has revenue moved month by month?';
const STATE_ENV = 'THREADCOUNT_STATE_URL';

describeWithPostgres('two replicas on one PostgreSQL', (pgUrl) => {
  const schema = uniqueName('tc_deploy');
  let build: Awaited<ReturnType<typeof buildCli>>;
  let configPath: string;
  const replicas: Replica[] = [];
  let db: pg.Pool;

  beforeAll(async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tc-deploy-'));
    const [built, demo] = await Promise.all([buildCli(), generateDemo({ outDir: join(dir, 'demo'), rows: 5000 })]);
    build = built;
    configPath = join(dir, 'demo', 'replicas.yaml');
    // Small expiry and a frequent check, so a dead replica's runs come back quickly.
    withSharedState(demo.configPath, configPath, {
      kind: 'postgres',
      url_env: STATE_ENV,
      schema,
      runs_per_replica: 2,
      run_expiry_seconds: 20,
      run_retries: 5,
      expiry_check_seconds: 1,
    });
    // Both start together: creating the tables must not trip over the other replica.
    replicas.push(...(await Promise.all(['A', 'B'].map((name) => startReplica(build.dir, name, configPath, { [STATE_ENV]: pgUrl })))));
    db = new pg.Pool({ connectionString: pgUrl, max: 2 });
  });

  afterAll(async () => {
    await Promise.all(replicas.map((r) => r.stop()));
    await db?.end();
    build?.remove();
    await withClient(pgUrl, async (c) => {
      for (const s of [schema, `${schema}_queue`]) await c.query(`DROP SCHEMA IF EXISTS ${pg.escapeIdentifier(s)} CASCADE`);
    });
  });

  const table = (name: string) => `${pg.escapeIdentifier(schema)}.${pg.escapeIdentifier(name)}`;
  const alive = () => replicas.filter((r) => r.child.exitCode === null && r.child.signalCode === null);

  const poll = <T>(what: string, check: () => Promise<T | undefined>, timeoutMs = 180_000, everyMs = 200) => pollReplica(what, check, timeoutMs, everyMs);
  const thread = async (r: Replica, id: string) => (await replicaApi<{ messages: LocalMessage[] }>(r, `/api/threads/${id}`)).json;

  async function auditOf(threadIds: string[]) {
    const r = await db.query<{ thread_id: string; kind: string; detail: Record<string, unknown> }>(
      `SELECT thread_id, kind, detail FROM ${table('audit')} WHERE thread_id = ANY($1) ORDER BY seq`,
      [threadIds],
    );
    return r.rows;
  }

  it('takes 200 requests sent at once to both replicas: each recorded once and answered', async () => {
    const [a, b] = replicas as [Replica, Replica];
    const sent = await Promise.all(
      Array.from({ length: 200 }, (_, i) => replicaApi<{ threadId: string }>(i % 2 ? b : a, '/api/threads', { author: `sender ${i}`, text: `${REQUEST} (${i})` })),
    );
    expect(sent.map((s) => s.status)).toEqual(sent.map(() => 201));
    const ids = sent.map((s) => s.json.threadId);
    expect(new Set(ids).size).toBe(200);

    // Answered: each thread's last message is the bot asking its first question.
    const mine = new Set(ids);
    const listed = await poll('every request to be answered', async () => {
      const { json } = await replicaApi<{ threads: { id: string; waiting: boolean; messageCount: number }[] }>(a, '/api/threads');
      const ours = json.threads.filter((t) => mine.has(t.id));
      return ours.length === 200 && ours.every((t) => t.waiting) ? ours : undefined;
    });
    // Both replicas list the same threads.
    const fromB = (await replicaApi<{ threads: { id: string }[] }>(b, '/api/threads')).json.threads.filter((t) => mine.has(t.id));
    expect(fromB.map((t) => t.id).sort()).toEqual(listed.map((t) => t.id).sort());

    const botIds = ids.map((id) => `local:${id}`);
    const audit = await auditOf(botIds);
    for (const id of botIds) {
      const entries = audit.filter((e) => e.thread_id === id);
      expect(entries.filter((e) => e.kind === 'request')).toHaveLength(1);
      const posts = entries.filter((e) => e.kind === 'post');
      // Each post once: distinct keys, and as many as the thread shows from the bot.
      expect(new Set(posts.map((p) => p.detail.key)).size).toBe(posts.length);
      expect(posts.length).toBe(listed.find((t) => `local:${t.id}` === id)!.messageCount - 1);
    }
    const sample = await thread(b, ids[0]!);
    expect(sample.messages.filter((m) => !m.fromBot).map((m) => m.text)).toEqual([`${REQUEST} (0)`]);
  });

  it('finishes 100 requests exactly once although one replica is killed mid-run', async () => {
    const [a, b] = replicas as [Replica, Replica];
    const n = 100;
    // Each message goes to the replica the previous one did not; the killed one is skipped.
    const pick = (k: number) => {
      const live = alive();
      return live[k % live.length]!;
    };
    const converse = async (i: number): Promise<string> => {
      const created = await replicaApi<{ threadId: string }>(pick(i), '/api/threads', { author: `requester ${i}`, text: REQUEST });
      expect(created.status).toBe(201);
      const id = created.json.threadId;
      const answered = new Set<string>();
      for (let turn = 1; turn < 12; turn++) {
        const last = await poll(`a question in thread ${i}`, async () => {
          const m = (await thread(pick(i + turn), id)).messages.at(-1);
          return m?.fromBot && (m.prompt || m.quickReplies) && !answered.has(m.id) ? m : undefined;
        });
        answered.add(last.id);
        const reply = await replicaApi(pick(i + turn + 1), `/api/threads/${id}/messages`, { author: `requester ${i}`, text: last.prompt ? last.prompt.recommended.value : 'go' });
        expect(reply.status).toBe(201);
        if (!last.prompt) break;
      }
      return id;
    };
    const limit = pLimit(20);
    const ids = await Promise.all(Array.from({ length: n }, (_, i) => limit(() => converse(i))));
    const botIds = ids.map((id) => `local:${id}`);

    const finished = async () =>
      Number((await db.query<{ n: string }>(`SELECT count(*) AS n FROM ${table('audit')} WHERE kind = 'run' AND detail->>'event' = 'finished' AND thread_id = ANY($1)`, [botIds])).rows[0]!.n);
    // What is left when the count stops: each unfinished thread's stage and posts, and its job in the queue.
    const unfinishedReport = async (threadIds: string[]) => {
      const left = await db.query<{ thread_id: string; stage: string; posted: number | null }>(
        `SELECT t.thread_id, t.stage, jsonb_array_length(t.state->'run'->'posted') AS posted FROM ${table('threads')} t
         WHERE t.thread_id = ANY($1) AND NOT EXISTS (SELECT 1 FROM ${table('audit')} f WHERE f.thread_id = t.thread_id AND f.kind = 'run' AND f.detail->>'event' = 'finished')`,
        [threadIds],
      );
      const jobs = await db
        .query<{ data: { threadId: string }; state: string; retry_count: number }>(`SELECT data, state, retry_count FROM ${pg.escapeIdentifier(`${schema}_queue`)}.job`)
        .then((r) => r.rows)
        .catch((err: Error) => [{ data: { threadId: '?' }, state: `(queue unreadable: ${err.message})`, retry_count: 0 }]);
      const lines = left.rows.map((t) => {
        const js = jobs.filter((j) => j.data?.threadId === t.thread_id).map((j) => `${j.state}/retries ${j.retry_count}`);
        return `${t.thread_id}: stage ${t.stage}, ${t.posted ?? '?'} posted, jobs [${js.join(', ')}]`;
      });
      return `${left.rows.length} unfinished:\n${lines.join('\n')}\nB's log tail:\n${b.stderr().slice(-3000)}`;
    };
    const unfinishedOnA = async () =>
      (
        await db.query<{ thread_id: string }>(
          `SELECT DISTINCT s.thread_id FROM ${table('audit')} s
           WHERE s.kind = 'run' AND s.detail->>'event' = 'started' AND s.detail->>'replica' = $1 AND s.thread_id = ANY($2)
             AND NOT EXISTS (SELECT 1 FROM ${table('audit')} f WHERE f.thread_id = s.thread_id AND f.kind = 'run' AND f.detail->>'event' = 'finished')`,
          [a.replicaName, botIds],
        )
      ).rows.map((r) => r.thread_id);

    // Every "go" has been taken (no message is in flight to the replica about to die)...
    await poll('every plan to be agreed', async () => {
      const r = await db.query<{ n: string }>(`SELECT count(*) AS n FROM ${table('threads')} WHERE thread_id = ANY($1) AND stage IN ('running', 'done')`, [botIds]);
      return Number(r.rows[0]!.n) === n ? true : undefined;
    });
    // ...then A is frozen while it is part-way through a run, checked while frozen, and killed.
    let cutOff: string[] = [];
    for (let attempt = 0; attempt < 200 && cutOff.length === 0; attempt++) {
      await poll('replica A to be running a plan', async () => ((await unfinishedOnA()).length > 0 ? true : undefined), 120_000, 50);
      a.child.kill('SIGSTOP');
      cutOff = await unfinishedOnA();
      if (cutOff.length === 0) a.child.kill('SIGCONT');
    }
    expect(cutOff.length).toBeGreaterThan(0);
    const doneAtKill = await finished();
    a.child.kill('SIGKILL');
    await new Promise<void>((resolve) => (a.child.exitCode !== null || a.child.signalCode !== null ? resolve() : a.child.once('exit', () => resolve())));
    expect(a.child.signalCode).toBe('SIGKILL');
    expect(doneAtKill).toBeLessThan(n);

    // Waits as long as runs keep finishing: B alone works through what is left two at a time, which
    // on a loaded machine may take minutes. A run that is never resumed shows as a count that stops.
    await waitWhileMoving('every run to finish on the surviving replica', finished, (k) => k === n, () => unfinishedReport(botIds));
    // The thread's zip follows its summary in a commit of its own: wait for those B owes, so the
    // audit log and the threads are read at rest. (One A finished may have no zip: A died.)
    await poll('the zip of every run the surviving replica finished', async () => {
      const entries = await auditOf(botIds);
      const finishedByB = entries.filter((e) => e.kind === 'run' && e.detail.event === 'finished' && e.detail.replica === b.replicaName).map((e) => e.thread_id);
      const zipped = new Set(entries.filter((e) => e.kind === 'post' && String(e.detail.key).endsWith(':run1:bundle')).map((e) => e.thread_id));
      return finishedByB.every((id) => zipped.has(id)) ? true : undefined;
    }, 120_000, 500);

    const audit = await auditOf(botIds);
    const plans = await db.query<{ thread_id: string; items: { id: string }[] }>(`SELECT thread_id, state->'plan'->'items' AS items FROM ${table('threads')} WHERE thread_id = ANY($1)`, [botIds]);
    expect(plans.rows).toHaveLength(n);
    for (const { thread_id: id, items } of plans.rows) {
      const entries = audit.filter((e) => e.thread_id === id);
      const runs = entries.filter((e) => e.kind === 'run');
      // One finished run per thread, the first.
      expect(runs.filter((e) => e.detail.event === 'finished').map((e) => e.detail.number)).toEqual([1]);
      // An edit in place (the brief card once agreed) is logged under a key of its own but is no new message.
      const edits = entries.filter((e) => e.kind === 'post' && e.detail.edits);
      expect(new Set(edits.map((e) => String(e.detail.key))).size).toBe(edits.length);
      const keys = entries.filter((e) => e.kind === 'post' && !e.detail.edits).map((e) => String(e.detail.key));
      expect(new Set(keys).size).toBe(keys.length);
      // Every answer of the plan was posted, once, and the summary.
      for (const sq of items) expect(keys.filter((k) => k === `${id}:run1:answer:${sq.id}`)).toHaveLength(1);
      expect(keys.filter((k) => k === `${id}:run1:summary`)).toHaveLength(1);
      // What the thread shows matches: one message per post key, each answer's number once.
      const messages = (await thread(b, id.slice('local:'.length))).messages.filter((m) => m.fromBot);
      expect(messages.map((m) => m.text.slice(0, 60)), `post keys: ${keys.join(', ')}`).toHaveLength(keys.length);
      const numbered = messages.map((m) => /^\*(\d+)\. /.exec(m.text)?.[1]).filter(Boolean);
      expect(numbered).toEqual(items.map((_, i) => String(i + 1)));
      expect(messages.filter((m) => m.text.startsWith('*Summary*'))).toHaveLength(1);
    }
    // The runs A was part-way through were finished by B.
    for (const id of cutOff) {
      const fin = audit.find((e) => e.thread_id === id && e.kind === 'run' && e.detail.event === 'finished')!;
      expect(fin.detail.replica).toBe(b.replicaName);
    }
    expect(b.child.exitCode).toBeNull();
    // Bounded by its polls (a shared machine may take minutes); nothing here asserts a duration.
  }, 1_500_000);
});
