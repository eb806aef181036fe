// A chat platform that outlives the bot: it keeps every message posted to it, so a test can
// restart the bot and count what the platform received in all.
import type { OutgoingPost, ThreadPort } from '../../bot/port.js';

export interface PlatformMessage {
  threadId: string;
  key: string;
  text: string;
  files: string[];
  promptTopic?: string;
}

export class RecordingPort implements ThreadPort {
  readonly messages: PlatformMessage[] = [];
  /** Throws from the nth post on (1-based): the platform gone, as for a process dying part-way. */
  failOnPost: number | null = null;
  private posts = 0;

  async post(threadId: string, post: OutgoingPost): Promise<string> {
    this.posts++;
    if (this.failOnPost !== null && this.posts >= this.failOnPost) throw new Error('process stopped');
    this.messages.push({
      threadId,
      key: post.key,
      text: post.text,
      files: (post.files ?? []).map((f) => f.name),
      ...(post.prompt ? { promptTopic: post.prompt.topic } : {}),
    });
    return String(this.messages.length - 1);
  }

  async update(_threadId: string, ref: string, text: string): Promise<void> {
    const m = this.messages[Number(ref)];
    if (!m) throw new Error(`no message ${ref}`);
    m.text = text;
  }

  inThread(threadId: string): PlatformMessage[] {
    return this.messages.filter((m) => m.threadId === threadId);
  }
}
