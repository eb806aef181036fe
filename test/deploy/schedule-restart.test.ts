// A scheduled rerun survives a crash and runs once across replicas: a real `threadcount serve`
// (state and the local channel's threads in PostgreSQL, where the page's threads outlive the
// process) takes
// a request to its summary, is told "every day at HH:MM" (a couple of minutes ahead), is killed
// with SIGKILL, and is started again beside a second replica on the same database. When due, the
// plan reruns once (one run started in the audit log, by either replica) into the same thread. Nothing here asserts a duration; the wait is for the clock.
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { parse } from 'yaml';
import type { LocalMessage } from '../../adapters/local-channel/local-thread-log.js';
import { generateDemo } from '../../config/demo/generate-demo.js';
import { describeWithPostgres, uniqueName, withClient } from '../helpers/postgres.js';
import { waitFor } from '../helpers/wait-for.js';
import { buildCli, startReplica, withSharedState, type Replica } from './replica-process.js';

const STATE_ENV = 'THREADCOUNT_STATE_URL';

describeWithPostgres('a schedule across a crash', (pgUrl) => {
  const schema = uniqueName('tc_sched_restart');
  let build: Awaited<ReturnType<typeof buildCli>>;
  let configPath: string;
  let running: Replica | undefined;
  let second: Replica | undefined;
  const start = (name: string) => startReplica(build.dir, name, configPath, { [STATE_ENV]: pgUrl });

  beforeAll(async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tc-sched-restart-'));
    const [built, demo] = await Promise.all([buildCli(), generateDemo({ outDir: join(dir, 'demo'), rows: 5000 })]);
    build = built;
    configPath = join(dir, 'demo', 'scheduled.yaml');
    withSharedState(demo.configPath, configPath, { kind: 'postgres', url_env: STATE_ENV, schema });
  }, 300_000);

  afterAll(async () => {
    await running?.stop();
    await second?.stop();
    build?.remove();
    await withClient(pgUrl, async (c) => {
      for (const s of [schema, `${schema}_queue`]) await c.query(`DROP SCHEMA IF EXISTS ${pg.escapeIdentifier(s)} CASCADE`);
    });
  });

  async function api<T>(r: Replica, path: string, body?: unknown): Promise<T> {
    const res = await fetch(`${r.url}${path}`, body ? { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) } : {});
    expect(res.status).toBeLessThan(300);
    return (await res.json()) as T;
  }

  const messages = async (r: Replica, id: string) => (await api<{ messages: LocalMessage[] }>(r, `/api/threads/${id}`)).messages;

  it('keeps a schedule across a kill -9 and a restart; with two replicas the rerun posts into the same thread once', async () => {
    const zone = (parse(readFileSync(configPath, 'utf8')) as { datasets: { timezone: string }[] }).datasets[0]!.timezone;
    running = await start('A');
    const { threadId } = await api<{ threadId: string }>(running, '/api/threads', { author: 'maren', text: 'How has revenue moved month by month?' });
    // Through any question and the brief card to the summary.
    const answered = new Set<string>();
    for (let turn = 0; turn < 12; turn++) {
      const r = running;
      const last = await waitFor('a question', async () => {
        const m = (await messages(r, threadId)).at(-1);
        return m?.fromBot && (m.prompt || m.quickReplies) && !answered.has(m.id) ? m : undefined;
      }, 120_000);
      answered.add(last.id);
      await api(running, `/api/threads/${threadId}/messages`, { author: 'maren', text: last.prompt ? last.prompt.recommended.value : 'go' });
      if (!last.prompt) break;
    }
    await waitFor('the summary', async () => (await messages(running!, threadId)).find((m) => m.text.startsWith('*Summary*')), 180_000);

    // Due a couple of minutes from now, said as the requester would: the time in the dataset's zone.
    const due = new Date(Math.ceil((Date.now() + 100_000) / 60_000) * 60_000);
    const hhmm = new Intl.DateTimeFormat('en-GB', { hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZone: zone }).format(due);
    await api(running, `/api/threads/${threadId}/messages`, { author: 'maren', text: `every day at ${hhmm}` });
    const setReply = await waitFor('the schedule said back', async () => (await messages(running!, threadId)).find((m) => m.fromBot && m.text.startsWith('I will rerun this')), 60_000);
    expect(setReply.text).toContain(`every day at ${hhmm} ${zone}`);

    // Killed, not stopped: nothing gets to write on the way out.
    const killed = running;
    const exited = new Promise((resolve) => killed.child.once('exit', resolve));
    killed.child.kill('SIGKILL');
    await exited;
    expect(killed.child.signalCode).toBe('SIGKILL');
    [running, second] = await Promise.all([start('A again'), start('B')]);

    const restarted = running;
    await waitFor('the scheduled rerun\'s summary', async () => {
      // Gently: the clock, not the process, is what is waited for.
      await new Promise((r) => setTimeout(r, 1_000));
      const all = await messages(restarted, threadId);
      return all.filter((m) => m.text.startsWith('*Summary*')).length >= 2 ? all : undefined;
    }, 400_000);
    // A little longer, in case a second rerun of the same due time were on its way.
    await new Promise((r) => setTimeout(r, 5_000));
    const all = await messages(restarted, threadId);
    const rerun = all.filter((m) => m.fromBot && m.text.startsWith(`Scheduled rerun (every day at ${hhmm} ${zone})`));
    expect(rerun).toHaveLength(1);
    expect(Date.parse(rerun[0]!.createdAt)).toBeGreaterThanOrEqual(due.getTime());
    expect(all.filter((m) => m.text.startsWith('*Summary*'))).toHaveLength(2);
    expect(all.filter((m) => m.text.startsWith('*Everything above in one file*'))).toHaveLength(2);
    // Both replicas checked the schedule; the audit log shows the second run started once.
    await withClient(pgUrl, async (c) => {
      const runs = await c.query<{ event: string; number: number }>(
        `SELECT detail->>'event' AS event, (detail->>'number')::int AS number FROM ${pg.escapeIdentifier(schema)}.audit WHERE thread_id = $1 AND kind = 'run' ORDER BY seq`,
        [`local:${threadId}`],
      );
      expect(runs.rows).toEqual([
        { event: 'started', number: 1 },
        { event: 'finished', number: 1 },
        { event: 'started', number: 2 },
        { event: 'finished', number: 2 },
      ]);
    });
    const told = await api<{ messageId: string }>(restarted, `/api/threads/${threadId}/messages`, { author: 'maren', text: 'when does it run?' });
    expect(told.messageId).toBeTruthy();
    const reply = await waitFor('the schedule told', async () => (await messages(restarted, threadId)).find((m) => m.text.startsWith('This thread reruns')), 60_000);
    expect(reply.text).toContain(`every day at ${hhmm} ${zone}`);
  }, 900_000);
});
