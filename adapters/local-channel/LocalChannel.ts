// The embedded default chat: a page on 127.0.0.1 where a person posts requests and answers the
// bot, backed by a small HTTP API. Threads are kept in the bot's state store (the DuckDB file, or
// PostgreSQL so that replicas all show the same threads), or in memory for tests. Beyond loopback
// it needs an access token (see local-access.ts).
import { createServer, type Server, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import type { OutgoingPost } from '../../bot/port.js';
import type { SqlSession } from '../../bot/thread-state.js';
import type { ChatAdapter, Deliver } from '../chat-adapter.js';
import { isLoopbackAddress, isLoopbackHost, LocalAccess } from './local-access.js';
import { localApi } from './local-api.js';
import type { LocalThreadLog } from './local-thread-log.js';
import { LocalThreads } from './LocalThreads.js';
import { loadPageFiles } from './page-files.js';
import { noteAccepted } from './server-timing.js';

const PREFIX = 'local:';

/** The bot's thread id for a local channel thread. */
export function localBotThreadId(localId: string): string {
  return `${PREFIX}${localId}`;
}

export interface LocalChannelOptions {
  host?: string;
  /** 0 picks a free port (tests). */
  port?: number;
  deliver: Deliver;
  botName?: string;
  /** Where threads are kept (default: in memory); stopping the channel closes it. */
  threads?: LocalThreadLog;
  /** Required to listen beyond loopback: the API then takes it as a bearer token, the page as a sign-in. */
  accessToken?: string;
  /** How long a request may take to arrive in full (headers and body) before it is dropped. */
  requestTimeoutMs?: number;
  /** Requests the page offers to start from (starters.ts); the generic one alone when absent. */
  starters?: string[];
}

/** A request still arriving after this long is dropped (a body declared and never sent holds nothing for long). */
const REQUEST_TIMEOUT_MS = 60_000;

/** The error when the channel would listen beyond loopback with no access token. */
export class OpenBeyondLoopbackError extends Error {
  constructor(readonly address: string) {
    super(`the local channel would listen on ${address}, beyond this machine, with no access token`);
  }
}

export class LocalChannel implements ChatAdapter {
  readonly name = 'local';
  readonly threads: LocalThreadLog;
  private readonly server: Server;
  private readonly streams = new Set<ServerResponse>();
  private readonly host: string;
  private readonly port: number;
  private readonly accessToken: string | undefined;

  constructor(opts: LocalChannelOptions) {
    this.host = opts.host ?? '127.0.0.1';
    this.port = opts.port ?? 0;
    this.threads = opts.threads ?? new LocalThreads(opts.botName ?? 'threadcount');
    this.accessToken = opts.accessToken;
    const timeout = opts.requestTimeoutMs ?? REQUEST_TIMEOUT_MS;
    this.server = createServer(
      // Node checks for overdue requests every connectionsCheckingInterval (30 s by default).
      { requestTimeout: timeout, headersTimeout: timeout, connectionsCheckingInterval: Math.min(1000, timeout) },
      localApi({
        threads: this.threads,
        deliver: opts.deliver,
        page: loadPageFiles(),
        hostAllowed: (host) => this.hostAllowed(host),
        access: opts.accessToken ? new LocalAccess(opts.accessToken) : null,
        botThreadId: localBotThreadId,
        streams: this.streams,
        starters: () => opts.starters ?? ['What can you measure?'],
      }),
    );
    this.server.on('connection', noteAccepted);
  }

  owns(threadId: string): boolean {
    return threadId.startsWith(PREFIX);
  }

  async start(): Promise<void> {
    await new Promise<void>((resolve, reject) => {
      this.server.once('error', reject);
      this.server.listen(this.port, this.host, () => {
        this.server.off('error', reject);
        resolve();
      });
    });
    // Judged by the address actually bound, however the host was spelt.
    const bound = this.server.address() as AddressInfo;
    if (!this.accessToken && !isLoopbackAddress(bound.address)) {
      await new Promise<void>((resolve) => this.server.close(() => resolve()));
      throw new OpenBeyondLoopbackError(bound.address);
    }
  }

  async stop(): Promise<void> {
    for (const res of this.streams) res.end();
    await new Promise<void>((resolve) => {
      this.server.close(() => resolve());
      this.server.closeAllConnections();
    });
    await this.threads.close();
  }

  /** The page's address, e.g. http://127.0.0.1:8787/ (after start). */
  get url(): string {
    const a = this.server.address() as AddressInfo | null;
    if (!a) throw new Error('the local channel is not listening');
    const host = a.family === 'IPv6' ? `[${a.address}]` : a.address;
    return `http://${host === '0.0.0.0' || host === '[::]' ? '127.0.0.1' : host}:${a.port}/`;
  }

  /** With the threads in the state store, `session` is the bot's post transaction: the message commits with its key. */
  async post(threadId: string, post: OutgoingPost, session?: SqlSession): Promise<string> {
    return (await this.threads.addBotPost(this.localId(threadId), post, session)).id;
  }

  joinsState(): boolean {
    return this.threads.inStateStore;
  }

  /** With `post`, the whole message is replaced (the brief card after a correction); the page gets it as message.updated. */
  async update(threadId: string, ref: string, text: string, post?: Omit<OutgoingPost, 'key' | 'files'>): Promise<void> {
    await this.threads.updateText(this.localId(threadId), ref, text, post);
  }

  private localId(threadId: string): string {
    if (!this.owns(threadId)) throw new Error(`thread ${threadId} is not a local channel thread`);
    return threadId.slice(PREFIX.length);
  }

  /**
   * On a loopback address only loopback names and addresses are accepted as Host, so another site
   * cannot rebind a name of its own to it. Beyond loopback the access token guards the channel.
   */
  private hostAllowed(host: string | undefined): boolean {
    const a = this.server.address() as AddressInfo | null;
    if (!a || !isLoopbackAddress(a.address)) return true;
    return isLoopbackHost(host, a.port);
  }
}
