// `threadcount ask`: one whole conversation with scripted answers, written to a folder.
import { join } from 'node:path';
import { loadConfig } from '../config/load.js';
import { openWorkspace } from '../analysis/workspace.js';
import { FileThread } from '../adapters/file-thread/FileThread.js';
import { Bot } from '../bot/Bot.js';
import { presentAnswer, presentSummary } from '../bot/present-answer.js';
import { loadScriptedAnswers, type ScriptedAnswers } from '../bot/scripted-answers.js';
import { playScriptedConversation, type ConversationEnd } from '../bot/scripted-conversation.js';
import pLimit from 'p-limit';
import { MemoryStateStore } from '../bot/stores/MemoryStateStore.js';

export interface AskOptions {
  configFile: string;
  request: string;
  answersFile?: string;
  outDir: string;
  now?: Date;
  requester?: string;
}

export interface AskResult {
  end: ConversationEnd;
  threadFile: string;
  thread: FileThread;
}

export async function ask(opts: AskOptions): Promise<AskResult> {
  const config = loadConfig(opts.configFile);
  const answers: ScriptedAnswers = opts.answersFile ? loadScriptedAnswers(opts.answersFile) : {};
  const workspace = await openWorkspace(config);
  try {
    const threadId = 'cli-thread';
    const thread = new FileThread(opts.outDir, threadId);
    const store = new MemoryStateStore();
    const now = opts.now ?? new Date();
    const jobs = pLimit(config.conversation.max_concurrent_jobs);
    const bot = new Bot({ workspace, port: thread, store, now: () => now, presentAnswer, presentSummary, jobs });
    const requester = opts.requester ?? 'requester';
    const end = await playScriptedConversation({
      bot,
      store,
      threadId,
      requester,
      request: opts.request,
      answers,
      onRequesterMessage: (text) => thread.recordIncoming(requester, text),
    });
    return { end, threadFile: join(opts.outDir, 'thread.json'), thread };
  } finally {
    await workspace.source.close();
  }
}
