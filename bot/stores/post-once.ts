// postOnce for the stores one process owns: look the key up, send, then record the key with its
// audit entries (and the thread's state after it) in one commit. A crash between the send and the
// commit leaves the key unrecorded, so after a restart the post is sent again: the local channel
// finds its message by key and answers with it (exactly once); Slack and Discord post it again
// (at least once).
import type { KeyedPost, StateStore } from '../thread-state.js';

export async function sendThenRecord(store: StateStore, post: KeyedPost, send: () => Promise<string>): Promise<string> {
  const known = await store.postRef(post.key);
  if (known !== undefined) {
    if (post.state) await store.put(post.state);
    return known;
  }
  const ref = await send();
  await store.commit({ posts: [{ key: post.key, threadId: post.threadId, ref }], audit: post.audit, ...(post.state ? { state: post.state } : {}) });
  return ref;
}
