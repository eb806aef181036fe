// Where a request stands, as the local page shows it on the request's card: asking (the bot needs
// an answer before it can plan), plan (the plan waits for go), running, done, or closed
// (cancelled). Read from what each bot post is, named by its key ("<thread>:card:3",
// "<thread>:run1:summary"), and from what it offers to click now; a message that says nothing
// about the stage (a note, a reminder, help) counts for none, and the newest one that does decides.

export const THREAD_STAGES = ['asking', 'plan', 'running', 'done', 'closed'] as const;
export type ThreadStage = (typeof THREAD_STAGES)[number];

const KINDS = ['card', 'prompt', 'cancelled', 'rerun', 'progress', 'answer', 'summary', 'quality-failed'] as const;
export type PostKind = (typeof KINDS)[number];

/** What a bot post is, from its key; undefined for one that does not move the thread on (a note, help). */
export function postKind(key: string | undefined): PostKind | undefined {
  const m = /:(card|prompt|cancelled|rerun)(?::\d+)?$|:run\d+:(progress|answer|summary|quality-failed)\b/.exec(key ?? '');
  return (m?.[1] ?? m?.[2]) as PostKind | undefined;
}

interface StagedMessage {
  fromBot: boolean;
  kind?: PostKind;
  prompt?: unknown;
  controls?: readonly unknown[];
  quickReplies?: readonly unknown[];
}

function stageOfMessage(m: StagedMessage): ThreadStage | undefined {
  if (!m.fromBot) return undefined;
  if (m.prompt) return 'asking';
  switch (m.kind) {
    // A card with controls or Go waits on the requester; agreed, the bot edits them away and runs.
    case 'card':
      return m.controls?.length || m.quickReplies?.length ? 'plan' : 'running';
    case 'prompt':
      return 'asking';
    case 'cancelled':
      return 'closed';
    case 'summary':
      return 'done';
    case 'rerun':
    case 'progress':
    case 'answer':
    case 'quality-failed':
      return 'running';
    default:
      return undefined;
  }
}

/** A thread's stage: the newest message that names one; before the bot has said anything, asking. */
export function stageOf(messages: readonly StagedMessage[]): ThreadStage {
  for (let i = messages.length - 1; i >= 0; i--) {
    const s = stageOfMessage(messages[i]!);
    if (s) return s;
  }
  return 'asking';
}
