// The local channel's HTTP API and page, on node:http (a handful of routes needs no framework).
//   POST /api/threads                     {author, text} -> 201 {threadId, messageId}: a new request
//   POST /api/threads/:id/messages        {author, text, label?} -> 201 {messageId}: a reply in the thread
//                                         (a click sends its value as text and what was chosen as label)
//   GET  /api/threads                     -> {threads: [...]}: newest first
//   GET  /api/threads/:id                 -> the thread with all its messages
//   GET  /api/threads/:id/events          server-sent events: message.created, message.updated
//   GET  /api/threads/:id/files/:file     an attachment of that thread (chart PNG, CSV, SQL)
//   GET  /api/starters                    -> {starters: [...]}: requests to start from, drawn from the served data
//   GET/POST /login                       the sign-in form, when an access token is set
// A POST answers as soon as the message is recorded; the bot works on it afterwards.
import type { IncomingMessage as HttpRequest, ServerResponse } from 'node:http';
import type { Deliver } from '../chat-adapter.js';
import { MAX_BODY_BYTES, newMessageSchema, type NewMessage } from './api-limits.js';
import { LOGIN_COOKIE, loginNonce, loginNonceCookie, readCookies, type LocalAccess } from './local-access.js';
import type { LocalEvent, LocalThreadLog } from './local-thread-log.js';
import { loginPage } from './login-page.js';
import type { PageFile } from './page-files.js';
import { noteReceived, serverTiming } from './server-timing.js';

/** The access rules' channel key of every local thread (the page is one channel). */
export const LOCAL_CHANNEL = 'local';

/** Page files anyone may fetch, so the sign-in page has its style. */
const PUBLIC_FILES = new Set(['style.css', 'favicon.svg']);

/** The page's own script and style only, and images from this server. */
const PAGE_POLICY = "default-src 'self'; img-src 'self'; style-src 'self'; script-src 'self'; connect-src 'self'; frame-ancestors 'none'; form-action 'self'";

export interface LocalApiDeps {
  threads: LocalThreadLog;
  deliver: Deliver;
  page: Map<string, PageFile>;
  /** Whether a Host header is accepted (a guard against DNS rebinding on loopback). */
  hostAllowed: (host: string | undefined) => boolean;
  /** The access token's checks; null when the channel is open to whoever reaches it (loopback only). */
  access: LocalAccess | null;
  /** The bot's thread id for a local thread id. */
  botThreadId: (localId: string) => string;
  /** Open event streams, so stopping the server can end them. */
  streams: Set<ServerResponse>;
  /** Requests the page offers to start from, drawn from the served data (starters.ts). */
  starters: () => string[];
}

class HttpError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly headers: Record<string, string> = {},
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
      if (!res.headersSent) sendJson(res, status, { error: message }, err instanceof HttpError ? err.headers : {});
      else res.end();
    });
  };
}

async function route(deps: LocalApiDeps, req: HttpRequest, res: ServerResponse): Promise<void> {
  if (!deps.hostAllowed(req.headers.host)) throw new HttpError(421, 'unexpected Host header');
  const url = requestUrl(req);
  const parts = pathParts(url.pathname);
  const method = req.method ?? 'GET';

  if (deps.access) {
    if (parts.length === 1 && parts[0] === 'login') return login(deps.access, req, res, url);
    const publicFile = parts.length === 1 && PUBLIC_FILES.has(parts[0]!);
    const credential = deps.access.credential(req);
    if (!credential && !publicFile) {
      if (parts[0] === 'api') throw new HttpError(401, 'this channel needs its access token: send Authorization: Bearer <token>', { 'www-authenticate': 'Bearer' });
      // A link carrying the token signs in; anything else goes to the form.
      return redirect(res, url.searchParams.has('token') ? `/login?token=${encodeURIComponent(url.searchParams.get('token')!)}` : '/login');
    }
    if (credential === 'session' && method !== 'GET' && method !== 'HEAD' && !deps.access.sessionMayWrite(req)) {
      throw new HttpError(403, 'the request did not come from this channel\'s page (missing or wrong CSRF token)');
    }
  }

  if (parts[0] !== 'api') return servePage(deps, method, parts, res);
  const [, collection, id, sub, fileId, ...rest] = parts;
  if (collection === 'starters' && id === undefined && method === 'GET') return sendJson(res, 200, { starters: deps.starters() });
  if (collection === 'threads' && id === undefined) {
    if (method === 'POST') return createThread(deps, req, res);
    if (method === 'GET') return sendJson(res, 200, { threads: await deps.threads.list() });
  }
  if (collection === 'threads' && id !== undefined && fileId === undefined) {
    if (sub === undefined && method === 'GET') {
      const thread = await deps.threads.get(id);
      if (!thread) throw new HttpError(404, `no thread ${id}`);
      return sendJson(res, 200, thread);
    }
    if (sub === 'messages' && method === 'POST') return addReply(deps, id, req, res);
    if (sub === 'events' && method === 'GET') return streamEvents(deps, id, req, res);
  }
  if (collection === 'threads' && id !== undefined && sub === 'files' && fileId !== undefined && rest.length === 0 && method === 'GET') {
    return serveFile(deps, id, fileId, res);
  }
  throw new HttpError(method === 'GET' || method === 'POST' ? 404 : 405, `no route ${method} ${url.pathname}`);
}

function requestUrl(req: HttpRequest): URL {
  try {
    return new URL(req.url ?? '/', 'http://local');
  } catch {
    throw new HttpError(400, 'the request target is not a valid path');
  }
}

