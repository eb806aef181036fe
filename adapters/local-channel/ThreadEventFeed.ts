// Pushes a thread's new events to this process's open event streams, whichever replica wrote
// them. A NOTIFY only says "thread X changed"; the events themselves are read from the table,
// each subscriber from its own last sequence number, so a lost or doubled notification costs a
// query and never an event. If the LISTEN connection drops it reconnects and catches up.
import pg from 'pg';
import type { LocalEvent, LocalEventListener } from './local-thread-log.js';

interface Subscriber {
  lastSeq: number;
  listener: LocalEventListener;
}

interface ThreadFeed {
  subscribers: Set<Subscriber>;
  /** The catch-up under way, and whether another is due when it ends. */
  running: Promise<void> | null;
  again: boolean;
}

export interface ThreadEventFeedOptions {
  url: string;
  channel: string;
  eventsAfter: (threadId: string, afterSeq: number) => Promise<LocalEvent[]>;
  /** Wait before reconnecting a dropped LISTEN connection. */
  reconnectMs?: number;
}

export class ThreadEventFeed {
  private readonly threads = new Map<string, ThreadFeed>();
  private client: pg.Client | null = null;
  private closed = false;

  private constructor(private readonly opts: ThreadEventFeedOptions) {}

  static async open(opts: ThreadEventFeedOptions): Promise<ThreadEventFeed> {
    const feed = new ThreadEventFeed(opts);
    await feed.connect();
    return feed;
  }

  subscribe(threadId: string, afterSeq: number, listener: LocalEventListener): () => void {
    const feed = this.threads.get(threadId) ?? { subscribers: new Set<Subscriber>(), running: null, again: false };
    this.threads.set(threadId, feed);
    const sub: Subscriber = { lastSeq: afterSeq, listener };
    feed.subscribers.add(sub);
    // Replays what was missed; anything written meanwhile arrives with its notification.
    this.catchUp(threadId);
    return () => {
      feed.subscribers.delete(sub);
      if (feed.subscribers.size === 0 && !feed.running) this.threads.delete(threadId);
    };
  }

  async close(): Promise<void> {
    this.closed = true;
    const client = this.client;
    this.client = null;
    await client?.end().catch(() => undefined);
    await Promise.all([...this.threads.values()].map((f) => f.running));
  }

  private async connect(): Promise<void> {
    const client = new pg.Client({ connectionString: this.opts.url, application_name: 'threadcount-events' });
    client.on('notification', (n) => {
      if (n.channel === this.opts.channel && n.payload) this.catchUp(n.payload);
    });
    client.on('error', () => this.dropped(client));
    client.on('end', () => this.dropped(client));
    await client.connect();
    await client.query(`LISTEN ${pg.escapeIdentifier(this.opts.channel)}`);
    this.client = client;
  }

  private dropped(client: pg.Client): void {
    if (this.closed || this.client !== client) return;
    this.client = null;
    client.end().catch(() => undefined);
    const retry = () => {
      if (this.closed) return;
      this.connect().then(
        // Whatever happened while we were not listening is read now.
        () => this.threads.forEach((_f, id) => this.catchUp(id)),
        () => setTimeout(retry, this.opts.reconnectMs ?? 1000).unref(),
      );
    };
    setTimeout(retry, this.opts.reconnectMs ?? 1000).unref();
  }

  /** One catch-up per thread at a time; a notification during one schedules one more. */
  private catchUp(threadId: string): void {
    const feed = this.threads.get(threadId);
    if (!feed) return;
    if (feed.running) {
      feed.again = true;
      return;
    }
    feed.running = (async () => {
      do {
        feed.again = false;
        await this.deliver(threadId, feed).catch(() => undefined);
      } while (feed.again && !this.closed);
      feed.running = null;
      if (feed.subscribers.size === 0) this.threads.delete(threadId);
    })();
  }

  private async deliver(threadId: string, feed: ThreadFeed): Promise<void> {
    if (feed.subscribers.size === 0) return;
    const from = Math.min(...[...feed.subscribers].map((s) => s.lastSeq));
    const events = await this.opts.eventsAfter(threadId, from);
    for (const sub of feed.subscribers) {
      // One that subscribed during the read, from further back, is served by the next round.
      if (sub.lastSeq < from) continue;
      for (const e of events) {
        if (e.seq <= sub.lastSeq) continue;
        sub.lastSeq = e.seq;
        sub.listener(e);
      }
    }
  }
}
