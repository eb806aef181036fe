// `threadcount serve`: the bot on a dataset, answering in every chat whose tokens are set (the
// local channel always). One Bot, one persistent store; each adapter delivers messages through
// one inbox and receives posts through one router. With the state in PostgreSQL this process is
// one replica of several: they share the threads, and agreed runs go through a shared queue.
import pLimit from 'p-limit';
import { readSecrets } from '../config/environment.js';
import { closeWorkspaces, openWorkspaces } from './workspaces.js';
import { sweepUnhandled } from '../adapters/local-channel/unhandled-sweep.js';
import { openFileState, openSharedState, sharedStateUrl, type StateBackend } from './state-backend.js';
import { Bot } from '../bot/Bot.js';
import { presentAnswer, presentSummary } from '../bot/present-answer.js';
import type { ChatAdapter, Deliver, KnownThread } from '../adapters/chat-adapter.js';
import { DiscordAdapter } from '../adapters/discord/DiscordAdapter.js';
import { LocalChannel } from '../adapters/local-channel/LocalChannel.js';
import { PortRouter } from '../adapters/PortRouter.js';
import { SlackAdapter } from '../adapters/slack/SlackAdapter.js';
import { ThreadInbox } from '../adapters/ThreadInbox.js';
import type { Environment } from '../config/environment.js';
import { ConfigError, formatProblem, loadConfig } from '../config/load.js';
import { checkConfig } from '../analysis/sources/dataset-check.js';

export interface ServeOptions {
  configFile: string;
  /** The DuckDB file that keeps conversations across restarts (unused when the config's state is in PostgreSQL). */
  statePath: string;
  environment: Environment;
  log?: (line: string) => void;
  /** How often reminders and deadline warnings are checked. */
  tickMs?: number;
  /** With the state in PostgreSQL: how often, and after how long, accepted messages no replica handled are delivered again. */
  sweep?: { everyMs: number; minAgeMs: number };
}

// A message not handled a minute after it was accepted is taken as lost with its replica
// (a burst of 200 requests is answered within a few seconds here); a day back is looked at.
const SWEEP = { everyMs: 30_000, minAgeMs: 60_000, maxAgeMs: 24 * 3_600_000 };

export interface Serving {
  localUrl: string;
  adapters: string[];
  inbox: ThreadInbox;
  local: LocalChannel;
  stop(): Promise<void>;
}