/** The path's segments, each percent-decoded; a malformed escape is the client's mistake. */
function pathParts(pathname: string): string[] {
  try {
    return pathname.split('/').filter(Boolean).map(decodeURIComponent);
  } catch {
    throw new HttpError(400, 'the path has a malformed percent-escape');
  }
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

async function serveFile(deps: LocalApiDeps, threadId: string, fileId: string, res: ServerResponse): Promise<void> {
  // Found only under its own thread: a file id alone opens nothing.
  const found = await deps.threads.file(threadId, fileId);
  if (!found) throw new HttpError(404, `no file ${fileId} in thread ${threadId}`);
  res.writeHead(200, {
    'content-type': found.file.contentType,
    'content-length': found.content.length,
    'content-disposition': `inline; filename="${found.file.name.replace(/[^\w.-]/g, '_')}"`,
    // File ids are never reused, so the content never changes.
    'cache-control': 'private, max-age=31536000, immutable',
    'x-content-type-options': 'nosniff',
  });
  res.end(found.content);
}

async function streamEvents(deps: LocalApiDeps, threadId: string, req: HttpRequest, res: ServerResponse): Promise<void> {
  // A reconnecting EventSource sends the last id it saw; a first connection gets every event.
  const last = Number(req.headers['last-event-id'] ?? requestUrl(req).searchParams.get('after') ?? 0);
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
    'content-security-policy': PAGE_POLICY,
  });
  res.end(method === 'HEAD' ? undefined : file.content);
}

/**
 * The sign-in: GET shows the form (or, with ?token=, signs in from a link); POST checks the form.
 * The form carries a value also set as a cookie, so only a form this server showed can sign in.
 */
async function login(access: LocalAccess, req: HttpRequest, res: ServerResponse, url: URL): Promise<void> {
  const method = req.method ?? 'GET';
  if (method === 'GET' && url.searchParams.has('token')) {
    if (access.matches(url.searchParams.get('token'))) return redirect(res, '/', access.signInCookies());
    return showLogin(res, 401, 'That link does not carry the right token.');
  }
  if (method === 'GET' || method === 'HEAD') return showLogin(res, 200);
  if (method !== 'POST') throw new HttpError(405, 'sign in with GET or POST /login');
  if (!/^application\/x-www-form-urlencoded\s*(;|$)/i.test(req.headers['content-type'] ?? '')) throw new HttpError(415, 'send the sign-in form');
  const form = new URLSearchParams((await readBody(req)).toString('utf8'));
  const nonce = readCookies(req)[LOGIN_COOKIE];
  if (!nonce || form.get('nonce') !== nonce) return showLogin(res, 403, 'The form had expired; sign in again.');
  if (!access.matches(form.get('token'))) return showLogin(res, 401, 'That is not the access token.');
  return redirect(res, '/', access.signInCookies());
}

function showLogin(res: ServerResponse, status: number, problem?: string): void {
  const nonce = loginNonce();
  const html = loginPage(nonce, problem);
  res.writeHead(status, {
    'content-type': 'text/html; charset=utf-8',
    'content-length': Buffer.byteLength(html),
    'cache-control': 'no-store',
    'x-content-type-options': 'nosniff',
    'content-security-policy': PAGE_POLICY,
    'set-cookie': loginNonceCookie(nonce),
  });
  res.end(html);
}

function redirect(res: ServerResponse, location: string, cookies: string[] = []): void {
  res.writeHead(303, { location, 'cache-control': 'no-store', 'content-length': 0, ...(cookies.length ? { 'set-cookie': cookies } : {}) });
  res.end();
}

async function readMessage(req: HttpRequest): Promise<NewMessage> {
  // Exactly JSON: application/json-patch+json and the like are other formats.
  const mediaType = (req.headers['content-type'] ?? '').split(';')[0]!.trim().toLowerCase();
  if (mediaType !== 'application/json') throw new HttpError(415, 'send JSON (content-type: application/json)');
  let raw: unknown;
  try {
    raw = JSON.parse((await readBody(req)).toString('utf8'));
  } catch (err) {
    if (err instanceof HttpError) throw err;
    throw new HttpError(400, 'the body is not valid JSON');
  }
  const parsed = newMessageSchema.safeParse(raw);
  if (!parsed.success) throw new HttpError(400, parsed.error.issues.map((i) => `${i.path.join('.') || 'body'}: ${i.message}`).join('; '));
  return parsed.data;
}

/** The body, up to the limit; a body declared larger is refused before any of it is read. */
async function readBody(req: HttpRequest): Promise<Buffer> {
  const tooLarge = () => new HttpError(413, `the body is over ${MAX_BODY_BYTES} bytes`, { connection: 'close' });
  if (Number(req.headers['content-length'] ?? 0) > MAX_BODY_BYTES) throw tooLarge();
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const chunk of req as AsyncIterable<Buffer>) {
    size += chunk.length;
    if (size > MAX_BODY_BYTES) throw tooLarge();
    chunks.push(chunk);
  }
  return Buffer.concat(chunks);
}

function sendJson(res: ServerResponse, status: number, body: unknown, headers: Record<string, string> = {}): void {
  const text = JSON.stringify(body);
  const timing = serverTiming(res);
  res.writeHead(status, {
    'content-type': 'application/json; charset=utf-8',
    'content-length': Buffer.byteLength(text),
    'cache-control': 'no-store',
    ...(timing ? { 'server-timing': timing } : {}),
    ...headers,
  });
  res.end(text);
}
