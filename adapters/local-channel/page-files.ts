// The page's static files (HTML, CSS, JS; no build step) live in adapters/local-channel/page in
// the source tree. Compiled code runs from dist/, so the folder is found by walking up from this
// module to the package root, which holds the same relative path in both layouts.
import { existsSync, readFileSync, readdirSync } from 'node:fs';
import { dirname, extname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const PAGE_PATH = join('adapters', 'local-channel', 'page');

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.svg': 'image/svg+xml',
};

export interface PageFile {
  contentType: string;
  content: Buffer;
}

export function findPageDir(from: string = fileURLToPath(import.meta.url)): string {
  for (let dir = dirname(from); ; dir = dirname(dir)) {
    if (isPackageRoot(dir) && existsSync(join(dir, PAGE_PATH, 'index.html'))) return join(dir, PAGE_PATH);
    if (dirname(dir) === dir) throw new Error(`cannot find ${PAGE_PATH}/index.html above ${from}`);
  }
}

function isPackageRoot(dir: string): boolean {
  try {
    return (JSON.parse(readFileSync(join(dir, 'package.json'), 'utf8')) as { name?: string }).name === 'threadcount';
  } catch {
    return false;
  }
}

/** Reads the page's files once; only these names are served (no paths from the request). */
export function loadPageFiles(dir: string = findPageDir()): Map<string, PageFile> {
  const files = new Map<string, PageFile>();
  for (const name of readdirSync(dir)) {
    const type = TYPES[extname(name)];
    if (type) files.set(name, { contentType: type, content: readFileSync(join(dir, name)) });
  }
  return files;
}
