// `npm run bench`: speed and memory of the demo plan end to end, against the database's own floor
// (the plan's SQL alone), against one shared scan (a single GROUP BY), and against two peers an
// analyst might use instead (arquero, pandas); then the chat side's acknowledgement latency.
// Writes BENCHMARKS.md. A benchmark, never a test: it checks only that the peers' numbers agree.
//   node dist/bench/run.js [--sizes 1M,10M,30M] [--quick] [--reps N] [--out FILE]
//   node dist/bench/run.js --report-from .cache/bench/last-run.json   (the report again, from a run's raw results)
import { spawn, spawnSync } from 'node:child_process';
import { createReadStream, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, tmpdir, totalmem } from 'node:os';
import { join, relative } from 'node:path';
import { parseArgs } from 'node:util';
import { DuckDBInstance } from '@duckdb/node-api';
import { loadConfig } from '../config/load.js';
import { qualityCacheDir } from '../analysis/quality/quality-cache.js';
import { DEFAULT_MEMORY_LIMIT } from '../analysis/sources/duckdb-source.js';
import { measureAck, type AckResult } from './ack.js';
import { benchData, cacheDir, generatorVersion, packageRoot, type BenchData } from './data.js';
import type { FloorArgs, FloorResult } from './floor.js';
import { compareNumbers, type Agreement } from './numbers.js';
import type { OursResult } from './ours.js';
import type { PeerResult } from './peer-arquero.js';
import { PLAN_WINDOWS } from './plan.js';
import { loadLayout, startWarehouseServers, WAREHOUSE_SCHEMA, WAREHOUSE_URL_ENV, type Layout } from './warehouse.js';
import type { WarehouseFloorResult } from './warehouse-floor.js';
import { withClient } from './warehouse-load.js';
import { PEER_LIMIT_TIMES_OURS, PEER_MIN_LIMIT_MS } from './limits.js';
import { median, writeReport } from './report.js';

export interface PandasResult {
  readMs: number;
  computeMs: number;
  totalMs: number;
  rows: number;
  numbers: Record<string, number>;
  maxRssKb: number;
  pandas: string;
  /** Exporting the CSV from DuckDB (once per data version, cached); null when reused. */
  exportMs: number | null;
}

export interface SizeResult {
  rows: number;
  generatedSeconds: number | null;
  databaseBytes: number;
  /** Warm runs: the data's quality report already kept for this version of the data. */
  ours: OursResult[];
  /** Each warm run of ours as a whole process (Node start-up and module loading included), as the parent saw it. */
  oursProcessMs: number[];
  /** The first run on this version of the data (the quality cache emptied first), so its check runs in full. */
  oursCold: OursResult;
  oursColdProcessMs: number;
  floor: FloorResult[];
  arquero: PeerResult | null;
  arqueroAgreement: Agreement | null;
  arqueroNote: string | null;
  /** Set when a peer was stopped at its time limit: it took longer than this. */
  arqueroStoppedAtMs: number | null;
  pandasStoppedAtMs: number | null;
  pandas: PandasResult | null;
  pandasAgreement: Agreement | null;
  pandasNote: string | null;
  /** Our runs agree with each other (they must: same data, same plan). */
  oursAgreement: Agreement | null;
}

/** One warehouse layout at one size: our runs and the warehouse's own floor. */
export interface WarehouseResult {
  layout: Layout;
  rows: number;
  loadSeconds: number;
  partitions: { name: string; server: string }[];
  /** The same request on DuckDB over the same data, in this run (absent in runs from before it was kept). */
  duckdb?: OursResult[];
  /** The first run on this data (quality report and coverage not kept yet), then the warm runs. */
  oursCold: OursResult;
  ours: OursResult[];
  floor: WarehouseFloorResult[];
  /** Our answers' numbers against DuckDB's on the same data. */
  agreement: Agreement;
  /** Set when the layout could not be measured. */
  error?: string;
}

export interface Machine {
  cpuModel: string;
  cores: number;
  memoryBytes: number;
  loadStart: number[];
  loadEnd: number[];
  node: string;
  duckdb: string;
  arquero: string;
  python: string | null;
}

