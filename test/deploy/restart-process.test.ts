// Restarts with real processes, on the embedded state file: `threadcount serve` is spawned,
// driven through the local channel's HTTP API, stopped with SIGKILL or SIGTERM at several points
// (mid-run while another thread waits on its plan, right after a reply to a prompt, right after
// "go", and at random moments of runs), and started again on the same state file. Every thread
// must finish with each answer posted exactly once: counted from the thread's messages as the
// API shows them and from the audit log read from the state file once the server has stopped.
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DuckDbThreadLog } from '../../adapters/local-channel/DuckDbThreadLog.js';
import type { LocalMessage } from '../../adapters/local-channel/local-thread-log.js';
import { DuckDbStateStore } from '../../bot/stores/DuckDbStateStore.js';
import { DEMO_REQUEST } from '../../cli/main.js';
import { SseClient } from '../helpers/sse-client.js';
import { demoServeFixture, pollReplica, replicaApi, type Replica } from './replica-process.js';

interface Thread {
  id: string;
  messages: LocalMessage[];
}

describe('serve on its state file, stopped hard and started again', () => {
  const fx = demoServeFixture('tc-restart-');

  async function start(statePath: string): Promise<Replica> {
    return fx.start({}, ['--state', statePath]);
  }

  async function kill(r: Replica, signal: 'SIGKILL' | 'SIGTERM'): Promise<void> {
    if (r.child.exitCode === null && r.child.signalCode === null) {
      const exited = new Promise<void>((resolve) => r.child.once('exit', () => resolve()));
      r.child.kill(signal);
      await exited;
    }
    fx.forget(r);
  }

  async function thread(r: Replica, id: string): Promise<Thread> {
    const got = await replicaApi<Thread>(r, `/api/threads/${id}`);
    expect(got.status, `thread ${id} as the API shows it`).toBe(200);
    return got.json;
  }

  const botMessages = (t: Thread) => t.messages.filter((m) => m.fromBot);
  const asks = (m: LocalMessage | undefined) => !!m?.fromBot && !!(m.prompt || m.quickReplies);
  const answerNumbers = (t: Thread) => botMessages(t).flatMap((m) => /^\*(\d+)\. /.exec(m.text)?.[1] ?? []);
  const hasSummary = (t: Thread) => botMessages(t).some((m) => m.text.startsWith('*Summary*'));

  /** Waits for the bot's next question after `seen` messages (a prompt or the plan). */
  const nextQuestion = (r: Replica, id: string, seen: number) =>
    pollReplica(`a question in ${id}`, async () => {
      const t = await thread(r, id);
      return t.messages.length > seen && asks(t.messages.at(-1)) ? t : undefined;
    });

  /** A request taken through its prompts (the recommended answers) to the plan. */
  async function toPlan(r: Replica, text: string): Promise<string> {
    const created = await replicaApi<{ threadId: string }>(r, '/api/threads', { author: 'maren', text });
    expect(created.status).toBe(201);
    const id = created.json.threadId;
    let t = await nextQuestion(r, id, 1);
    for (let turn = 0; turn < 12 && t.messages.at(-1)!.prompt; turn++) {
      await say(r, id, t.messages.at(-1)!.prompt!.recommended.value);
      t = await nextQuestion(r, id, t.messages.length + 1);
    }
    expect(t.messages.at(-1)!.text).toMatch(/^\*Here is what I understood\.\*/);
    return id;
  }

  async function say(r: Replica, id: string, text: string): Promise<void> {
    expect((await replicaApi(r, `/api/threads/${id}/messages`, { author: 'maren', text })).status).toBe(201);
  }

  const finished = (r: Replica, id: string) => pollReplica(`the summary in ${id}`, async () => ((await hasSummary(await thread(r, id))) ? true : undefined), 300_000, 250);

  /**
   * Everything the threads show, checked against the audit log in the state file (read once the
   * server has stopped): each post once, each answer of the plan once, one finished run, and each
   * of the requester's messages handled once.
   */
  async function expectExactlyOnce(statePath: string, threads: Thread[]): Promise<void> {
    const store = await DuckDbStateStore.open(statePath, { readOnly: true });
    try {
      for (const shown of threads) {
        const botId = `local:${shown.id}`;
        // The messages as the file holds them once the server stopped: the thread's zip follows its
        // summary in a commit of its own, so the API's view read before the stop may lack it.
        const rows = await store.exclusive((db) => db.rows('SELECT message FROM local_messages WHERE thread_id = $1 ORDER BY position', [shown.id]));
        const t: Thread = { id: shown.id, messages: rows.map((r) => JSON.parse(String(r[0])) as LocalMessage) };
        expect(t.messages.map((m) => m.id).slice(0, shown.messages.length)).toEqual(shown.messages.map((m) => m.id));
        const state = await store.get(botId);
        expect(state?.stage).toBe('done');
        const items = state!.stage === 'done' ? state!.plan.items : [];
        const audit = await store.listAudit({ threadId: botId });
        // An edit in place (the brief card after a correction) is logged under a key of its own and makes no message.
        const keys = audit.filter((e) => e.kind === 'post' && !e.detail.edits).map((e) => String(e.detail.key));
        expect(new Set(keys).size).toBe(keys.length);
        // One message per post key: nothing posted that the log does not show, nothing shown twice.
        expect(botMessages(t)).toHaveLength(keys.length);
        for (const sq of items) expect(keys.filter((k) => k === `${botId}:run1:answer:${sq.id}`)).toHaveLength(1);
        expect(answerNumbers(t)).toEqual(items.map((_, i) => String(i + 1)));
        expect(botMessages(t).filter((m) => m.text.startsWith('*Summary*'))).toHaveLength(1);
        expect(audit.filter((e) => e.kind === 'run' && e.detail.event === 'finished')).toHaveLength(1);
        // Each of the requester's messages was read once.
        const read = audit.filter((e) => e.kind === 'request' || e.kind === 'message').map((e) => e.detail.messageId);
        expect([...read].sort()).toEqual(t.messages.filter((m) => !m.fromBot).map((m) => m.id).sort());
        // Each answer's SQL is in the log once, with its post.
        const sql = audit.filter((e) => e.kind === 'sql' && e.detail.subQuestion !== null);
        for (const sq of items) expect(new Set(sql.filter((e) => e.detail.subQuestion === sq.id).map((e) => e.detail.query)).size).toBe(sql.filter((e) => e.detail.subQuestion === sq.id).length);
      }
    } finally {
      await store.close();
    }
  }

  it('killed mid-run while another thread waits on its plan: both finish after the restart, every answer once', async () => {
    const statePath = join(fx.dir, 'mid-run.duckdb');
    let r = await start(statePath);
    const waiting = await toPlan(r, 'How has revenue moved over time, month by month?');
    // A run long enough to stop part-way: the demo request asks all four kinds of question.
    let runningId = '';
    let cut: Thread | undefined;
    for (let attempt = 0; attempt < 4 && !cut; attempt++) {
      runningId = await toPlan(r, DEMO_REQUEST);
      await say(r, runningId, 'go');
      const seen = await pollReplica('the first answers', async () => {
        const t = await thread(r, runningId);
        return answerNumbers(t).length >= 1 || hasSummary(t) ? t : undefined;
      });
      await kill(r, 'SIGKILL');
      if (!hasSummary(seen)) cut = seen;
      r = await start(statePath);
      if (!cut) await finished(r, runningId);
    }
    expect(cut, 'a run was stopped part-way').toBeDefined();
    // The page's event stream of the running thread works again, from where it was.
    const events = new SseClient();
    await events.open(`${r.url}/api/threads/${runningId}/events`);
    await finished(r, runningId);
    // The waiting thread answers after the restart.
    await say(r, waiting, 'go');
    await finished(r, waiting);
    await events.close();
    expect(events.events.some((e) => e.event === 'message.created' && e.data.includes('*Summary*'))).toBe(true);
    const threads = [await thread(r, runningId), await thread(r, waiting)];
    // The stopped process's progress message is left as it was; the new one says where it carried on.
    const progress = botMessages(threads[0]!).filter((m) => /^(Working|Carrying on|All \d+ done)/.test(m.text));
    expect(progress.length).toBeGreaterThanOrEqual(2);
    expect(progress.at(-1)!.text).toMatch(/^All \d+ done\.$/);
    await kill(r, 'SIGTERM');
    await expectExactlyOnce(statePath, threads);
  }, 600_000);

  it('stopped with SIGTERM mid-run: the run is left and carried on after the restart', async () => {
    const statePath = join(fx.dir, 'sigterm.duckdb');
    let r = await start(statePath);
    const id = await toPlan(r, DEMO_REQUEST);
    await say(r, id, 'go');
    await pollReplica('the first answer', async () => ((answerNumbers(await thread(r, id)).length >= 1 ? true : undefined)));
    await kill(r, 'SIGTERM');
    r = await start(statePath);
    await finished(r, id);
    const t = await thread(r, id);
    await kill(r, 'SIGTERM');
    await expectExactlyOnce(statePath, [t]);
  }, 600_000);

  it('killed right after a reply to a prompt, a correction to the card, and "go": nothing is lost and nothing posted twice', async () => {
    const statePath = join(fx.dir, 'replies.duckdb');
    let r = await start(statePath);
    // No measure named: the bot asks for one before it can post the card.
    const created = await replicaApi<{ threadId: string }>(r, '/api/threads', { author: 'maren', text: 'How have things moved over time?' });
    const id = created.json.threadId;
    // At every question: the reply is accepted (201), then the process is killed at once.
    let t = await nextQuestion(r, id, 1);
    let prompts = 0;
    for (let turn = 0; turn < 12 && t.messages.at(-1)!.prompt; turn++) {
      await say(r, id, t.messages.at(-1)!.prompt!.recommended.value);
      prompts++;
      await kill(r, 'SIGKILL');
      r = await start(statePath);
      // The reply was read after the restart if not before: the next question comes, once.
      t = await nextQuestion(r, id, t.messages.length + 1);
    }
    expect(prompts, 'the request was asked about before its card').toBeGreaterThan(0);
    const card = t.messages.at(-1)!;
    expect(card.text).toMatch(/^\*Here is what I understood\.\*/);
    // A correction edits the card in place and confirms in one line; killed at once, it is read once.
    await say(r, id, 'for leadership');
    await kill(r, 'SIGKILL');
    r = await start(statePath);
    t = await pollReplica('the correction confirmed', async () => {
      const now = await thread(r, id);
      return now.messages.length > t.messages.length + 1 ? now : undefined;
    });
    await say(r, id, 'go');
    await kill(r, 'SIGKILL');
    r = await start(statePath);
    await finished(r, id);
    const done = await thread(r, id);
    const edited = done.messages.find((m) => m.id === card.id)!;
    expect(edited.updatedAt, 'the card was edited in place').toBeDefined();
    expect(edited.text).not.toBe(card.text);
    // Each question was asked once: no prompt or card message repeated.
    const questions = done.messages.filter(asks).map((m) => m.text);
    expect(new Set(questions).size).toBe(questions.length);
    await kill(r, 'SIGTERM');
    await expectExactlyOnce(statePath, [done]);
  }, 600_000);

  it('a reply accepted and never handled (the process died first) is read after the restart', async () => {
    const statePath = join(fx.dir, 'unhandled.duckdb');
    let r = await start(statePath);
    const id = await toPlan(r, 'How has revenue moved over time, month by month?');
    await kill(r, 'SIGTERM');
    // What a process leaves when it dies between answering 201 and handling the message: the
    // message in the thread log, nothing in the audit log.
    const store = await DuckDbStateStore.open(statePath);
    const log = await DuckDbThreadLog.open(store);
    const accepted = await log.addPersonMessage(id, 'maren', 'go');
    await store.close();
    r = await start(statePath);
    await finished(r, id);
    const t = await thread(r, id);
    expect(t.messages.filter((m) => m.id === accepted!.id)).toHaveLength(1);
    await kill(r, 'SIGTERM');
    await expectExactlyOnce(statePath, [t]);
  }, 600_000);

  it('killed at random moments of runs, several times over: every answer once', async () => {
    const statePath = join(fx.dir, 'random.duckdb');
    let r = await start(statePath);
    const ids = [await toPlan(r, DEMO_REQUEST), await toPlan(r, 'How have revenue, bookings and passengers moved over time?')];
    for (const id of ids) await say(r, id, 'go');
    // A seeded spread of moments (no Math.random: a failure can be run again as it was).
    const delays = [150, 900, 400, 1300, 60, 700];
    for (const ms of delays) {
      await new Promise((resolve) => setTimeout(resolve, ms));
      await kill(r, 'SIGKILL');
      r = await start(statePath);
      const all = await Promise.all(ids.map((id) => thread(r, id)));
      if (all.every(hasSummary)) break;
    }
    for (const id of ids) await finished(r, id);
    const threads = await Promise.all(ids.map((id) => thread(r, id)));
    await kill(r, 'SIGTERM');
    await expectExactlyOnce(statePath, threads);
  }, 600_000);
});
