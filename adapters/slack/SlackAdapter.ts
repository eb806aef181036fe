// Slack through Bolt: the Events API over HTTP (Bolt checks the signature and refuses requests
// more than five minutes old; this adapter also refuses those dated more than five minutes ahead)
// or Socket Mode, chosen by the environment. A mention in a channel or a direct message starts a
// request; replies stay in the request's thread. Every handler returns at once and the bot works
// afterwards: Slack retries an event not acknowledged within 3 s. The bot's identity (auth.test)
// is learnt in the background and retried while Slack is unreachable, so events are acknowledged
// meanwhile; every Web API call has a timeout and a few retries, so nothing waits on Slack for long.
import { App, HTTPReceiver, LogLevel, webApi, type BlockAction, type types } from '@slack/bolt';
import { createServer, type IncomingMessage as HttpRequest, type Server, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import type { OutgoingPost } from '../../bot/port.js';
import { controlReplyLabel, dateReply, dayInWords, joinChoices } from '../post-view.js';
import type { SlackEnvironment } from '../../config/environment.js';
import type { ChatAdapter, Deliver, KnownThread } from '../chat-adapter.js';
import { SeenIds } from '../SeenIds.js';
import { ACTION, ACTION_PATTERN, answeredBlocks, readCardBlockId, slackMessage } from './slack-blocks.js';
import { clip, SLACK_LIMITS } from './slack-limits.js';
import { slackLogger } from './slack-logger.js';
import { fromSlackText, toMrkdwn } from './slack-text.js';

const PREFIX = 'slack:';

// Slack's own rule for the request timestamp is "within five minutes of now"; Bolt checks only the past side.
const MAX_CLOCK_SKEW_S = 5 * 60;

/**
 * Each Web API call gives up after 5 s and is tried at most three times, backing off 0.5 to 2 s,
 * so a post fails within about 20 s when Slack is unreachable (the client's default retries for
 * about 30 minutes).
 */
export const SLACK_CLIENT_OPTIONS: webApi.WebClientOptions = {
  timeout: 5_000,
  retryConfig: { retries: 2, factor: 2, minTimeout: 500, maxTimeout: 2_000, randomize: true },
};

export interface SlackAdapterOptions {
  env: SlackEnvironment;
  deliver: Deliver;
  knows: KnownThread;
  log?: (line: string) => void;
  /** Where the Events API receiver listens; defaults to all interfaces on env.port. */
  listen?: { host?: string; port?: number };
  /** Web API client settings, over SLACK_CLIENT_OPTIONS (tests turn retries off, or point it elsewhere). */
  clientOptions?: webApi.WebClientOptions;
  /** First wait before auth.test is tried again (doubling up to a minute). */
  identityRetryMs?: number;
}

/** "slack:<channel>:<thread ts>" */
export function slackThreadId(channel: string, threadTs: string): string {
  return `${PREFIX}${channel}:${threadTs}`;
}

/** The access rules' channel key: "slack:<channel id>" (a direct message's channel id starts with D). */
export function slackChannelKey(channel: string): string {
  return `${PREFIX}${channel}`;
}

/** Who the bot is in the workspace, from auth.test. */
interface Identity {
  userId: string;
  botId?: string;
}

export class SlackAdapter implements ChatAdapter {
  readonly name = 'slack';
  readonly app: App;
  /** The Web API client every call goes through (bounded timeouts and retries). */
  readonly web: webApi.WebClient;
  private readonly receiver: HTTPReceiver | undefined;
  private server: Server | undefined;
  // Slack redelivers an event it thinks was missed (X-Slack-Retry-Num says which try); its event_id stays the same.
  private readonly seen = new SeenIds();
  // A click can arrive twice too (a replayed request, a retried delivery): the same action id and action_ts.
  private readonly seenActions = new SeenIds();
  private readonly log: (line: string) => void;
  private identity: Identity | undefined;
  private stopped = false;
  private identityTimer: NodeJS.Timeout | undefined;

  constructor(private readonly opts: SlackAdapterOptions) {
    this.log = opts.log ?? ((line) => process.stderr.write(`${line}\n`));
    const env = opts.env;
    const logger = slackLogger(this.log);
    const clientOptions: webApi.WebClientOptions = { ...SLACK_CLIENT_OPTIONS, ...(env.apiUrl ? { slackApiUrl: env.apiUrl } : {}), ...opts.clientOptions };
    this.web = new webApi.WebClient(env.botToken, { ...clientOptions, logger, logLevel: LogLevel.WARN });
    // Our own authorize: Bolt's default calls auth.test once and, if that fails, fails every event after it.
    const authorize = async () => ({
      botToken: env.botToken,
      ...(this.identity ? { botUserId: this.identity.userId, ...(this.identity.botId ? { botId: this.identity.botId } : {}) } : {}),
    });
    const common = { authorize, logger, logLevel: LogLevel.WARN, clientOptions };
    if (env.mode === 'socket') {
      this.app = new App({ ...common, appToken: env.appToken, socketMode: true });
    } else {
      this.receiver = new HTTPReceiver({ signingSecret: env.signingSecret, endpoints: '/slack/events', logger, logLevel: LogLevel.WARN });
      this.app = new App({ ...common, receiver: this.receiver });
    }
    this.app.error(async (err) => this.log(`slack: ${err.message}`));
    this.listen();
  }

  owns(threadId: string): boolean {
    return threadId.startsWith(PREFIX);
  }

  async start(): Promise<void> {
    void this.learnIdentity();
    if (this.opts.env.mode === 'socket') {
      await this.app.start();
      return;
    }
    // Our own server in front of Bolt's request listener, so a request can be refused before Bolt sees it.
    const receiver = this.receiver!;
    const server = createServer((req, res) => {
      if (this.fromTheFuture(req, res)) return;
      try {
        receiver.requestListener(req, res);
      } catch (err) {
        this.log(`slack: ${err instanceof Error ? err.message : String(err)}`);
        if (!res.headersSent) res.writeHead(500).end();
      }
    });
    const port = this.opts.listen?.port ?? this.opts.env.port;
    const host = this.opts.listen?.host;
    await new Promise<void>((resolve, reject) => {
      server.once('error', reject);
      const listening = () => {
        server.off('error', reject);
        resolve();
      };
      if (host) server.listen(port, host, listening);
      else server.listen(port, listening);
    });
    this.server = server;
  }

  /** Stops at once: the receiver closes its connections; calls still going to Slack are left to their own timeouts. */
  async stop(): Promise<void> {
    this.stopped = true;
    clearTimeout(this.identityTimer);
    if (this.server) {
      const server = this.server;
      this.server = undefined;
      await new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      });
      return;
    }
    if (this.opts.env.mode === 'socket') await this.app.stop();
  }

  /** The Events API address while listening over HTTP (for tests and the start-up message). */
  get eventsUrl(): string {
    const a = this.server?.address() as AddressInfo | null | undefined;
    if (!a) throw new Error('the Slack receiver is not listening over HTTP');
    return `http://${a.family === 'IPv6' ? `[${a.address}]` : a.address}:${a.port}/slack/events`;
  }

  async post(threadId: string, post: OutgoingPost): Promise<string> {
    const { channel, threadTs } = parseThreadId(threadId);
    const message = slackMessage(post);
    const sent = await this.web.chat.postMessage({
      channel,
      thread_ts: threadTs,
      text: message.text,
      ...(message.blocks ? { blocks: message.blocks as types.KnownBlock[] } : {}),
      unfurl_links: false,
      unfurl_media: false,
    });
    if (!sent.ts) throw new Error('Slack did not return the posted message ts');
    if (post.files?.length) {
      // The current upload flow: files.getUploadURLExternal per file, the bytes POSTed to the URL
      // it returns, then one files.completeUploadExternal that shares them in the thread.
      const title = clip(firstLine(post.text), 250);
      await this.web.filesUploadV2({
        channel_id: channel,
        thread_ts: threadTs,
        file_uploads: post.files.map((f) => ({
          file: typeof f.content === 'string' ? Buffer.from(f.content, 'utf8') : f.content,
          filename: f.name,
          title: f.name,
          ...(f.kind === 'chart' ? { alt_text: clip(`Chart: ${title}`, 1000) } : {}),
        })),
      });
    }
    return sent.ts;
  }

  async update(threadId: string, ref: string, text: string, post?: Omit<OutgoingPost, 'key' | 'files'>): Promise<void> {
    const { channel } = parseThreadId(threadId);
    if (!post) {
      await this.web.chat.update({ channel, ts: ref, text: clip(toMrkdwn(text), SLACK_LIMITS.messageText) });
      return;
    }
    // The whole message: a post without blocks leaves none (an empty list clears the old ones).
    const message = slackMessage({ ...post, text });
    await this.web.chat.update({ channel, ts: ref, text: message.text, blocks: (message.blocks ?? []) as types.KnownBlock[] });
  }

  /**
   * A signed request dated more than five minutes ahead is refused (401), as one more than five
   * minutes old is by Bolt: either could be a captured request replayed later.
   */
  private fromTheFuture(req: HttpRequest, res: ServerResponse): boolean {
    const stamp = Number(req.headers['x-slack-request-timestamp']);
    if (!Number.isFinite(stamp) || stamp <= Date.now() / 1000 + MAX_CLOCK_SKEW_S) return false;
    this.log(`slack: refused a request dated ${Math.round(stamp - Date.now() / 1000)} s ahead of this clock`);
    res.writeHead(401, { 'content-type': 'text/plain' }).end('request timestamp is in the future');
    req.resume();
    return true;
  }

  /** auth.test until it answers: the bot's user id tells a mention of the bot apart. Events are acknowledged meanwhile. */
  private async learnIdentity(waitMs = this.opts.identityRetryMs ?? 1_000): Promise<void> {
    if (this.stopped) return;
    try {
      const who = await this.web.auth.test();
      if (!who.user_id) throw new Error('auth.test returned no user_id');
      this.identity = { userId: who.user_id, ...(who.bot_id ? { botId: who.bot_id } : {}) };
    } catch (err) {
      if (this.stopped) return;
      this.log(`slack: auth.test failed (${err instanceof Error ? err.message : String(err)}); events are still acknowledged; trying again in ${Math.round(waitMs / 1000)} s`);
      this.identityTimer = setTimeout(() => void this.learnIdentity(Math.min(waitMs * 2, 60_000)), waitMs);
      this.identityTimer.unref();
    }
  }

  /** The bot's user id: from auth.test, else from the event's own authorizations (Slack names the app's bot user there). */
  private botUserId(contextId: string | undefined, body: { authorizations?: { user_id?: string; is_bot?: boolean }[] }): string | undefined {
    return contextId ?? this.identity?.userId ?? body.authorizations?.find((a) => a.is_bot)?.user_id;
  }

  private listen(): void {
    // A mention in a channel opens a request (or continues one when made inside its thread).
    this.app.event('app_mention', async ({ event, body, context }) => {
      if (!this.first(body, context.retryNum)) return;
      if (!event.user) return;
      const text = fromSlackText(event.text, this.botUserId(context.botUserId, body));
      this.opts.deliver({ threadId: slackThreadId(event.channel, event.thread_ts ?? event.ts), author: event.user, text: text || 'help', channel: slackChannelKey(event.channel) });
    });

    // Direct messages start requests; in channels only replies in a known thread are read.
    this.app.message(async ({ message, body, context }) => {
      if (!this.first(body, context.retryNum)) return;
      if (message.subtype !== undefined || !('user' in message) || !message.user || ('bot_id' in message && message.bot_id)) return;
      const botUserId = this.botUserId(context.botUserId, body);
      const threadTs = message.thread_ts ?? message.ts;
      const threadId = slackThreadId(message.channel, threadTs);
      const text = fromSlackText(message.text ?? '', botUserId);
      if (!text) return;
      if (message.channel_type !== 'im') {
        if (!message.thread_ts || message.thread_ts === message.ts) return;
        // A reply that mentions the bot also arrives as app_mention, which handles it.
        if (botUserId && (message.text ?? '').includes(`<@${botUserId}>`)) return;
        if (!(await this.opts.knows(threadId))) return;
      }
      this.opts.deliver({ threadId, author: message.user, text, channel: slackChannelKey(message.channel) });
    });

    // A click on a prompt's button, select or datepicker, or on a card's control, is delivered as
    // the value it stands for, with the label the requester chose.
    this.app.action<BlockAction>(ACTION_PATTERN, async ({ ack, body, action }) => {
      await ack();
      const message = body.message;
      const channel = body.channel?.id;
      if (!message || !channel) return;
      // The same click delivered again is dropped, as events are by event_id.
      const clickId = `${channel}:${String(message.ts)}:${body.user.id}:${action.action_id}:${action.action_ts}`;
      if (!this.seenActions.first(clickId)) {
        this.log(`slack: dropped a repeated click (${action.action_id} at ${action.action_ts}), already handled`);
        return;
      }
      const chosen = readAction(action, body);
      if (!chosen) return;
      const threadTs = (message.thread_ts as string | undefined) ?? (message.ts as string);
      this.opts.deliver({ threadId: slackThreadId(channel, threadTs), author: body.user.id, text: chosen.value, label: chosen.label, channel: slackChannelKey(channel) });
      // The card keeps its controls: the bot edits it in place with what changed.
      if (chosen.card) return;
      try {
        // A prompt's choices give way to who chose what, so a second click cannot answer twice.
        await this.web.chat.update({
          channel,
          ts: message.ts as string,
          text: (message.text as string | undefined) ?? 'Answered',
          blocks: answeredBlocks((message.blocks as unknown[] | undefined) ?? [], body.user.id, chosen.label) as types.KnownBlock[],
        });
      } catch (err) {
        this.log(`slack: could not mark the prompt answered: ${err instanceof Error ? err.message : String(err)}`);
      }
    });
  }

  /** False for an event already handled (Slack's retry of the same event_id). */
  private first(body: { event_id?: string }, retryNum: number | undefined): boolean {
    if (!body.event_id) return true;
    const first = this.seen.first(body.event_id);
    if (!first) this.log(`slack: dropped retry ${retryNum ?? '?'} of event ${body.event_id}, already handled`);
    return first;
  }
}