export interface BenchRun {
  startedAt: string;
  command: string;
  reps: number;
  machine: Machine;
  /** The engine's settings as our runs and the floor used them; the memory limit is threadcount's default unless the config sets one. */
  engine: { threads: number | null; memoryLimit: string | null; memoryLimitFromConfig: boolean; jobs: number };
  sizes: SizeResult[];
  /** The warehouse path (PostgreSQL, plain and sharded); absent in runs from before it was measured. */
  warehouse?: WarehouseResult[];
  warehouseError?: string | null;
  /** The PostgreSQL server version the warehouse ran on. */
  postgres?: string | null;
  ack: AckResult | null;
  ackError: string | null;
  seconds: number;
}

const SIZES = { '1M': 1_000_000, '10M': 10_000_000, '30M': 30_000_000 } as const;
const WAREHOUSE_SIZES = [2_000_000, 10_000_000];


function log(line: string): void {
  process.stderr.write(`[bench ${new Date().toISOString().slice(11, 19)}] ${line}\n`);
}

function parseSize(text: string): number {
  const m = /^(\d+(?:\.\d+)?)([kKmM]?)$/.exec(text.trim());
  if (!m) throw new Error(`--sizes takes sizes like 1M,10M,30M or 500k (got "${text}")`);
  const n = Math.round(Number(m[1]) * (m[2] === '' ? 1 : m[2]!.toLowerCase() === 'k' ? 1_000 : 1_000_000));
  if (n < 1_000) throw new Error(`a size must be at least 1000 rows (got "${text}")`);
  return n;
}

async function main(): Promise<void> {
  const started = performance.now();
  const startedAt = new Date().toISOString();
  const { values } = parseArgs({
    args: process.argv.slice(2),
    options: {
      sizes: { type: 'string' },
      'warehouse-sizes': { type: 'string' },
      quick: { type: 'boolean' },
      reps: { type: 'string' },
      out: { type: 'string' },
      'report-from': { type: 'string' },
    },
    strict: true,
  });
  const root = packageRoot();
  const out = values.out ?? join(root, 'BENCHMARKS.md');
  // The report's wording changed, not the measurements: write it again from the run's raw results.
  if (values['report-from']) {
    writeFileSync(out, writeReport(JSON.parse(readFileSync(values['report-from'], 'utf8')) as BenchRun));
    log(`wrote ${relative(process.cwd(), out) || out} from ${values['report-from']}`);
    return;
  }
  const sizes = values.quick ? [SIZES['1M']] : (values.sizes?.split(',').map(parseSize) ?? Object.values(SIZES));
  // The warehouse path: 2M and 10M by default, none in a quick run unless asked; "none" skips it.
  const warehouseText = values['warehouse-sizes'] ?? (values.quick ? 'none' : undefined);
  const warehouseSizes = warehouseText === 'none' ? [] : (warehouseText?.split(',').map(parseSize) ?? WAREHOUSE_SIZES);
  const reps = values.reps ? Number(values.reps) : values.quick ? 1 : 3;
  if (!Number.isInteger(reps) || reps < 1 || reps > 20) throw new Error('--reps must be a whole number from 1 to 20');
  const python = findPandas();
  const machine: Machine = {
    cpuModel: cpus()[0]?.model.trim() ?? 'unknown',
    cores: cpus().length,
    memoryBytes: totalmem(),
    loadStart: loadavg(),
    loadEnd: [],
    node: process.version,
    duckdb: await duckdbVersion(),
    arquero: packageVersion('arquero'),
    python: python ? `${python.version} with pandas ${python.pandas}` : null,
  };
  log(`machine: ${machine.cores} cores, load ${machine.loadStart.map((l) => l.toFixed(2)).join(' ')}; sizes ${sizes.join(', ')}; ${reps} rep(s)`);

  const results: SizeResult[] = [];
  let engine: BenchRun['engine'] = { threads: null, memoryLimit: null, memoryLimitFromConfig: false, jobs: 0 };
  for (const rows of sizes) {
    const data = await benchData(rows, log);
    const config = loadConfig(data.configPath);
    engine = {
      threads: config.engine.threads ?? null,
      memoryLimit: config.engine.memory_limit ?? DEFAULT_MEMORY_LIMIT,
      memoryLimitFromConfig: config.engine.memory_limit !== undefined,
      jobs: config.conversation.max_concurrent_jobs,
    };
    results.push(await measureSize(data, reps, engine, python));
  }

  let warehouse: WarehouseResult[] = [];
  let warehouseError: string | null = null;
  let postgres: string | null = null;
  if (warehouseSizes.length > 0) {
    try {
      ({ results: warehouse, postgres } = await measureWarehouse(warehouseSizes, reps));
    } catch (err) {
      warehouseError = err instanceof Error ? err.message : String(err);
      log(`the warehouse measurement failed: ${warehouseError}`);
    }
  }

  let ack: AckResult | null = null;
  let ackError: string | null = null;
  try {
    log('chat side: 200 requests at once through the local channel...');
    const smallest = await benchData(Math.min(...sizes), log);
    ack = await measureAck(smallest.configPath, 200);
  } catch (err) {
    ackError = err instanceof Error ? err.message : String(err);
    log(`the chat-side measurement failed: ${ackError}`);
  }
  machine.loadEnd = loadavg();

  const argv = process.argv.slice(2);
  const run: BenchRun = {
    startedAt,
    command: `npm run bench${argv.length ? ` -- ${argv.join(' ')}` : ''}`,
    reps,
    machine,
    engine,
    sizes: results,
    warehouse,
    warehouseError,
    postgres,
    ack,
    ackError,
    seconds: (performance.now() - started) / 1000,
  };
  mkdirSync(cacheDir(), { recursive: true });
  writeFileSync(join(cacheDir(), 'last-run.json'), `${JSON.stringify(run, null, 1)}\n`);
  writeFileSync(out, writeReport(run));
  log(`wrote ${relative(process.cwd(), out) || out} (raw results in ${relative(process.cwd(), join(cacheDir(), 'last-run.json'))}) in ${run.seconds.toFixed(0)} s`);
  const disagreements = [...results.flatMap((r) => [r.arqueroAgreement, r.pandasAgreement, r.oursAgreement]), ...warehouse.map((w) => w.agreement)].filter((a) => a && a.differences.length > 0);
  if (disagreements.length > 0) {
    log('some numbers disagree; see BENCHMARKS.md');
    process.exitCode = 1;
  }
}

