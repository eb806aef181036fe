// The README's table of the local channel's routes against the routes the code serves: the
// attachment route is the one a message's files[].url is built with (local-thread-log.ts fileUrl),
// and every route the API's header names is in the table.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fileUrl } from '../../adapters/local-channel/local-thread-log.js';

const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8');
const api = readFileSync(new URL('../../adapters/local-channel/local-api.ts', import.meta.url), 'utf8');
/** `GET /api/threads/:id/files/:fid` -> `GET /api/threads/:/files/:` (parameter names aside). */
const shape = (route: string) => route.replace(/:[a-z]+/gi, ':').trim();
const tableRoutes = [...readme.matchAll(/^\| `((?:GET|POST) \/api\/[^`]*)`/gm)].map((m) => shape(m[1]!));

describe('README routes of the local channel', () => {
  it('names the attachment route the messages link to', () => {
    expect(tableRoutes).toContain(`GET ${shape(decodeURIComponent(fileUrl(':id', ':fid')))}`);
    expect(tableRoutes.some((r) => r.startsWith('GET /api/files'))).toBe(false);
  });

  it('lists every route the API serves', () => {
    const served = [...api.matchAll(/^\/\/ {3}(GET|POST) +(\/api\/\S+)/gm)].map((m) => shape(`${m[1]} ${m[2]}`));
    expect(served.length).toBeGreaterThan(4);
    for (const r of served) expect(tableRoutes).toContain(r);
  });
});
