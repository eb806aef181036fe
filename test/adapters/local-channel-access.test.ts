// Who may use the local channel, and what its HTTP edge refuses. On loopback: the Host header is
// judged by address (all of 127.0.0.0/8 and ::1), not by spelling. Beyond loopback: no start
// without an access token; with one, the API wants it as a bearer header, the page signs in once
// (a form or a link) and every change made with the session cookie carries the CSRF token.
// Attachments are found only under their own thread. And the small things: a malformed
// percent-escape, a JSON-like content type, the length limit in UTF-16 code units, a body that
// never arrives.
import { request } from 'node:http';
import { connect } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { isLoopbackAddress, isLoopbackHost } from '../../adapters/local-channel/local-access.js';
import { LocalChannel, OpenBeyondLoopbackError } from '../../adapters/local-channel/LocalChannel.js';
import type { IncomingMessage } from '../../bot/port.js';
import { waitFor } from '../helpers/wait-for.js';

const TOKEN = 'tc-test-access-token-0123456789abcdef';

/** A raw request, so the Host header and the body are exactly what the test says. */
function raw(port: number, opts: { method?: string; path: string; host?: string; headers?: Record<string, string>; body?: string }): Promise<{ status: number; headers: Record<string, string | string[] | undefined>; body: string }> {
  return new Promise((resolve, reject) => {
    const req = request({ host: '127.0.0.1', port, method: opts.method ?? 'GET', path: opts.path, headers: { host: opts.host ?? `127.0.0.1:${port}`, ...opts.headers } }, (res) => {
      let body = '';
      res.setEncoding('utf8').on('data', (c: string) => (body += c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body }));
    });
    req.on('error', reject);
    req.end(opts.body);
  });
}

describe('loopback judged by address', () => {
  it('knows the whole 127.0.0.0/8 range and ::1, in any spelling a URL accepts', () => {
    for (const a of ['127.0.0.1', '127.0.0.2', '127.255.255.254', '::1', '::ffff:127.0.0.9', '[::1]']) expect(isLoopbackAddress(a), a).toBe(true);
    for (const a of ['0.0.0.0', '10.0.0.5', '128.0.0.1', '::', '::ffff:10.0.0.1', 'localhost', 'example.com']) expect(isLoopbackAddress(a), a).toBe(false);
    expect(isLoopbackHost('127.1:8787', 8787)).toBe(true);
    expect(isLoopbackHost('127.0.0.2:8787', 8787)).toBe(true);
    expect(isLoopbackHost('[::1]:8787', 8787)).toBe(true);
    expect(isLoopbackHost('LOCALHOST:8787', 8787)).toBe(true);
    expect(isLoopbackHost('localhost:8788', 8787)).toBe(false);
    expect(isLoopbackHost('evil.example:8787', 8787)).toBe(false);
    expect(isLoopbackHost('127.0.0.1@evil.example:8787', 8787)).toBe(false);
    expect(isLoopbackHost(undefined, 8787)).toBe(false);
  });

  it('bound to 127.0.0.2 (not spelt 127.0.0.1), another site\'s name is still turned away', async () => {
    const channel = new LocalChannel({ host: '127.0.0.2', port: 0, deliver: () => undefined });
    await channel.start();
    try {
      const port = Number(new URL(channel.url).port);
      const ask = (host: string) =>
        new Promise<number>((resolve, reject) =>
          request({ host: '127.0.0.2', port, path: '/api/threads', headers: { host } }, (res) => {
            res.resume();
            resolve(res.statusCode ?? 0);
          })
            .on('error', reject)
            .end(),
        );
      expect(await ask('evil.example')).toBe(421);
      expect(await ask(`evil.example:${port}`)).toBe(421);
      expect(await ask(`127.0.0.2:${port}`)).toBe(200);
      expect(await ask(`localhost:${port}`)).toBe(200);
    } finally {
      await channel.stop();
    }
  });

  it('will not listen beyond loopback without an access token', async () => {
    const channel = new LocalChannel({ host: '0.0.0.0', port: 0, deliver: () => undefined });
    await expect(channel.start()).rejects.toBeInstanceOf(OpenBeyondLoopbackError);
    await channel.stop();
  });
});

