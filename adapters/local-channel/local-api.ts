// The local channel's HTTP API and page, on node:http (a handful of routes needs no framework).
//   POST /api/threads                 {author, text} -> 201 {threadId, messageId}: a new request
//   POST /api/threads/:id/messages    {author, text, label?} -> 201 {messageId}: a reply in the thread
//                                     (a click sends its value as text and what was chosen as label)
//   GET  /api/threads                 -> {threads: [...]}: newest first
//   GET  /api/threads/:id             -> the thread with all its messages
//   GET  /api/threads/:id/events      server-sent events: message.created, message.updated
//   GET  /api/files/:id               an attachment (chart PNG, CSV, SQL)
// A POST answers as soon as the message is recorded; the bot works on it afterwards.
import type { IncomingMessage as HttpRequest, ServerResponse } from 'node:http';
import type { Deliver } from '../chat-adapter.js';
import { MAX_BODY_BYTES, newMessageSchema, type NewMessage } from './api-limits.js';
import type { LocalEvent, LocalThreadLog } from './local-thread-log.js';
import type { PageFile } from './page-files.js';
import { noteReceived, serverTiming } from './server-timing.js';

/** The access rules' channel key of every local thread (the page is one channel). */
export const LOCAL_CHANNEL = 'local';

export interface LocalApiDeps {
  threads: LocalThreadLog;
  deliver: Deliver;
  page: Map<string, PageFile>;
  /** Host header values accepted (a guard against DNS rebinding); null accepts any. */
  allowedHosts: () => Set<string> | null;
  /** The bot's thread id for a local thread id. */
  botThreadId: (localId: string) => string;
  /** Open event streams, so stopping the server can end them. */
  streams: Set<ServerResponse>;
}

class HttpError extends Error {
  constructor(
    readonly status: number,
    message: string,
  ) {
    super(message);
  }
}

export function localApi(deps: LocalApiDeps) {
  return (req: HttpRequest, res: ServerResponse): void => {
    noteReceived(req);
    route(deps, req, res).catch((err: unknown) => {
      const status = err instanceof HttpError ? err.status : 500;
      const message = err instanceof HttpError ? err.message : 'internal error';
      if (!res.headersSent) sendJson(res, status, { error: message });
      else res.end();
    });
  };
}

async function route(deps: LocalApiDeps, req: HttpRequest, res: ServerResponse): Promise<void> {
  const hosts = deps.allowedHosts();
  if (hosts && !hosts.has(req.headers.host ?? '')) throw new HttpError(421, 'unexpected Host header');
  const url = new URL(req.url ?? '/', 'http://local');
  const parts = url.pathname.split('/').filter(Boolean).map(decodeURIComponent);
  const method = req.method ?? 'GET';

  if (parts[0] !== 'api') return servePage(deps, method, parts, res);
  const [, collection, id, sub, ...rest] = parts;
  if (collection === 'threads' && id === undefined) {
    if (method === 'POST') return createThread(deps, req, res);
    if (method === 'GET') return sendJson(res, 200, { threads: await deps.threads.list() });
  }
  if (collection === 'threads' && id !== undefined && rest.length === 0) {
    if (sub === undefined && method === 'GET') {
      const thread = await deps.threads.get(id);
      if (!thread) throw new HttpError(404, `no thread ${id}`);
      return sendJson(res, 200, thread);
    }
    if (sub === 'messages' && method === 'POST') return addReply(deps, id, req, res);
    if (sub === 'events' && method === 'GET') return streamEvents(deps, id, req, res);
  }
  if (collection === 'files' && id !== undefined && sub === undefined && method === 'GET') {
    const found = await deps.threads.file(id);
    if (!found) throw new HttpError(404, `no file ${id}`);
    res.writeHead(200, {
      'content-type': found.file.contentType,
      'content-length': found.content.length,
      'content-disposition': `inline; filename="${found.file.name.replace(/[^\w.-]/g, '_')}"`,
      // File ids are never reused, so the content never changes.
      'cache-control': 'private, max-age=31536000, immutable',
      'x-content-type-options': 'nosniff',
    });
    res.end(found.content);
    return;
  }
  throw new HttpError(method === 'GET' || method === 'POST' ? 404 : 405, `no route ${method} ${url.pathname}`);
}

async function createThread(deps: LocalApiDeps, req: HttpRequest, res: ServerResponse): Promise<void> {
  const body = await readMessage(req);
  const { thread, message } = await deps.threads.createThread(body.author, body.text);
  sendJson(res, 201, { threadId: thread.id, messageId: message.id });
  deps.deliver({ threadId: deps.botThreadId(thread.id), author: body.author, text: body.text, channel: LOCAL_CHANNEL, messageId: message.id });
}