async function measureSize(data: BenchData, reps: number, engine: BenchRun['engine'], python: Pandas | null): Promise<SizeResult> {
  const label = data.rows.toLocaleString('en');
  await warmPageCache(data.databasePath);
  const ours: OursResult[] = [];
  const oursProcessMs: number[] = [];
  const floor: FloorResult[] = [];
  const runOurs = async (): Promise<{ result: OursResult; processMs: number }> => {
    const spawned = performance.now();
    const o = await child<OursResult>('ours', { configPath: data.configPath });
    const processMs = performance.now() - spawned;
    if (o.end !== 'done') throw new Error(`the demo conversation ended "${o.end}", not "done"`);
    return { result: o, processMs };
  };
  // The first request on a new version of the data finds no quality report kept for it.
  rmSync(qualityCacheDir(loadConfig(data.configPath)), { recursive: true, force: true });
  log(`${label} rows: ours, first run on this data (quality check not cached)...`);
  const cold = await runOurs();
  log(`${label} rows: ours (first run) ${(cold.result.totalMs / 1000).toFixed(2)} s, quality check ${(cold.result.phases.checks.wallMs / 1000).toFixed(2)} s`);
  for (let i = 0; i < reps; i++) {
    log(`${label} rows: ours, run ${i + 1} of ${reps}...`);
    const { result: o, processMs } = await runOurs();
    oursProcessMs.push(processMs);
    ours.push(o);
    log(`${label} rows: ours ${(o.totalMs / 1000).toFixed(2)} s; the floor, run ${i + 1} of ${reps}...`);
    // Its window is its first two parameters (checked, so a change to the template shows up as no reference, not a wrong one).
    const perCustomer = o.queries.find((q) => q.name === 'frequency' && /"sail_date" >= CAST\(\$1 AS DATE\)\s+AND "sail_date" < CAST\(\$2 AS DATE\)/.test(q.sql));
    const floorArgs: FloorArgs = {
      databasePath: data.databasePath,
      queries: o.queries,
      ...(perCustomer ? { perCustomerWindow: [String(perCustomer.params[0]), String(perCustomer.params[1])] as [string, string] } : {}),
      ...(engine.threads ? { threads: engine.threads } : {}),
      ...(engine.memoryLimit ? { memoryLimit: engine.memoryLimit } : {}),
    };
    const f = await child<FloorResult>('floor', floorArgs);
    floor.push(f);
    log(`${label} rows: floor ${(f.floorMs / 1000).toFixed(2)} s, single GROUP BY ${(f.groupByMs / 1000).toFixed(2)} s`);
  }
  const reference = cold.result.numbers;
  const peerLimitMs = Math.round(Math.max(PEER_MIN_LIMIT_MS, PEER_LIMIT_TIMES_OURS * median(ours.map((o) => o.totalMs))));
  const oursAgreement = merge(ours.map((o) => compareNumbers(reference, o.numbers)));

  log(`${label} rows: arquero (load into JS arrays, then compute)...`);
  let arquero: PeerResult | null = null;
  let arqueroAgreement: Agreement | null = null;
  let arqueroNote: string | null = null;
  let arqueroStoppedAtMs: number | null = null;
  let pandasStoppedAtMs: number | null = null;
  try {
    // A heap big enough for every row as JS values (Node's default stops near 4 GB).
    arquero = await child<PeerResult>('arquero', { databasePath: data.databasePath }, { nodeArgs: ['--max-old-space-size=12288'], timeoutMs: peerLimitMs });
    arqueroAgreement = compareNumbers(reference, arquero.numbers);
    log(`${label} rows: arquero ${(arquero.totalMs / 1000).toFixed(2)} s (load ${(arquero.loadMs / 1000).toFixed(2)} s); ${arqueroAgreement.differences.length} of ${arqueroAgreement.checked} numbers differ`);
  } catch (err) {
    if (err instanceof PeerTimeout) arqueroStoppedAtMs = peerLimitMs;
    arqueroNote = err instanceof Error ? err.message : String(err);
    log(`${label} rows: arquero: ${arqueroNote}`);
  }

  let pandas: PandasResult | null = null;
  let pandasAgreement: Agreement | null = null;
  let pandasNote: string | null = null;
  if (!python) {
    pandasNote = 'skipped: no python3 with pandas on this machine (Debian: apt-get install python3-pandas)';
  } else {
    log(`${label} rows: pandas (read the CSV, then compute)...`);
    try {
      const csv = await exportCsv(data);
      pandas = { ...runPandas(python, csv.path, peerLimitMs), exportMs: csv.exportMs };
      pandasAgreement = compareNumbers(reference, pandas.numbers);
      log(`${label} rows: pandas ${(pandas.totalMs / 1000).toFixed(2)} s (read ${(pandas.readMs / 1000).toFixed(2)} s); ${pandasAgreement.differences.length} of ${pandasAgreement.checked} numbers differ`);
    } catch (err) {
      if (err instanceof PeerTimeout) pandasStoppedAtMs = peerLimitMs;
      pandasNote = err instanceof Error ? err.message : String(err);
      log(`${label} rows: pandas: ${pandasNote}`);
    }
  }
  return {
    rows: data.rows,
    generatedSeconds: data.generatedSeconds,
    databaseBytes: statSync(data.databasePath).size,
    ours,
    oursProcessMs,
    oursCold: cold.result,
    oursColdProcessMs: cold.processMs,
    floor,
    arquero,
    arqueroAgreement,
    arqueroNote,
    arqueroStoppedAtMs,
    pandas,
    pandasAgreement,
    pandasNote,
    pandasStoppedAtMs,
    oursAgreement,
  };
}

