// A thread written to a folder: thread.json lists every post in order (who, text, files with
// their kind and path relative to the folder), and each attached file is written beside it.
// Used by `threadcount ask` and by tests that read a whole conversation back.
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { FOLDER_OF_KIND as FOLDER, type FileKind, type OutgoingPost, type ThreadPort } from '../../bot/port.js';

export interface RecordedFile {
  kind: FileKind;
  path: string;
}

export interface RecordedPost {
  author: string;
  text: string;
  promptTopic?: string;
  /** The topics of the controls it carries (the brief card's), in order. */
  controls?: string[];
  /** How many times it was edited in place. */
  edits?: number;
  files: RecordedFile[];
}

export interface RecordedThread {
  threadId: string;
  posts: RecordedPost[];
}

export class FileThread implements ThreadPort {
  readonly thread: RecordedThread;
  private readonly refByKey = new Map<string, string>();

  constructor(
    private readonly dir: string,
    threadId: string,
    private readonly botName = 'threadcount',
  ) {
    mkdirSync(dir, { recursive: true });
    this.thread = { threadId, posts: [] };
  }

  /** Records a message from a person (the request and their replies). */
  recordIncoming(author: string, text: string): void {
    this.thread.posts.push({ author, text, files: [] });
    this.flush();
  }

  async post(_threadId: string, post: OutgoingPost): Promise<string> {
    const seen = this.refByKey.get(post.key);
    if (seen !== undefined) return seen;
    const files: RecordedFile[] = [];
    for (const f of post.files ?? []) {
      const rel = join(FOLDER[f.kind], f.name);
      mkdirSync(join(this.dir, FOLDER[f.kind]), { recursive: true });
      writeFileSync(join(this.dir, rel), f.content);
      files.push({ kind: f.kind, path: rel });
    }
    this.thread.posts.push({ author: this.botName, text: post.text, ...(post.prompt ? { promptTopic: post.prompt.topic } : {}), ...controlsOf(post), files });
    const ref = String(this.thread.posts.length - 1);
    this.refByKey.set(post.key, ref);
    this.flush();
    return ref;
  }

  async update(_threadId: string, ref: string, text: string, post?: Omit<OutgoingPost, 'key' | 'files'>): Promise<void> {
    const p = this.thread.posts[Number(ref)];
    if (!p) throw new Error(`no post ${ref} in this thread`);
    p.text = text;
    if (post) {
      delete p.controls;
      Object.assign(p, controlsOf(post), { edits: (p.edits ?? 0) + 1 });
    }
    this.flush();
  }

  lastBotPost(): RecordedPost | undefined {
    return [...this.thread.posts].reverse().find((p) => p.author === this.botName);
  }

  private flush(): void {
    writeFileSync(join(this.dir, 'thread.json'), `${JSON.stringify(this.thread, null, 2)}\n`);
  }
}

function controlsOf(post: Pick<OutgoingPost, 'controls'>): { controls?: string[] } {
  return post.controls && post.controls.length > 0 ? { controls: post.controls.map((c) => c.topic) } : {};
}
