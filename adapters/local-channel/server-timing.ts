// The API's answers carry a Server-Timing header (W3C Server Timing) with how long the server held
// the request: from accepting its connection (or, on a reused connection, from receiving the
// request) to writing the answer. Measured under load, it tells the server's own time apart from
// connection set-up and the client's.
import type { IncomingMessage, ServerResponse } from 'node:http';
import type { Socket } from 'node:net';

const acceptedAt = new WeakMap<Socket, number>();
const heldSince = new WeakMap<IncomingMessage, number>();

/** For the server's 'connection' event. */
export function noteAccepted(socket: Socket): void {
  acceptedAt.set(socket, performance.now());
}

/** At the start of handling a request: its connection's acceptance, for the first request on it. */
export function noteReceived(req: IncomingMessage): void {
  const accepted = acceptedAt.get(req.socket);
  acceptedAt.delete(req.socket);
  heldSince.set(req, accepted ?? performance.now());
}

/** The header's value for this response, or undefined when its request was not noted. */
export function serverTiming(res: ServerResponse): string | undefined {
  const since = res.req ? heldSince.get(res.req) : undefined;
  return since === undefined ? undefined : `held;dur=${(performance.now() - since).toFixed(2)}`;
}
