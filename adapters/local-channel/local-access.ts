// Who may use the local channel. On loopback without a token: anyone on this machine, with the
// Host header checked (a loopback name or address and our port) so another site's page cannot
// reach the API by rebinding a name of its own to 127.0.0.1. With an access token (required
// beyond loopback): the API takes `Authorization: Bearer <token>`; the page signs in once (a form,
// or a link carrying ?token=) and gets a session cookie, and a request that changes something
// with that cookie must also carry the CSRF token (double-submit: a cookie the page's script
// reads, sent back as a header) and, when the browser sends one, an Origin naming this server.
import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto';
import type { IncomingMessage } from 'node:http';
import { BlockList, isIP } from 'node:net';

export const SESSION_COOKIE = 'tc_session';
export const CSRF_COOKIE = 'tc_csrf';
export const LOGIN_COOKIE = 'tc_login';
export const CSRF_HEADER = 'x-csrf-token';

const LOOPBACK = new BlockList();
LOOPBACK.addSubnet('127.0.0.0', 8, 'ipv4');
LOOPBACK.addAddress('::1', 'ipv6');

/** Whether an IP address is a loopback one: all of 127.0.0.0/8, ::1, and IPv4 loopback mapped into IPv6. */
export function isLoopbackAddress(address: string): boolean {
  const bare = address.replace(/^\[|\]$/g, '');
  const mapped = /^::ffff:(\d+\.\d+\.\d+\.\d+)$/i.exec(bare);
  if (mapped) return LOOPBACK.check(mapped[1]!, 'ipv4');
  const family = isIP(bare);
  return family !== 0 && LOOPBACK.check(bare, family === 4 ? 'ipv4' : 'ipv6');
}

/**
 * Whether a Host header names this server on loopback: "localhost" or a loopback address (in any
 * spelling a URL accepts, such as 127.1 or [::1]) with the port it listens on.
 */
export function isLoopbackHost(host: string | undefined, port: number): boolean {
  if (!host || !/^[^\s/?#@\\]+$/.test(host)) return false;
  let url: URL;
  try {
    url = new URL(`http://${host}`);
  } catch {
    return false;
  }
  const hostPort = url.port === '' ? 80 : Number(url.port);
  return hostPort === port && (url.hostname === 'localhost' || isLoopbackAddress(url.hostname));
}

/** How a request proved it may use the channel. */
export type Credential = 'bearer' | 'session' | null;

export class LocalAccess {
  private readonly session: string;
  private readonly csrf: string;

  constructor(private readonly token: string) {
    // Derived from the token: a new token ends every session, and nothing needs storing.
    this.session = derive(token, 'threadcount local session v1');
    this.csrf = derive(token, 'threadcount local csrf v1');
  }

  /** The token as given (a form field, a link's ?token=, a bearer header) is the right one. */
  matches(given: string | undefined | null): boolean {
    return given != null && sameSecret(given, this.token);
  }

  credential(req: IncomingMessage): Credential {
    const auth = req.headers.authorization ?? '';
    const bearer = /^Bearer\s+(\S+)\s*$/i.exec(auth);
    if (bearer) return this.matches(bearer[1]) ? 'bearer' : null;
    const cookie = readCookies(req)[SESSION_COOKIE];
    return cookie !== undefined && sameSecret(cookie, this.session) ? 'session' : null;
  }

  /**
   * Whether a request signed in by cookie may change something: the CSRF header matches, and the
   * Origin, when sent, is this server's.
   */
  sessionMayWrite(req: IncomingMessage): boolean {
    const header = req.headers[CSRF_HEADER];
    if (typeof header !== 'string' || !sameSecret(header, this.csrf)) return false;
    const origin = req.headers.origin;
    if (origin === undefined) return true;
    try {
      return new URL(origin).host === req.headers.host;
    } catch {
      return false;
    }
  }

  /** The cookies a signed-in page gets: the session (script cannot read it) and the CSRF token (the script sends it back). */
  signInCookies(): string[] {
    const common = 'Path=/; SameSite=Strict; Max-Age=2592000';
    return [`${SESSION_COOKIE}=${this.session}; HttpOnly; ${common}`, `${CSRF_COOKIE}=${this.csrf}; ${common}`];
  }
}

/** A fresh value for the sign-in form and its cookie, so only a form this server showed can sign in. */
export function loginNonce(): string {
  return randomBytes(18).toString('base64url');
}

export function loginNonceCookie(nonce: string): string {
  return `${LOGIN_COOKIE}=${nonce}; HttpOnly; Path=/login; SameSite=Strict; Max-Age=600`;
}

export function readCookies(req: IncomingMessage): Record<string, string> {
  const out: Record<string, string> = {};
  for (const part of (req.headers.cookie ?? '').split(';')) {
    const eq = part.indexOf('=');
    if (eq > 0) out[part.slice(0, eq).trim()] = part.slice(eq + 1).trim();
  }
  return out;
}

function derive(token: string, purpose: string): string {
  return createHmac('sha256', token).update(purpose).digest('base64url');
}

/** Compared in constant time (digests of equal length, whatever was given). */
function sameSecret(given: string, expected: string): boolean {
  const a = createHmac('sha256', 'compare').update(given).digest();
  const b = createHmac('sha256', 'compare').update(expected).digest();
  return timingSafeEqual(a, b);
}
