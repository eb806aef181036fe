// The labelled request corpus (test/reading/corpus/*.yaml) and the fresh set written apart from it
// (test/reading/corpus-fresh/*.yaml, never tuned on) are well-formed test material: every
// request carries every slot, names only what its dataset's catalog and data hold, and its dates
// obey the calendar rules of docs/reading.md that can be checked without reading the text (a
// window inside the data, a comparison before its window, an ISO week from Monday to Sunday, a
// deadline never before the request's own day). This checks the labels, not any reader: the
// reader is measured against them by `npm run eval:reading`.
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { DuckDBInstance, type DuckDBConnection } from '@duckdb/node-api';
import { parse } from 'yaml';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig } from '../../config/load.js';
import type { DatasetConfig } from '../../config/schema.js';
import { demoFixture } from '../helpers/demo-fixture.js';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const CORPUS_DIRS = ['test/reading/corpus', 'test/reading/corpus-fresh'] as const;

const SLOTS = ['kinds', 'metrics', 'dimensions', 'filters', 'comparisonGroup', 'launchDate', 'window', 'compareWindow', 'grain', 'audience', 'deadline', 'unknownTerms'] as const;
const KINDS = ['trend', 'growth', 'performance', 'kpi'];
const GRAINS = ['day', 'week', 'month', 'quarter', 'year'];
const AUDIENCES = ['leadership', 'managers', 'analysts'];
const REGISTERS = ['plain', 'terse', 'lower', 'typos', 'emoji', 'email', 'multi'];
const ISO_DATE = /^\d{4}-\d{2}-\d{2}$/;
const WEEKDAYS = ['sunday', 'monday', 'tuesday', 'wednesday', 'thursday', 'friday', 'saturday'];

interface Window {
  from: string;
  to: string;
}
type FilterValue = string[] | { exclude: string[] };
interface Expect {
  kinds: string[];
  metrics: string[];
  dimensions: string[];
  filters: Record<string, FilterValue>;
  comparisonGroup: string | null;
  launchDate: string | null;
  window: Window | null;
  compareWindow: Window | null;
  grain: string | null;
  audience: string | null;
  deadline: string | null;
  unknownTerms: string[];
}
interface CorpusRequest {
  id: string;
  split: string;
  register: string;
  now?: string;
  text: string;
  note?: string;
  expect: Expect;
}
interface CorpusFile {
  /** The file's path under test/reading/, e.g. `corpus-fresh/bookings.yaml`. */
  name: string;
  fresh: boolean;
  dataset: string;
  config: string;
  now: string;
  requests: CorpusRequest[];
}

const allFiles: CorpusFile[] = CORPUS_DIRS.flatMap((dir) =>
  readdirSync(join(ROOT, dir))
    .filter((f) => f.endsWith('.yaml'))
    .sort()
    .map((f) => ({
      name: `${dir.split('/').pop()}/${f}`,
      fresh: dir.endsWith('-fresh'),
      ...(parse(readFileSync(join(ROOT, dir, f), 'utf8')) as Omit<CorpusFile, 'name' | 'fresh'>),
    })),
);
/** The corpus the reader is tuned and held back on; the fresh set is checked alongside it. */
const files = allFiles.filter((f) => !f.fresh);
const freshFiles = allFiles.filter((f) => f.fresh);