async function addReply(deps: LocalApiDeps, threadId: string, req: HttpRequest, res: ServerResponse): Promise<void> {
  const body = await readMessage(req);
  const message = await deps.threads.addPersonMessage(threadId, body.author, body.text, body.label);
  if (!message) throw new HttpError(404, `no thread ${threadId}`);
  sendJson(res, 201, { messageId: message.id });
  deps.deliver({ threadId: deps.botThreadId(threadId), author: body.author, text: body.text, ...(body.label ? { label: body.label } : {}), channel: LOCAL_CHANNEL, messageId: message.id });
}

async function streamEvents(deps: LocalApiDeps, threadId: string, req: HttpRequest, res: ServerResponse): Promise<void> {
  // A reconnecting EventSource sends the last id it saw; a first connection gets every event.
  const last = Number(req.headers['last-event-id'] ?? new URL(req.url ?? '/', 'http://local').searchParams.get('after') ?? 0);
  // Events that arrive before the headers are out wait in order.
  const early: LocalEvent[] = [];
  let send = (e: LocalEvent) => void early.push(e);
  const unsubscribe = await deps.threads.subscribe(threadId, Number.isFinite(last) ? last : 0, (e) => send(e));
  if (!unsubscribe) throw new HttpError(404, `no thread ${threadId}`);
  if (res.destroyed) return unsubscribe();
  res.writeHead(200, {
    'content-type': 'text/event-stream; charset=utf-8',
    'cache-control': 'no-cache, no-transform',
    connection: 'keep-alive',
    'x-accel-buffering': 'no',
  });
  res.write('retry: 2000\n\n');
  send = (e: LocalEvent) => void res.write(`id: ${e.seq}\nevent: ${e.type}\ndata: ${JSON.stringify(e.message)}\n\n`);
  for (const e of early.splice(0)) send(e);
  // A comment line now and then keeps idle proxies from closing the stream.
  const heartbeat = setInterval(() => res.write(': keep-alive\n\n'), 15_000);
  heartbeat.unref();
  deps.streams.add(res);
  res.on('close', () => {
    clearInterval(heartbeat);
    unsubscribe();
    deps.streams.delete(res);
  });
}

function servePage(deps: LocalApiDeps, method: string, parts: string[], res: ServerResponse): void {
  if (method !== 'GET' && method !== 'HEAD') throw new HttpError(405, 'the page is read-only');
  const name = parts.length === 0 ? 'index.html' : parts.length === 1 ? parts[0]! : '';
  const file = deps.page.get(name);
  if (!file) throw new HttpError(404, 'not found');
  res.writeHead(200, {
    'content-type': file.contentType,
    'content-length': file.content.length,
    'cache-control': 'no-cache',
    'x-content-type-options': 'nosniff',
    // The page loads only its own script and style, and images from this server.
    'content-security-policy': "default-src 'self'; img-src 'self'; style-src 'self'; script-src 'self'; connect-src 'self'; frame-ancestors 'none'",
  });
  res.end(method === 'HEAD' ? undefined : file.content);
}

async function readMessage(req: HttpRequest): Promise<NewMessage> {
  if (!/^application\/json\b/i.test(req.headers['content-type'] ?? '')) throw new HttpError(415, 'send JSON (content-type: application/json)');
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const chunk of req as AsyncIterable<Buffer>) {
    size += chunk.length;
    if (size > MAX_BODY_BYTES) throw new HttpError(413, `the body is over ${MAX_BODY_BYTES} bytes`);
    chunks.push(chunk);
  }
  let raw: unknown;
  try {
    raw = JSON.parse(Buffer.concat(chunks).toString('utf8'));
  } catch {
    throw new HttpError(400, 'the body is not valid JSON');
  }
  const parsed = newMessageSchema.safeParse(raw);
  if (!parsed.success) throw new HttpError(400, parsed.error.issues.map((i) => `${i.path.join('.') || 'body'}: ${i.message}`).join('; '));
  return parsed.data;
}

function sendJson(res: ServerResponse, status: number, body: unknown): void {
  const text = JSON.stringify(body);
  const timing = serverTiming(res);
  res.writeHead(status, {
    'content-type': 'application/json; charset=utf-8',
    'content-length': Buffer.byteLength(text),
    'cache-control': 'no-store',
    ...(timing ? { 'server-timing': timing } : {}),
  });
  res.end(text);
}
