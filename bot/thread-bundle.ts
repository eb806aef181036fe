// A finished run in one download: every file its answers posted (charts, tables, SQL), the
// digest and the summary's text, zipped once, after the summary. Built from the posts themselves,
// so the zip holds exactly what the thread shows.
import { strToU8, zipSync, type Zippable } from 'fflate';
import { countOf, listJoin } from '../analysis/captions/grammar.js';
import { FOLDER_OF_KIND, type OutgoingFile, type OutgoingPost } from './port.js';

/** What went into a run's posts, in plan order. */
export interface BundleSource {
  /** Each answer posted by this process: its position in the plan and the files it carried. */
  answers: { position: number; files: OutgoingFile[] }[];
  /** Positions whose answers were posted before a restart: their files are in the thread, not here. */
  postedEarlier: number[];
  summary: Omit<OutgoingPost, 'key'>;
  /** The zip's file name (".zip" is added). */
  name: string;
  /** Stamped on every entry, so the same run zips to the same bytes. */
  at: Date;
}

/** The post that offers the zip: one per run, after the summary. */
export function bundlePost(source: BundleSource): Omit<OutgoingPost, 'key'> {
  const files = [...source.answers.flatMap((a) => a.files), ...(source.summary.files ?? [])];
  const entries: Zippable = {};
  for (const f of files) entries[entryPath(f)] = [toBytes(f.content), { mtime: source.at }];
  entries['summary.txt'] = [strToU8(`${source.summary.text}\n`), { mtime: source.at }];
  const zip: OutgoingFile = { name: `${source.name}.zip`, kind: 'bundle', content: Buffer.from(zipSync(entries, { level: 6 })) };
  return { text: bundleText(files, source.postedEarlier), files: [zip] };
}

/** Where a file sits in the zip: its kind's folder, then its own name. */
export function entryPath(f: OutgoingFile): string {
  const folder = FOLDER_OF_KIND[f.kind];
  return folder === '.' ? f.name : `${folder}/${f.name}`;
}

function bundleText(files: OutgoingFile[], postedEarlier: number[]): string {
  const count = (kind: OutgoingFile['kind']) => files.filter((f) => f.kind === kind).length;
  const parts = [
    count('chart') ? `${countOf(count('chart'), 'chart')} (PNG)` : '',
    count('table') ? `${countOf(count('table'), 'table')} (CSV)` : '',
    count('sql') ? countOf(count('sql'), 'SQL file') : '',
    count('digest') ? 'the digest' : '',
    'the summary',
  ].filter((p) => p !== '');
  const lead = `*Everything above in one file*: ${listJoin(parts)}.`;
  if (postedEarlier.length === 0) return lead;
  // Said, not left out silently: files posted before a restart are not held by this process.
  const which = postedEarlier.length === 1 ? `Answer ${postedEarlier[0]} was` : `Answers ${listJoin(postedEarlier.map(String))} were`;
  return `${lead}\n${which} posted before a restart, so ${postedEarlier.length === 1 ? 'its' : 'their'} files are attached above, not in the zip.`;
}

function toBytes(content: Buffer | string): Uint8Array {
  return typeof content === 'string' ? strToU8(content) : new Uint8Array(content.buffer, content.byteOffset, content.byteLength);
}
