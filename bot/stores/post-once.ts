// postOnce for the stores one process owns: look the key up, send, then record. A crash between
// the send and the record leaves the key unrecorded, so after a restart that post goes out again
// (at least once); the PostgreSQL store closes that gap for the local channel.
import type { KeyedPost, StateStore } from '../thread-state.js';

export async function sendThenRecord(store: StateStore, post: KeyedPost, send: () => Promise<string>): Promise<string> {
  const known = await store.postRef(post.key);
  if (known !== undefined) return known;
  const ref = await send();
  await store.recordPost(post.key, post.threadId, ref);
  for (const entry of post.audit) await store.appendAudit(entry);
  return ref;
}
