// One ThreadPort for the bot over several adapters: each post goes to the adapter that owns the
// thread id (ids carry the adapter's prefix, e.g. "slack:C1:1700000000.000100").
import type { OutgoingPost, ThreadPort } from '../bot/port.js';
import type { SqlSession } from '../bot/thread-state.js';
import type { ChatAdapter } from './chat-adapter.js';

export class PortRouter implements ThreadPort {
  constructor(private readonly adapters: readonly ChatAdapter[]) {}

  post(threadId: string, post: OutgoingPost, session?: SqlSession): Promise<string> {
    return this.route(threadId).post(threadId, post, session);
  }

  update(threadId: string, ref: string, text: string, post?: Omit<OutgoingPost, 'key' | 'files'>): Promise<void> {
    return post ? this.route(threadId).update(threadId, ref, text, post) : this.route(threadId).update(threadId, ref, text);
  }

  joinsState(threadId: string): boolean {
    return this.route(threadId).joinsState?.(threadId) ?? false;
  }

  private route(threadId: string): ChatAdapter {
    const adapter = this.adapters.find((a) => a.owns(threadId));
    if (!adapter) throw new Error(`no chat adapter is running for thread ${threadId}`);
    return adapter;
  }
}