interface Chosen {
  value: string;
  label: string;
  /** From the brief card, whose controls stay. */
  card: boolean;
}

type SlackOptionPayload = { value: string; text: { text: string } };

/** What a click stands for, or null for one that sends nothing (a change in a multi-select). */
export function readAction(action: BlockAction['actions'][number], body: Pick<BlockAction, 'state' | 'message'>): Chosen | null {
  const id = action.action_id;
  const card = readCardBlockId(action.block_id);
  if (card) {
    if (action.type === 'static_select') return { value: action.selected_option.value, label: controlReplyLabel(card.label, action.selected_option.text.text), card: true };
    if (action.type === 'datepicker' && action.selected_date) {
      return { value: dateReply({ topic: id.slice(ACTION.cardDate.length), label: card.label, kind: 'date', choices: [], ...(card.sends ? { sends: card.sends } : {}) }, action.selected_date), label: controlReplyLabel(card.label, dayInWords(action.selected_date)), card: true };
    }
    return null;
  }
  switch (action.type) {
    case 'button':
      if (id === ACTION.send) return several(body);
      return action.value ? { value: action.value, label: action.text.text, card: id.startsWith(ACTION.cardQuick) } : null;
    case 'static_select':
      return { value: action.selected_option.value, label: action.selected_option.text.text, card: false };
    case 'datepicker':
      return action.selected_date ? { value: action.selected_date, label: dayInWords(action.selected_date), card: false } : null;
    default:
      return null;
  }
}

