// `threadcount serve`: the bot on a dataset, answering in every chat whose tokens are set (the
// local channel always). One Bot, one persistent store; each adapter delivers messages through
// one inbox and receives posts through one router.
import pLimit from 'p-limit';
import { readSecrets } from '../config/secrets.js';
import { closeWorkspaces, openWorkspaces } from './workspaces.js';
import { Bot } from '../bot/Bot.js';
import { presentAnswer, presentSummary } from '../bot/present-answer.js';
import { DuckDbStateStore } from '../bot/stores/DuckDbStateStore.js';
import type { ChatAdapter, Deliver, KnownThread } from '../adapters/chat-adapter.js';
import { DiscordAdapter } from '../adapters/discord/DiscordAdapter.js';
import { LocalChannel } from '../adapters/local-channel/LocalChannel.js';
import { PortRouter } from '../adapters/PortRouter.js';
import { SlackAdapter } from '../adapters/slack/SlackAdapter.js';
import { ThreadInbox } from '../adapters/ThreadInbox.js';
import type { Environment } from '../config/environment.js';
import { loadConfig } from '../config/load.js';

export interface ServeOptions {
  configFile: string;
  /** The DuckDB file that keeps conversations across restarts. */
  statePath: string;
  environment: Environment;
  log?: (line: string) => void;
  /** How often reminders and deadline warnings are checked. */
  tickMs?: number;
}

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
  const workspaces = await openWorkspaces(config, readSecrets(config));
  const store = await DuckDbStateStore.open(opts.statePath).catch(async (err: unknown) => {
    await closeWorkspaces(workspaces);
    throw err;
  });
  const knows: KnownThread = async (threadId) => (await store.get(threadId)) !== undefined;

  // The bot needs the router and the adapters need the inbox: deliver is bound late.
  let inbox: ThreadInbox | undefined;
  const deliver: Deliver = (msg) => inbox!.deliver(msg);
  const env = opts.environment;
  const local = new LocalChannel({ host: env.local.host, port: env.local.port, deliver });
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
  } catch (err) {
    for (const a of started) await a.stop().catch(() => undefined);
    await store.close();
    await closeWorkspaces(workspaces);
    throw err;
  }

  // Runs that were under way before a restart carry on; this may take a while, so not awaited.
  bot.resume().catch((err: unknown) => log(`threadcount: resuming earlier runs failed: ${err instanceof Error ? err.message : String(err)}`));
  const timer = setInterval(() => {
    bot.tick().catch((err: unknown) => log(`threadcount: reminder check failed: ${err instanceof Error ? err.message : String(err)}`));
  }, opts.tickMs ?? 60_000);
  timer.unref();

  return {
    localUrl: local.url,
    adapters: adapters.map((a) => a.name),
    inbox,
    local,
    async stop() {
      clearInterval(timer);
      for (const a of [...started].reverse()) await a.stop().catch((err: unknown) => log(`threadcount: stopping ${a.name}: ${String(err)}`));
      await inbox!.idle();
      await store.close();
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