describe('beyond loopback, with an access token', () => {
  let channel: LocalChannel;
  let port: number;
  const delivered: IncomingMessage[] = [];

  beforeAll(async () => {
    channel = new LocalChannel({ host: '0.0.0.0', port: 0, accessToken: TOKEN, deliver: (m) => void delivered.push(m) });
    await channel.start();
    port = Number(new URL(channel.url).port);
  });
  afterAll(async () => channel?.stop());

  const bearer = { authorization: `Bearer ${TOKEN}` };
  const json = { 'content-type': 'application/json' };

  it('the API wants the token as a bearer header', async () => {
    const without = await raw(port, { path: '/api/threads', host: 'bot.example.com' });
    expect(without.status).toBe(401);
    expect(without.headers['www-authenticate']).toBe('Bearer');
    expect(JSON.parse(without.body).error).toMatch(/access token/);
    expect((await raw(port, { path: '/api/threads', headers: { authorization: 'Bearer not-the-token' } })).status).toBe(401);
    // Any Host: beyond loopback the token, not the name, is the guard.
    expect((await raw(port, { path: '/api/threads', host: 'bot.example.com', headers: bearer })).status).toBe(200);
    const created = await raw(port, { method: 'POST', path: '/api/threads', headers: { ...bearer, ...json }, body: JSON.stringify({ author: 'maren', text: 'How has revenue moved?' }) });
    expect(created.status).toBe(201);
    // Unauthorised requests reached nothing: only the one with the token was delivered.
    expect(delivered.map((m) => m.text)).toEqual(['How has revenue moved?']);
  });

  it('the page sends a stranger to the sign-in form; its style is public', async () => {
    const page = await raw(port, { path: '/' });
    expect(page.status).toBe(303);
    expect(page.headers.location).toBe('/login');
    expect((await raw(port, { path: '/app.js' })).status).toBe(303);
    expect((await raw(port, { path: '/style.css' })).status).toBe(200);
    const form = await raw(port, { path: '/login' });
    expect(form.status).toBe(200);
    expect(form.body).toContain('<form method="post" action="/login">');
    expect(form.body).not.toContain(TOKEN);
  });

  /** Signs in through the form; returns the cookies the page gets. */
  async function signIn(token: string): Promise<{ status: number; cookies: Record<string, string> }> {
    const form = await raw(port, { path: '/login' });
    const nonceCookie = String(form.headers['set-cookie']).split(';')[0]!;
    const nonce = /name="nonce" value="([^"]+)"/.exec(form.body)![1]!;
    const res = await raw(port, {
      method: 'POST',
      path: '/login',
      headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: nonceCookie },
      body: new URLSearchParams({ nonce, token }).toString(),
    });
    const cookies = Object.fromEntries([res.headers['set-cookie'] ?? []].flat().map((c) => c.split(';')[0]!.split('=') as [string, string]));
    return { status: res.status, cookies };
  }

  it('signs in through the form, and only a form it showed', async () => {
    expect((await signIn('wrong-token-wrong-token-wrong')).status).toBe(401);
    const ok = await signIn(TOKEN);
    expect(ok.status).toBe(303);
    expect(Object.keys(ok.cookies).sort()).toEqual(['tc_csrf', 'tc_session']);
    // A form posted from elsewhere (no nonce cookie of ours) is refused even with the right token.
    const forged = await raw(port, { method: 'POST', path: '/login', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: `nonce=x&token=${TOKEN}` });
    expect(forged.status).toBe(403);
  });

  it('a signed-in page reads freely, and changes things only with the CSRF token from its own origin', async () => {
    const { cookies } = await signIn(TOKEN);
    const cookie = `tc_session=${cookies.tc_session}; tc_csrf=${cookies.tc_csrf}`;
    expect((await raw(port, { path: '/', headers: { cookie } })).status).toBe(200);
    expect((await raw(port, { path: '/api/threads', headers: { cookie } })).status).toBe(200);
    const post = (headers: Record<string, string>) =>
      raw(port, { method: 'POST', path: '/api/threads', headers: { ...json, cookie, ...headers }, body: JSON.stringify({ author: 'maren', text: 'bookings trend' }) });
    // Another site's page can make the browser send the cookie, but cannot read the CSRF token.
    expect((await post({})).status).toBe(403);
    expect((await post({ 'x-csrf-token': 'guessed' })).status).toBe(403);
    expect((await post({ 'x-csrf-token': cookies.tc_csrf!, origin: 'http://evil.example' })).status).toBe(403);
    expect((await post({ 'x-csrf-token': cookies.tc_csrf!, origin: `http://127.0.0.1:${port}` })).status).toBe(201);
    expect((await post({ 'x-csrf-token': cookies.tc_csrf! })).status).toBe(201);
  });

  it('a link carrying the token signs in and drops the token from the address', async () => {
    const link = await raw(port, { path: `/?token=${encodeURIComponent(TOKEN)}` });
    expect(link.status).toBe(303);
    const signed = await raw(port, { path: String(link.headers.location) });
    expect(signed.status).toBe(303);
    expect(signed.headers.location).toBe('/');
    expect(String(signed.headers['set-cookie'])).toMatch(/tc_session=/);
    expect((await raw(port, { path: '/login?token=nope' })).status).toBe(401);
  });
});