/** The local calendar date of an instant in a time zone. */
function localDate(instant: string, timeZone: string): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(new Date(instant));
}
function weekdayOf(isoDate: string): number {
  return new Date(`${isoDate}T00:00:00Z`).getUTCDay();
}
function addDays(isoDate: string, days: number): string {
  return new Date(Date.parse(`${isoDate}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10);
}
/** Monday of ISO week `week` of `year` (week 1 holds 4 January). */
function isoWeekMonday(year: number, week: number): string {
  const jan4 = `${year}-01-04`;
  const monday1 = addDays(jan4, -((weekdayOf(jan4) + 6) % 7));
  return addDays(monday1, 7 * (week - 1));
}

interface DataFacts {
  dataset: DatasetConfig;
  first: string;
  last: string;
  values: Map<string, Set<string>>;
}
const facts = new Map<string, DataFacts>();
let db: DuckDBInstance;
let con: DuckDBConnection;

beforeAll(async () => {
  db = await DuckDBInstance.create(':memory:');
  con = await db.connect();
  const demo = await demoFixture();
  let attached = false;
  const byDataset = new Map<string, DataFacts>();
  for (const file of allFiles) {
    const known = byDataset.get(`${file.config}\u0000${file.dataset}`);
    if (known) {
      facts.set(file.name, known);
      continue;
    }
    const config = loadConfig(join(ROOT, file.config));
    const dataset = config.datasets.find((d) => d.name === file.dataset)!;
    expect(dataset, `${file.name}: dataset ${file.dataset} is in ${file.config}`).toBeDefined();
    const source = dataset.source;
    const from =
      source.kind === 'duckdb'
        ? `read_only_db.${dataset.table}`
        : source.kind === 'csv'
          ? `read_csv([${source.paths.map((p) => `'${join(config.baseDir, p)}'`).join(', ')}], auto_detect = true)`
          : null;
    if (source.kind === 'duckdb' && !attached) {
      // The example config's file is written by the demo generator (the same data the bot reads).
      await con.run(`ATTACH '${demo.databasePath}' AS read_only_db (READ_ONLY)`);
      attached = true;
    }
    expect(from, `${file.name}: a source the check can read`).not.toBeNull();
    const [range] = (await con.runAndReadAll(
      `SELECT CAST(min(CAST("${dataset.time_column}" AS DATE)) AS VARCHAR) AS lo, CAST(max(CAST("${dataset.time_column}" AS DATE)) AS VARCHAR) AS hi FROM ${from}`,
    )).getRowObjectsJson();
    const values = new Map<string, Set<string>>();
    for (const dim of dataset.dimensions.filter((d) => !d.personal_data)) {
      const rows = (await con.runAndReadAll(`SELECT DISTINCT CAST("${dim.column}" AS VARCHAR) AS v FROM ${from} WHERE "${dim.column}" IS NOT NULL`)).getRowObjectsJson();
      values.set(dim.name, new Set(rows.map((r) => String(r.v))));
    }
    const found = { dataset, first: String(range!.lo), last: String(range!.hi), values };
    byDataset.set(`${file.config}\u0000${file.dataset}`, found);
    facts.set(file.name, found);
  }
});

afterAll(() => {
  con?.closeSync();
  db?.closeSync();
});

describe('the reading corpus', () => {
  it('holds at least 320 requests, about half on the demo dataset, with unique ids', () => {
    const all = files.flatMap((f) => f.requests);
    expect(all.length).toBeGreaterThanOrEqual(320);
    const demo = files.find((f) => f.dataset === 'bookings')!.requests.length;
    expect(demo / all.length).toBeGreaterThan(0.4);
    expect(demo / all.length).toBeLessThan(0.6);
    expect(new Set(all.map((r) => r.id)).size).toBe(all.length);
    expect(files.length).toBeGreaterThanOrEqual(3);
  });

  it('holds a fresh set of 150 requests over the same three datasets, every one split fresh, ids unique across both sets', () => {
    const fresh = freshFiles.flatMap((f) => f.requests);
    expect(fresh.length).toBe(150);
    expect(freshFiles.find((f) => f.dataset === 'bookings')!.requests.length).toBe(90);
    expect(new Set(freshFiles.map((f) => f.dataset))).toEqual(new Set(files.map((f) => f.dataset)));
    for (const r of fresh) expect(r.split, r.id).toBe('fresh');
    const ids = allFiles.flatMap((f) => f.requests.map((r) => r.id));
    expect(new Set(ids).size).toBe(ids.length);
  });

  it.each(files.map((f) => [f.name, f] as const))('%s: every fifth request, and only those, is held back', (_name, file) => {
    file.requests.forEach((r, i) => expect(r.split, r.id).toBe(i % 5 === 4 ? 'held' : 'tune'));
  });

  it.each(allFiles.map((f) => [f.name, f] as const))('%s: every request carries every slot, in its enumerations', (_name, file) => {
    expect(Number.isNaN(Date.parse(file.now))).toBe(false);
    for (const r of file.requests) {
      expect(Object.keys(r.expect).sort(), r.id).toEqual([...SLOTS].sort());
      expect(REGISTERS, r.id).toContain(r.register);
      expect(r.text.trim().length, r.id).toBeGreaterThan(0);
      if (r.now !== undefined) expect(Number.isNaN(Date.parse(r.now)), r.id).toBe(false);
      const e = r.expect;
      expect(e.kinds.length, r.id).toBeGreaterThan(0);
      for (const k of e.kinds) expect(KINDS, r.id).toContain(k);
      if (e.grain !== null) expect(GRAINS, r.id).toContain(e.grain);
      if (e.audience !== null) expect(AUDIENCES, r.id).toContain(e.audience);
      for (const t of e.unknownTerms) expect(t, r.id).toBe(t.toLowerCase());
      for (const d of [e.launchDate, e.deadline, e.window?.from, e.window?.to, e.compareWindow?.from, e.compareWindow?.to]) {
        if (d != null) expect(d, r.id).toMatch(ISO_DATE);
      }
      // A comparison window never comes without the window it is compared with.
      if (e.compareWindow) expect(e.window, r.id).not.toBeNull();
    }
  });

  it.each(allFiles.map((f) => [f.name, f] as const))('%s: names only catalog terms and values the data holds; never a personal column', (name, file) => {
    const { dataset, values } = facts.get(name)!;
    const metrics = new Set(dataset.metrics.map((m) => m.name));
    const personal = new Set(dataset.dimensions.filter((d) => d.personal_data).map((d) => d.name));
    const groups = new Map(dataset.comparison_groups.map((g) => [g.name, g]));
    for (const r of file.requests) {
      const e = r.expect;
      for (const m of e.metrics) expect(metrics.has(m), `${r.id}: metric ${m}`).toBe(true);
      for (const d of e.dimensions) {
        expect(values.has(d), `${r.id}: dimension ${d}`).toBe(true);
        expect(personal.has(d), `${r.id}: personal ${d}`).toBe(false);
      }
      for (const [dim, spec] of Object.entries(e.filters)) {
        expect(values.has(dim), `${r.id}: filter dimension ${dim}`).toBe(true);
        const named = Array.isArray(spec) ? spec : spec.exclude;
        expect(named.length, r.id).toBeGreaterThan(0);
        for (const v of named) expect(values.get(dim)!.has(v), `${r.id}: ${dim} value "${v}" is in the data`).toBe(true);
      }
      if (e.comparisonGroup !== null) expect(groups.has(e.comparisonGroup), `${r.id}: group ${e.comparisonGroup}`).toBe(true);
      // An unknown term is not a value the data holds (that would be a filter).
      const allValues = new Set([...values.values()].flatMap((s) => [...s].map((v) => v.toLowerCase())));
      for (const t of e.unknownTerms) expect(allValues.has(t), `${r.id}: "${t}" is a value of the data`).toBe(false);
    }
  });

  it.each(allFiles.map((f) => [f.name, f] as const))('%s: windows lie inside the data, comparisons come before their window', (name, file) => {
    const { first, last } = facts.get(name)!;
    for (const r of file.requests) {
      for (const w of [r.expect.window, r.expect.compareWindow]) {
        if (!w) continue;
        expect(w.from <= w.to, `${r.id}: ${w.from} <= ${w.to}`).toBe(true);
        expect(w.from >= first, `${r.id}: from ${w.from} on or after the data's first day ${first}`).toBe(true);
        expect(w.to <= last, `${r.id}: to ${w.to} on or before the data's last day ${last}`).toBe(true);
      }
      const { window, compareWindow } = r.expect;
      if (window && compareWindow) expect(compareWindow.to < window.from, `${r.id}: the comparison ends before the window starts`).toBe(true);
    }
  });

  it.each(allFiles.map((f) => [f.name, f] as const))('%s: a stated ISO week runs Monday to Sunday of that week', (name, file) => {
    for (const r of file.requests) {
      const m = /week (\d{1,2}) of (\d{4})|(\d{4})-W(\d{2})/i.exec(r.text);
      if (!m) continue;
      const [year, week] = m[1] ? [Number(m[2]), Number(m[1])] : [Number(m[3]), Number(m[4])];
      const w = r.expect.window!;
      expect(w.from, r.id).toBe(isoWeekMonday(year, week));
      if (!/ to \d/.test(r.text)) expect(w.to, r.id).toBe(addDays(w.from, 6));
    }
  });

  it.each(allFiles.map((f) => [f.name, f] as const))('%s: a deadline is never before the request\'s own day, and a named weekday is that weekday', (name, file) => {
    const zone = facts.get(name)!.dataset.timezone;
    for (const r of file.requests) {
      const d = r.expect.deadline;
      if (d === null) continue;
      const today = localDate(r.now ?? file.now, zone);
      expect(d >= today, `${r.id}: deadline ${d} is on or after today ${today}`).toBe(true);
      const named = WEEKDAYS.find((day) => new RegExp(`\\b(by|before|due|on|for)\\b[^.?!]*\\b${day}\\b|\\b${day}'s\\b`, 'i').test(r.text));
      if (named) {
        expect(weekdayOf(d), `${r.id}: ${d} is a ${named}`).toBe(WEEKDAYS.indexOf(named));
        // "by Friday" is the coming Friday: within the next seven days.
        expect(d <= addDays(today, 6), `${r.id}: ${d} is the coming ${named}`).toBe(true);
      }
    }
  });
});