export async function serve(opts: ServeOptions): Promise<Serving> {
  const log = opts.log ?? ((line: string) => process.stderr.write(`${line}\n`));
  const config = loadConfig(opts.configFile);
  // Every dataset is opened: which one a thread uses depends on its channel (the access rules).
  const secrets = readSecrets(config);
  const shared = config.conversation.state;
  // A missing state URL stops start-up before any data is opened.
  if (shared) sharedStateUrl(shared, secrets);
  // A config its data does not bear out stops start-up, with the file, line and key of each problem.
  const check = await checkConfig(config, secrets);
  if (check.problems.length > 0) throw new ConfigError(check.problems);
  for (const w of config.warnings ?? []) log(`threadcount: ${formatProblem(w)}`);
  const workspaces = await openWorkspaces(config, secrets);
  let backend: StateBackend;
  try {
    backend = shared ? await openSharedState(shared, secrets, log) : await openFileState(opts.statePath);
  } catch (err) {
    await closeWorkspaces(workspaces);
    throw err;
  }
  const { store, queue } = backend;
  const knows: KnownThread = async (threadId) => (await store.get(threadId)) !== undefined;

  // The bot needs the router and the adapters need the inbox: deliver is bound late.
  let inbox: ThreadInbox | undefined;
  const deliver: Deliver = (msg) => inbox!.deliver(msg);
  const env = opts.environment;
  const local = new LocalChannel({ host: env.local.host, port: env.local.port, deliver, ...(backend.threads ? { threads: backend.threads } : {}) });
  const adapters: ChatAdapter[] = [local];
  if (env.slack) adapters.push(new SlackAdapter({ env: env.slack, deliver, knows, log }));
  if (env.discord) adapters.push(new DiscordAdapter({ token: env.discord.token, deliver, knows, log }));

  const bot = new Bot({
    workspaces,
    ...(config.access ? { access: config.access } : {}),
    port: new PortRouter(adapters),
    store,
    now: () => new Date(),
    presentAnswer,
    presentSummary,
    jobs: pLimit(config.conversation.max_concurrent_jobs),
    // The config's reminder and deadline-warning times (README: conversation).
    timings: { remindAfterMs: config.conversation.remind_after_minutes * 60_000, deadlineWarningMs: config.conversation.deadline_warning_hours * 3_600_000 },
    ...(queue ? { queue } : {}),
    replica: backend.replica,
  });
  inbox = new ThreadInbox(
    (msg) => bot.handle(msg),
    (err, msg) => log(`threadcount: a message in ${msg.threadId} failed: ${err instanceof Error ? err.message : String(err)}`),
  );

  const started: ChatAdapter[] = [];
  try {
    for (const a of adapters) {
      await a.start();
      started.push(a);
    }
    // Runs agreed on any replica come through the queue; this one takes its share.
    await queue?.work((run) => bot.runQueued(run));
  } catch (err) {
    await queue?.stop().catch(() => undefined);
    for (const a of started) await a.stop().catch(() => undefined);
    // A channel that never started still holds its thread log's connection.
    if (!started.includes(local)) await backend.threads?.close().catch(() => undefined);
    await backend.close();
    await closeWorkspaces(workspaces);
    throw err;
  }

  // Runs that were under way before a restart carry on; this may take a while, so not awaited.
  bot.resume().catch((err: unknown) => log(`threadcount: resuming earlier runs failed: ${err instanceof Error ? err.message : String(err)}`));
  const timer = setInterval(() => {
    bot.tick().catch((err: unknown) => log(`threadcount: reminder check failed: ${err instanceof Error ? err.message : String(err)}`));
  }, opts.tickMs ?? 60_000);
  timer.unref();
  const threadLog = backend.threads;
  const sweepEvery = opts.sweep?.everyMs ?? SWEEP.everyMs;
  const sweeper = threadLog
    ? setInterval(() => {
        sweepUnhandled({ threads: threadLog, store, deliver, now: new Date(), minAgeMs: opts.sweep?.minAgeMs ?? SWEEP.minAgeMs, maxAgeMs: SWEEP.maxAgeMs }).then(
          (n) => {
            if (n > 0) log(`threadcount: ${n} message(s) accepted but never handled (a replica stopped) delivered again`);
          },
          (err: unknown) => log(`threadcount: the sweep for unhandled messages failed: ${err instanceof Error ? err.message : String(err)}`),
        );
      }, sweepEvery)
    : undefined;
  sweeper?.unref();

  return {
    localUrl: local.url,
    adapters: adapters.map((a) => a.name),
    inbox,
    local,
    async stop() {
      clearInterval(timer);
      if (sweeper) clearInterval(sweeper);
      // No new runs; one under way gets a grace period, then is left to another replica.
      await queue?.stop().catch((err: unknown) => log(`threadcount: stopping the run queue: ${String(err)}`));
      for (const a of [...started].reverse()) await a.stop().catch((err: unknown) => log(`threadcount: stopping ${a.name}: ${String(err)}`));
      await inbox!.idle();
      await backend.close();
      await closeWorkspaces(workspaces);
    },
  };
}

/** Serves until SIGINT or SIGTERM, then stops cleanly. */
export async function serveUntilSignal(opts: ServeOptions, announce: (serving: Serving) => void): Promise<void> {
  const serving = await serve(opts);
  announce(serving);
  await new Promise<void>((resolve) => {
    const done = () => {
      process.off('SIGINT', done);
      process.off('SIGTERM', done);
      resolve();
    };
    process.on('SIGINT', done);
    process.on('SIGTERM', done);
  });
  process.stdout.write('Stopping...\n');
  await serving.stop();
}