/**
 * Both warehouse layouts at each size: the demo data loaded, then our first run (nothing kept),
 * the warm runs and the floor alternating, each in a fresh process. Our numbers must match
 * DuckDB's own answers on the same data.
 */
async function measureWarehouse(sizes: number[], reps: number): Promise<{ results: WarehouseResult[]; postgres: string | null }> {
  const servers = await startWarehouseServers(log);
  const results: WarehouseResult[] = [];
  try {
    const postgres = await withClient(servers.plainUrl, async (c) => String((await c.query<{ v: string }>("SELECT current_setting('server_version') AS v")).rows[0]?.v ?? 'unknown'));
    for (const rows of sizes) {
      const data = await benchData(rows, log);
      // DuckDB's answers on the same data: the numbers every warehouse run must match.
      log(`warehouse ${rows.toLocaleString('en')} rows: DuckDB's answers, for the comparison...`);
      // Run as many times as the warehouse's warm runs, so its median sits beside theirs.
      const duckdb: OursResult[] = [];
      for (let i = 0; i < reps; i++) duckdb.push(await child<OursResult>('ours', { configPath: data.configPath }));
      const reference = duckdb[0]!.numbers;
      log(`warehouse ${rows.toLocaleString('en')} rows: DuckDB ${(median(duckdb.map((o) => o.totalMs)) / 1000).toFixed(2)} s`);
      for (const layout of ['plain', 'sharded'] as const) {
        const label = `warehouse ${rows.toLocaleString('en')} rows, ${layout}`;
        const loaded = await loadLayout(layout, data, servers, log);
        process.env[WAREHOUSE_URL_ENV[layout]] = loaded.readerUrl;
        rmSync(qualityCacheDir(loadConfig(loaded.configPath)), { recursive: true, force: true });
        const runOurs = async () => {
          const o = await child<OursResult>('ours', { configPath: loaded.configPath });
          if (o.end !== 'done') throw new Error(`the demo conversation on ${layout} PostgreSQL ended "${o.end}", not "done"`);
          return o;
        };
        log(`${label}: ours, first run (nothing kept yet)...`);
        const oursCold = await runOurs();
        log(`${label}: ours (first run) ${(oursCold.totalMs / 1000).toFixed(2)} s`);
        const ours: OursResult[] = [];
        const floor: WarehouseFloorResult[] = [];
        for (let i = 0; i < reps; i++) {
          const o = await runOurs();
          ours.push(o);
          const f = await child<WarehouseFloorResult>('warehouseFloor', { url: loaded.adminUrl, schema: WAREHOUSE_SCHEMA, queries: o.queries });
          floor.push(f);
          log(`${label}: ours ${(o.totalMs / 1000).toFixed(2)} s, floor ${(f.floorMs / 1000).toFixed(2)} s (run ${i + 1} of ${reps})`);
        }
        const agreement = merge([oursCold, ...ours].map((o) => compareNumbers(reference, o.numbers)));
        results.push({ layout, rows: loaded.rows, loadSeconds: loaded.loadSeconds, partitions: loaded.partitions, duckdb, oursCold, ours, floor, agreement });
        await withClient(loaded.adminUrl, (c) => c.query(`DROP SCHEMA ${WAREHOUSE_SCHEMA} CASCADE`));
        if (layout === 'sharded') for (const s of servers.sharded.shards) await withClient(s.url, (c) => c.query(`DROP SCHEMA ${WAREHOUSE_SCHEMA} CASCADE`));
      }
    }
    return { results, postgres };
  } finally {
    await servers.stop();
  }
}

