// `threadcount ask`: one whole conversation with scripted answers, written to a folder.
import { join } from 'node:path';
import { loadConfig } from '../config/load.js';
import { readSecrets } from '../config/environment.js';
import { allowedDatasets } from '../bot/access.js';
import { closeWorkspaces, openWorkspaces } from './workspaces.js';
import { FileThread } from '../adapters/file-thread/FileThread.js';
import { Bot } from '../bot/Bot.js';
import { presentAnswer, presentSummary } from '../bot/present-answer.js';
import { loadScriptedAnswers, type ScriptedAnswers } from '../bot/scripted-answers.js';
import { playScriptedConversation, type ConversationEnd } from '../bot/scripted-conversation.js';
import pLimit from 'p-limit';
import { MemoryStateStore } from '../bot/stores/MemoryStateStore.js';
import { timePhase, type PhaseTimings } from '../analysis/phase-timings.js';
import type { ThreadPort } from '../bot/port.js';

export interface AskOptions {
  configFile: string;
  request: string;
  answersFile?: string;
  outDir: string;
  now?: Date;
  requester?: string;
  /** The channel key the request is asked in, for the config's access rules (default "local"). */
  channel?: string;
  /** Collects the time each phase takes (the benchmark passes one). */
  phases?: PhaseTimings;
}

export interface AskResult {
  end: ConversationEnd;
  threadFile: string;
  thread: FileThread;
}

export async function ask(opts: AskOptions): Promise<AskResult> {
  const config = loadConfig(opts.configFile);
  const answers: ScriptedAnswers = opts.answersFile ? loadScriptedAnswers(opts.answersFile) : {};
  const channel = opts.channel ?? 'local';
  // Only the datasets this channel may use are opened; with none, the bot says so and nothing runs.
  const names = allowedDatasets(config.access, config.datasets.map((d) => d.name), channel);
  const workspaces = await timePhase(opts.phases, 'open', () => openWorkspaces(config, readSecrets(config), names.length > 0 ? names : [config.datasets[0]!.name], opts.now ?? new Date()));
  try {
    const threadId = 'cli-thread';
    const thread = new FileThread(opts.outDir, threadId);
    const store = new MemoryStateStore();
    const now = opts.now ?? new Date();
    const jobs = pLimit(config.conversation.max_concurrent_jobs);
    const port = opts.phases ? timedPort(thread, opts.phases) : thread;
    const bot = new Bot({ workspaces, ...(config.access ? { access: config.access } : {}), port, store, now: () => now, presentAnswer, presentSummary, jobs, ...(opts.phases ? { phases: opts.phases } : {}) });
    const requester = opts.requester ?? 'requester';
    const end = await playScriptedConversation({
      bot,
      store,
      threadId,
      requester,
      request: opts.request,
      answers,
      channel,
      onRequesterMessage: (text) => thread.recordIncoming(requester, text),
    });
    return { end, threadFile: join(opts.outDir, 'thread.json'), thread };
  } finally {
    await closeWorkspaces(workspaces);
  }
}

/** The thread with its posts and updates timed as the 'post' phase. */
function timedPort(port: ThreadPort, phases: PhaseTimings): ThreadPort {
  return {
    post: (threadId, post) => timePhase(phases, 'post', () => port.post(threadId, post)),
    update: (threadId, ref, text) => timePhase(phases, 'post', () => port.update(threadId, ref, text)),
  };
}