describe('attachments and the small things', () => {
  let channel: LocalChannel;
  let port: number;

  beforeAll(async () => {
    channel = new LocalChannel({ port: 0, deliver: () => undefined, requestTimeoutMs: 600 });
    await channel.start();
    port = Number(new URL(channel.url).port);
  });
  afterAll(async () => channel?.stop());

  const postText = (text: string, contentType = 'application/json') =>
    raw(port, { method: 'POST', path: '/api/threads', headers: { 'content-type': contentType }, body: JSON.stringify({ author: 'maren', text }) });

  it('serves an attachment only under its own thread', async () => {
    const a = await channel.threads.createThread('maren', 'first');
    const b = await channel.threads.createThread('ola', 'second');
    const posted = await channel.post(`local:${a.thread.id}`, { key: 'k1', text: 'an answer', files: [{ name: 'table.csv', kind: 'table', content: 'month,revenue\n2024-01,1\n' }] });
    const file = (await channel.threads.get(a.thread.id))!.messages.find((m) => m.id === posted)!.files[0]!;
    expect(file.url).toBe(`/api/threads/${a.thread.id}/files/${file.id}`);
    expect((await raw(port, { path: file.url })).body).toBe('month,revenue\n2024-01,1\n');
    expect((await raw(port, { path: `/api/threads/${b.thread.id}/files/${file.id}` })).status).toBe(404);
    expect((await raw(port, { path: `/api/files/${file.id}` })).status).toBe(404);
    // Posting the same key again gives the same message, not a second one.
    expect(await channel.post(`local:${a.thread.id}`, { key: 'k1', text: 'an answer' })).toBe(posted);
    expect((await channel.threads.get(a.thread.id))!.messages).toHaveLength(2);
  });

  it('a malformed percent-escape in the path is the client\'s mistake (400), not a server error', async () => {
    const res = await raw(port, { path: '/api/threads/%E0%A4%A' });
    expect(res.status).toBe(400);
    expect(JSON.parse(res.body).error).toMatch(/percent-escape/);
    expect((await raw(port, { path: '/%zz' })).status).toBe(400);
  });

  it('takes application/json only, not formats whose names start the same', async () => {
    expect((await postText('revenue trend', 'application/json-patch+json')).status).toBe(415);
    expect((await postText('revenue trend', 'application/jsonx')).status).toBe(415);
    expect((await postText('revenue trend', 'Application/JSON; charset=utf-8')).status).toBe(201);
  });

  it('counts the 4,000-character limit in UTF-16 code units, as the bot and the page do', async () => {
    // U+1F4C8 (chart emoji) is two UTF-16 code units: 2,000 of them are exactly 4,000 units.
    const emoji = '\u{1F4C8}';
    expect((await postText(emoji.repeat(2000))).status).toBe(201);
    const over = await postText(emoji.repeat(2001));
    expect(over.status).toBe(400);
    expect(JSON.parse(over.body).error).toMatch(/at most 4000 characters/);
    expect((await postText('x'.repeat(4000))).status).toBe(201);
    expect((await postText('x'.repeat(4001))).status).toBe(400);
  });

  it('refuses a body declared too large at once, and drops one that never arrives', async () => {
    const huge = await raw(port, { method: 'POST', path: '/api/threads', headers: { 'content-type': 'application/json', 'content-length': String(1024 ** 3) } });
    expect(huge.status).toBe(413);
    // 100 bytes declared, 10 sent, then silence: the server gives up after its request timeout.
    const socket = connect(port, '127.0.0.1');
    await new Promise<void>((resolve, reject) => socket.once('connect', resolve).once('error', reject));
    let received = '';
    let closed = false;
    socket.setEncoding('utf8').on('data', (c: string) => (received += c));
    socket.on('close', () => (closed = true));
    socket.write(`POST /api/threads HTTP/1.1\r\nHost: 127.0.0.1:${port}\r\nContent-Type: application/json\r\nContent-Length: 100\r\n\r\n{"text":"x`);
    await waitFor('the server to drop the request', () => closed, 15_000);
    expect(received).toMatch(/^HTTP\/1\.1 408/);
  });
});
