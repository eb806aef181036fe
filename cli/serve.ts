// `threadcount serve`: the bot on a dataset, answering in every chat whose tokens are set (the
// local channel always). One Bot, one persistent store; each adapter delivers messages through
// one inbox and receives posts through one router. With the state in PostgreSQL this process is
// one replica of several: they share the threads, and agreed runs go through a shared queue.
import { lookup } from 'node:dns/promises';
import pLimit from 'p-limit';
import { EnvironmentError, readSecrets } from '../config/environment.js';
import { closeWorkspaces, openWorkspaces } from './workspaces.js';
import { sweepUnhandled } from '../adapters/local-channel/unhandled-sweep.js';
import { startersFor } from '../adapters/local-channel/starters.js';
import { openFileState, openSharedState, sharedStateUrl, type StateBackend } from './state-backend.js';
import { Bot } from '../bot/Bot.js';
import { presentAnswer, presentSummary } from '../bot/present-answer.js';
import type { ChatAdapter, Deliver, KnownThread } from '../adapters/chat-adapter.js';
import { DiscordAdapter } from '../adapters/discord/DiscordAdapter.js';
import { isLoopbackAddress } from '../adapters/local-channel/local-access.js';
import { LocalChannel, OpenBeyondLoopbackError } from '../adapters/local-channel/LocalChannel.js';
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
  /** How long stopping may take before what is still going on is left (to be resumed after a restart). */
  stopWithinMs?: number;
}

// A message not handled a minute after it was accepted is taken as lost with its replica
// (a burst of 200 requests is answered within a few seconds here); a day back is looked at.
const SWEEP = { everyMs: 30_000, minAgeMs: 60_000, maxAgeMs: 24 * 3_600_000 };

// Orchestrators commonly allow 10 s between SIGTERM and SIGKILL; stopping leaves a margin.
const STOP_WITHIN_MS = 8_000;

export const ACCESS_TOKEN_VARIABLE = 'THREADCOUNT_ACCESS_TOKEN';

export interface Serving {
  localUrl: string;
  /** Requests to start from, drawn from the served data: the page offers them, the start-up hint the first. */
  starters: string[];
  /** Where Slack's Events API requests are received, when Slack runs over HTTP. */
  slackEventsUrl?: string;
  adapters: string[];
  inbox: ThreadInbox;
  local: LocalChannel;
  stop(): Promise<void>;
}

