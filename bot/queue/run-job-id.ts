// A run's job id, the same every time the run is asked for, so the queue's primary key turns a
// second request for the run into nothing. Name-based UUIDs are RFC 9562's version 5 (SHA-1).
import { createHash } from 'node:crypto';
import type { RunRef } from './RunQueue.js';

/** Our own namespace for run ids (a random UUID, fixed once). */
export const RUN_NAMESPACE = '3d0b5c57-6f1e-4f7a-9b0e-2a41c6e8d913';

/** RFC 9562, section 5.5: SHA-1 of the namespace's 16 bytes and the name, with version and variant set. */
export function uuidV5(name: string, namespace: string): string {
  const ns = Buffer.from(namespace.replaceAll('-', ''), 'hex');
  if (ns.length !== 16) throw new Error(`not a UUID: ${namespace}`);
  const h = createHash('sha1').update(ns).update(name, 'utf8').digest().subarray(0, 16);
  h[6] = (h[6]! & 0x0f) | 0x50;
  h[8] = (h[8]! & 0x3f) | 0x80;
  const hex = h.toString('hex');
  return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-${hex.slice(12, 16)}-${hex.slice(16, 20)}-${hex.slice(20)}`;
}

export function runJobId(run: RunRef): string {
  // A NUL cannot occur in a thread id, so "a" + run 12 and "a1" + run 2 never meet.
  return uuidV5(`${run.threadId}\u0000${run.number}`, RUN_NAMESPACE);
}