/** "Send selected": what the multi-select holds now (Slack sends the message's input state with a click), else what it started with. */
function several(body: Pick<BlockAction, 'state' | 'message'>): Chosen | null {
  let picked: SlackOptionPayload[] | undefined;
  for (const block of Object.values(body.state?.values ?? {})) {
    const el = (block as Record<string, { type?: string; selected_options?: SlackOptionPayload[] }>)[ACTION.multi];
    if (el?.selected_options) picked = el.selected_options;
  }
  if (!picked) {
    const blocks = (body.message?.blocks as { elements?: { action_id?: string; initial_options?: SlackOptionPayload[] }[] }[] | undefined) ?? [];
    picked = blocks.flatMap((b) => b.elements ?? []).find((e) => e.action_id === ACTION.multi)?.initial_options;
  }
  if (!picked?.length) return null;
  return { value: joinChoices(picked.map((o) => o.value)), label: picked.map((o) => o.text.text).join(', '), card: false };
}

function parseThreadId(threadId: string): { channel: string; threadTs: string } {
  const m = /^slack:([^:]+):(\d+\.\d+)$/.exec(threadId);
  if (!m) throw new Error(`not a Slack thread id: ${threadId}`);
  return { channel: m[1]!, threadTs: m[2]! };
}

function firstLine(text: string): string {
  return (text.split('\n')[0] ?? '').replace(/[*_]/g, '');
}