export async function serve(opts: ServeOptions): Promise<Serving> {
  const log = opts.log ?? ((line: string) => process.stderr.write(`${line}\n`));
  const config = loadConfig(opts.configFile);
  const env = opts.environment;
  // Beyond loopback the page and API need a token: refused before anything is opened.
  if (!env.local.accessToken) await refuseOpenBeyondLoopback(env.local.host);
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
  const starters = startersFor([...workspaces.values()].map((w) => ({ dataset: w.dataset, coverage: w.coverage })));

  // The bot needs the router and the adapters need the inbox: deliver is bound late.
  let inbox: ThreadInbox | undefined;
  const deliver: Deliver = (msg) => inbox!.deliver(msg);
  const local = new LocalChannel({
    host: env.local.host,
    port: env.local.port,
    deliver,
    threads: backend.threads,
    ...(env.local.accessToken ? { accessToken: env.local.accessToken } : {}),
    starters,
  });
  const adapters: ChatAdapter[] = [local];
  const slack = env.slack ? new SlackAdapter({ env: env.slack, deliver, knows, log }) : undefined;
  if (slack) adapters.push(slack);
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
    log,
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
    // A channel that never started still holds its thread log.
    if (!started.includes(local)) await backend.threads.close().catch(() => undefined);
    await backend.close();
    await closeWorkspaces(workspaces);
    if (err instanceof OpenBeyondLoopbackError) throw openBeyondLoopback(env.local.host, err.address);
    throw err;
  }

  const threadLog = backend.threads;
  const sweep = (minAgeMs: number, now: Date) =>
    sweepUnhandled({ threads: threadLog, store, deliver, now, minAgeMs, maxAgeMs: SWEEP.maxAgeMs }).then(
      (n) => {
        if (n > 0) log(`threadcount: ${n} message(s) accepted but never handled (a process stopped) delivered again`);
      },
      (err: unknown) => log(`threadcount: the sweep for unhandled messages failed: ${err instanceof Error ? err.message : String(err)}`),
    );
  const startedAt = new Date();
  // What was under way before a restart carries on: posts decided and not yet made, runs, and
  // (with the state file, which no other process shares) messages accepted and never handled.
  // This may take a while, so it is not awaited.
  let stopping = false;
  const resuming = bot
    .resume()
    .catch((err: unknown) => log(`threadcount: resuming earlier work failed: ${err instanceof Error ? err.message : String(err)}`))
    .then(() => (backend.shared || stopping ? undefined : sweep(0, startedAt)))
    .catch(() => undefined);
  const timer = setInterval(() => {
    bot.tick().catch((err: unknown) => log(`threadcount: reminder check failed: ${err instanceof Error ? err.message : String(err)}`));
  }, opts.tickMs ?? 60_000);
  timer.unref();
  // Replicas: a message another replica accepted and did not live to handle is swept now and then.
  const sweeper = backend.shared ? setInterval(() => void sweep(opts.sweep?.minAgeMs ?? SWEEP.minAgeMs, new Date()), opts.sweep?.everyMs ?? SWEEP.everyMs) : undefined;
  sweeper?.unref();

  return {
    localUrl: local.url,
    starters,
    ...(env.slack?.mode === 'http' && slack ? { slackEventsUrl: slack.eventsUrl } : {}),
    adapters: adapters.map((a) => a.name),
    inbox,
    local,
    async stop() {
      stopping = true;
      clearInterval(timer);
      if (sweeper) clearInterval(sweeper);
      // Whatever the network does, stopping ends in time: what is left is resumed after a restart.
      const until = Date.now() + (opts.stopWithinMs ?? STOP_WITHIN_MS);
      // Each step may use the time left, less what the steps after it keep for themselves.
      const within = (what: string, work: Promise<unknown>, keepMs = 0) => finishBy(until - keepMs, what, work, log);
      bot.stop();
      // No new runs; one under way gets a grace period, then is left to another replica.
      await within('stopping the run queue', queue?.stop() ?? Promise.resolve(), 3_000);
      for (const a of [...started].reverse()) await within(`stopping ${a.name}`, a.stop(), 2_500);
      // A reply waiting on a platform that does not answer is left in its thread's outbox, and posted after a restart.
      await within('messages being handled', inbox!.idle(), 1_500);
      // The start-up sweep reads the state: it ends (or is skipped) before the state closes.
      await within('taking up earlier work', resuming, 1_000);
      await within('closing the state', backend.close(), 500);
      await within('closing the datasets', closeWorkspaces(workspaces));
    },
  };
}

/** Waits for `work` until the deadline; a failure or an overrun is logged, never thrown. */
async function finishBy(until: number, what: string, work: Promise<unknown>, log: (line: string) => void): Promise<void> {
  let timer: NodeJS.Timeout | undefined;
  const late = new Promise<'late'>((resolve) => (timer = setTimeout(() => resolve('late'), Math.max(0, until - Date.now()))));
  const outcome = await Promise.race([work.then(() => 'done' as const, (err: unknown) => err), late]);
  clearTimeout(timer);
  if (outcome === 'late') log(`threadcount: stopped without waiting longer for ${what}`);
  else if (outcome !== 'done') log(`threadcount: ${what}: ${outcome instanceof Error ? outcome.message : String(outcome)}`);
}

/** The local channel would be reachable beyond this machine with no token: refused, naming the variable. */
async function refuseOpenBeyondLoopback(host: string): Promise<void> {
  const addresses = await lookup(host, { all: true }).catch(() => []);
  const beyond = addresses.find((a) => !isLoopbackAddress(a.address));
  if (beyond) throw openBeyondLoopback(host, beyond.address);
}

function openBeyondLoopback(host: string, address: string): EnvironmentError {
  return new EnvironmentError([
    `THREADCOUNT_HOST=${host} makes the local channel reachable beyond this machine (${address}), and its page and API would be open to anyone who reaches it: set ${ACCESS_TOKEN_VARIABLE} (at least 24 characters, e.g. from "openssl rand -hex 32"), or keep THREADCOUNT_HOST on loopback`,
  ]);
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