class PeerTimeout extends Error {
  constructor(limitMs: number) {
    super(`did not finish within ${(limitMs / 1000).toFixed(0)} s, ${PEER_LIMIT_TIMES_OURS}× our time or more (stopped)`);
  }
}

function merge(agreements: Agreement[]): Agreement {
  return { checked: agreements.reduce((n, a) => Math.max(n, a.checked), 0), differences: agreements.flatMap((a) => a.differences) };
}

/** Reads the data file once, so every measurement starts with it in the OS page cache. */
async function warmPageCache(path: string): Promise<void> {
  await new Promise<void>((resolve, reject) => {
    const stream = createReadStream(path, { highWaterMark: 4 << 20 });
    stream.on('data', () => undefined);
    stream.on('end', resolve);
    stream.on('error', reject);
  });
}

/** One measurement in a fresh Node process (its own peak memory), through dist/bench/child.js. */
async function child<T>(mode: string, args: unknown, opts: { nodeArgs?: string[]; timeoutMs?: number } = {}): Promise<T> {
  const dir = mkdtempSync(join(tmpdir(), 'threadcount-bench-child-'));
  try {
    const argsFile = join(dir, 'args.json');
    const resultFile = join(dir, 'result.json');
    writeFileSync(argsFile, JSON.stringify(args));
    const script = join(packageRoot(), 'dist', 'bench', 'child.js');
    let timedOut = false;
    const code = await new Promise<number | null>((resolve, reject) => {
      // Run in its own folder, so anything a measurement leaves in its working directory (DuckDB
      // spills to ./.tmp when no temporary folder is set) goes with it.
      const p = spawn(process.execPath, [...(opts.nodeArgs ?? []), script, mode, argsFile, resultFile], { stdio: ['ignore', 'inherit', 'inherit'], cwd: dir });
      const timer = opts.timeoutMs
        ? setTimeout(() => {
            timedOut = true;
            p.kill('SIGKILL');
          }, opts.timeoutMs)
        : undefined;
      p.once('error', reject);
      p.once('exit', (c) => {
        clearTimeout(timer);
        resolve(c);
      });
    });
    if (timedOut) throw new PeerTimeout(opts.timeoutMs!);
    if (code !== 0 || !existsSync(resultFile)) throw new Error(`the ${mode} measurement failed (exit ${code})`);
    return JSON.parse(readFileSync(resultFile, 'utf8')) as T;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

interface Pandas {
  command: string;
  version: string;
  pandas: string;
}

/** The first python3 that imports pandas (a pyenv shim may hide Debian's python3-pandas). */
function findPandas(): Pandas | null {
  for (const command of ['python3', '/usr/bin/python3']) {
    const r = spawnSync(command, ['-c', 'import sys, pandas; print(sys.version.split()[0], pandas.__version__)'], { encoding: 'utf8' });
    if (r.status === 0) {
      const [version, pandas] = r.stdout.trim().split(' ');
      return { command, version: `Python ${version}`, pandas: pandas ?? 'unknown' };
    }
  }
  return null;
}

/** The bookings' columns as CSV for pandas, exported by DuckDB once per data version. */
async function exportCsv(data: BenchData): Promise<{ path: string; exportMs: number | null }> {
  const path = join(data.dir, 'bookings.csv');
  const stampPath = join(data.dir, 'bookings-csv.json');
  const version = generatorVersion(data.rows);
  if (existsSync(path) && existsSync(stampPath) && (JSON.parse(readFileSync(stampPath, 'utf8')) as { version: string }).version === version) {
    return { path, exportMs: null };
  }
  const started = performance.now();
  const instance = await DuckDBInstance.create(data.databasePath, { access_mode: 'READ_ONLY' });
  const connection = await instance.connect();
  try {
    // The path is the benchmark's own cache file, never user input.
    await connection.run(
      `COPY (SELECT sail_date, route, channel, pass_holder, customer_id, fare_total, passengers, refund_amount FROM bookings) TO '${path.replaceAll("'", "''")}' (HEADER)`,
    );
  } finally {
    connection.closeSync();
    instance.closeSync();
  }
  const exportMs = performance.now() - started;
  writeFileSync(stampPath, JSON.stringify({ version, exportMs }));
  return { path, exportMs };
}

function runPandas(python: Pandas, csvPath: string, timeoutMs: number): Omit<PandasResult, 'exportMs'> {
  const dir = mkdtempSync(join(tmpdir(), 'threadcount-bench-pandas-'));
  try {
    const windows = join(dir, 'windows.json');
    const result = join(dir, 'result.json');
    writeFileSync(windows, JSON.stringify(PLAN_WINDOWS));
    const r = spawnSync(python.command, [join(packageRoot(), 'bench', 'peer_pandas.py'), csvPath, windows, result], {
      stdio: ['ignore', 'inherit', 'inherit'],
      timeout: timeoutMs,
      killSignal: 'SIGKILL',
    });
    if (r.signal === 'SIGKILL') throw new PeerTimeout(timeoutMs);
    if (r.status !== 0 || !existsSync(result)) throw new Error(`the pandas peer failed (exit ${r.status})`);
    return JSON.parse(readFileSync(result, 'utf8')) as Omit<PandasResult, 'exportMs'>;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

async function duckdbVersion(): Promise<string> {
  const instance = await DuckDBInstance.create(':memory:');
  const connection = await instance.connect();
  try {
    const reader = await connection.runAndReadAll('SELECT version()');
    return String(reader.getRows()[0]?.[0] ?? 'unknown');
  } finally {
    connection.closeSync();
    instance.closeSync();
  }
}

function packageVersion(name: string): string {
  try {
    return (JSON.parse(readFileSync(join(packageRoot(), 'node_modules', name, 'package.json'), 'utf8')) as { version: string }).version;
  } catch {
    return 'not installed';
  }
}

main().catch((err: unknown) => {
  log(err instanceof Error ? (err.stack ?? err.message) : String(err));
  process.exit(1);
});
