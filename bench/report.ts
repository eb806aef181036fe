// BENCHMARKS.md from one run's measurements: every figure and ratio comes from that run.
import type { Phase } from '../analysis/phase-timings.js';
import type { NamedQuery } from '../analysis/types.js';
import { distinctQueries } from './floor.js';
import { PEER_LIMIT_TIMES_OURS, PEER_MIN_LIMIT_MS } from './limits.js';
import { RELATIVE_TOLERANCE, type Agreement } from './numbers.js';
import type { BenchRun, SizeResult, WarehouseResult } from './run.js';

const TEN_MILLION = 10_000_000;

export function median(xs: number[]): number {
  if (xs.length === 0) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 ? s[mid]! : (s[mid - 1]! + s[mid]!) / 2;
}

/** Nearest-rank percentile. */
export function percentile(xs: number[], p: number): number {
  if (xs.length === 0) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil(p * s.length) - 1))]!;
}

const sec = (ms: number) => (Number.isFinite(ms) ? (ms / 1000).toFixed(ms < 10_000 ? 2 : 1) : 'n/a');
const msText = (ms: number) => (Number.isFinite(ms) ? `${ms.toFixed(ms < 10 ? 1 : 0)}` : 'n/a');
const mb = (kb: number) => (Number.isFinite(kb) ? `${Math.round(kb / 1024)}` : 'n/a');
const ratio = (x: number) => (Number.isFinite(x) ? `${x.toFixed(2)}×` : 'n/a');
/** A ratio judged against `limit`: one more decimal where two would print the limit itself, so "1.25×, not met" cannot happen. */
const ratioAgainst = (x: number, limit: number) => (Number.isFinite(x) && x !== limit && x.toFixed(2) === limit.toFixed(2) ? `${x.toFixed(3)}×` : ratio(x));
const rowsLabel = (n: number) => (n % 1_000_000 === 0 ? `${n / 1_000_000}M` : n % 1000 === 0 ? `${n / 1000}k` : String(n));

interface Summary {
  rows: number;
  total: number;
  totalMin: number;
  totalMax: number;
  phase: Record<Phase, number>;
  sqlSum: number;
  rss: number;
  floor: number;
  floorAll: number;
  floorRss: number;
  groupBy: number;
  /** Floor statements making or reading the rollup, and those reading the table, in ms (medians). */
  sharedScan: number;
  tableScan: number;
  /** CPU time, every thread (median ms): ours from the call to its return, the floor over its statements. Null in results from before it was measured. */
  cpu: number | null;
  floorCpu: number | null;
  /** A bare GROUP BY customer over the per-customer question's window (median ms), when measured. */
  customerGroupBy: number | null;
  statements: number;
  distinct: number;
  charts: number[];
  digest: number[];
  /** The first run on this version of the data: its quality check not cached. */
  cold: { total: number; checks: number; rss: number; processMs: number };
}

function summarise(s: SizeResult): Summary {
  const phase = (p: Phase) => median(s.ours.map((o) => o.phases[p].wallMs));
  return {
    rows: s.rows,
    total: median(s.ours.map((o) => o.totalMs)),
    totalMin: Math.min(...s.ours.map((o) => o.totalMs)),
    totalMax: Math.max(...s.ours.map((o) => o.totalMs)),
    phase: { open: phase('open'), checks: phase('checks'), sql: phase('sql'), read: phase('read'), render: phase('render'), post: phase('post') },
    sqlSum: median(s.ours.map((o) => o.phases.sql.sumMs)),
    rss: Math.max(...s.ours.map((o) => o.maxRssKb)),
    floor: median(s.floor.map((f) => f.floorMs)),
    floorAll: median(s.floor.map((f) => f.allStatementsMs)),
    floorRss: Math.max(...s.floor.map((f) => f.maxRssKb)),
    groupBy: median(s.floor.map((f) => f.groupByMs)),
    sharedScan: median(s.floor.map((f) => f.sharedScanMs ?? 0)),
    tableScan: median(s.floor.map((f) => f.tableScanMs ?? 0)),
    cpu: s.ours.every((o) => typeof o.cpuMs === 'number') ? median(s.ours.map((o) => o.cpuMs)) : null,
    floorCpu: s.floor.every((f) => typeof f.floorCpuMs === 'number') ? median(s.floor.map((f) => f.floorCpuMs)) : null,
    customerGroupBy: s.floor.every((f) => typeof f.customerGroupByMs === 'number') && s.floor.length > 0 ? median(s.floor.map((f) => f.customerGroupByMs!)) : null,
    statements: s.floor[0]?.statements ?? 0,
    distinct: s.floor[0]?.distinct ?? 0,
    charts: [...s.oursCold.chartRenderMs, ...s.ours.flatMap((o) => o.chartRenderMs)],
    digest: [...s.oursCold.digestRenderMs, ...s.ours.flatMap((o) => o.digestRenderMs)],
    cold: { total: s.oursCold.totalMs, checks: s.oursCold.phases.checks.wallMs, rss: s.oursCold.maxRssKb, processMs: s.oursColdProcessMs },
  };
}

const NUMBER_KINDS: Record<string, string> = {
  month: 'monthly revenue and bookings',
  year: 'yearly revenue',
  ytd: 'revenue for each year up to the data\'s last day of the year',
  summer: 'revenue and bookings by route and by channel, summer 2024 against summer 2023',
  freq: 'bookings per customer since the SkerryPass launch by group, with the Welch inputs (n, mean, variance), median, p90 and frequency buckets',
  monthpass: 'bookings by month for pass holders and others',
  launch: 'bookings since the launch by route for pass holders and others',
  fpp: 'fare per passenger by complete month (May 2025 the latest)',
  refshare: 'share of revenue refunded by complete month',
};

/** What the compared numbers cover, from the keys our answers produced. */
function coveredNumbers(run: BenchRun): string {
  const numbers = run.sizes[0]?.ours[0]?.numbers ?? {};
  const counts = new Map<string, number>();
  for (const key of Object.keys(numbers)) {
    const kind = key.split(':')[0]!;
    counts.set(kind, (counts.get(kind) ?? 0) + 1);
  }
  return [...counts].map(([kind, n]) => `${NUMBER_KINDS[kind] ?? kind} (${n})`).join('; ');
}

/** peer ÷ ours; "> n×" for a peer stopped at its time limit; n/a when it did not run. */
function peerRatio(peerMs: number | undefined, stoppedAtMs: number | null, oursMs: number): string {
  if (peerMs !== undefined) return ratio(peerMs / oursMs);
  if (stoppedAtMs !== null) return `> ${ratio(stoppedAtMs / oursMs)} (stopped)`;
  return 'n/a';
}

function agreementText(a: Agreement | null): string {
  if (!a) return 'n/a';
  if (a.differences.length === 0) return `all ${a.checked} agree`;
  return `**${a.differences.length} of ${a.checked} differ**`;
}

export function writeReport(run: BenchRun): string {
  const m = run.machine;
  const sizes = run.sizes.map(summarise);
  const at10 = sizes.find((s) => s.rows === TEN_MILLION);
  const allCharts = sizes.flatMap((s) => s.charts);
  const highLoad = Math.max(m.loadStart[0] ?? 0, m.loadEnd[0] ?? 0) > 2;
  const lines: string[] = [];
  const push = (...xs: string[]) => lines.push(...xs);

  push(
    '# Benchmarks',
    '',
    `Written by \`npm run bench\` on ${run.startedAt.slice(0, 10)} (${run.seconds.toFixed(0)} s in all); every figure below comes from that one run. Regenerate rather than edit.`,
    '',
    '## What is measured',
    '',
    '- **Ours**: the `threadcount ask` path (`cli/ask.ts`) end to end with no network: the demo request as a stakeholder wrote it (`shared/design/demo-scenario.md`), scripted answers (revenue for the summer question, audience managers, plan "go"), the plan run through the bot (SQL, statistics, captions, charts, CSV and SQL files written to a thread folder, the digest). Timed inside a fresh Node process per run, from the call to `ask()` to its return (Node start-up and module loading excluded); phases come from the optional `PhaseTimings` collector, as wall-clock time during which at least one step of the phase ran. The bot runs two sub-questions at a time, so phases overlap and do not add up to the total.',
    "- **First run and warm runs**: the data-quality report is kept per version of the data (`analysis/quality/`: the data file's path, inode, size and modification times; a JSON file beside the conversation state). Each size starts with the cache emptied, so its first run pays for the full check (the duplicate-key count over every booking id) as the first request after a data refresh would; the runs after it find the report kept and skip the check's query. Both are shown; \"ours\" without a qualifier means the warm runs.",
    `- **Floor**: the plan's own SQL statements, exactly as our run bound them, run one after another on one DuckDB connection with the same settings and nothing around them (results read fully), as our engine executes them: the plan's rollup stored once, then each statement (those over the rollup read the stored copy). Repeated statements are run once; the run with the repeats is shown too.`,
    '- **Single GROUP BY**: one scan at the plan\'s finest grain and dimensions (month × route × channel × fare class × pass holder, with counts, sums and sums of squares): the cost of the shared scan that one rollup per plan would need.',
    "- **Bare GROUP BY customer**: the rows of the per-customer question's window grouped by customer with a count each and nothing else: the least any plan answering that question must do, since no rollup by day holds customers.",
    '- **CPU time**: user plus system time of the whole process (every thread, so DuckDB\'s workers too), for ours from the call to `ask()` to its return and for the floor over its statements. With two cores, CPU time ÷ 2 is the least wall time the same work can take.',
    `- **arquero** ${m.arquero}: the eight columns the plan uses loaded from the DuckDB file into JS arrays (dates as epoch milliseconds, amounts as doubles, route and channel dictionary-encoded; timed apart, in a Node process with a 12 GB heap), then arquero computes the same numbers from the rows.`,
    `- **pandas**: ${m.python ?? 'not available'}; \`read_csv\` of the same columns exported by DuckDB to CSV (dates parsed, route and channel as categories; timed apart), then pandas computes the same numbers.`,
    `- A peer is stopped when it takes more than ${PEER_LIMIT_TIMES_OURS}× our time at that size (and at least ${PEER_MIN_LIMIT_MS / 1000} s), so the run stays bounded.`,
    `- Both peers must match every number our answers' tables hold, within ${RELATIVE_TOLERANCE} relative: ${coveredNumbers(run)}. The plan reads "travel more often" as bookings per customer, so its group comparison is on that; it has no average-fare comparison, and the peers compute none.`,
    '',
    '## Machine',
    '',
    `- CPU: ${m.cpuModel}, ${m.cores} cores; memory ${(m.memoryBytes / 2 ** 30).toFixed(1)} GiB.`,
    `- Load average (1, 5, 15 min) at start: ${m.loadStart.map((l) => l.toFixed(2)).join(', ')}; at end: ${m.loadEnd.map((l) => l.toFixed(2)).join(', ')}.${highLoad ? ' **The machine was busy (load above 2): other work shared the cores, so absolute times are inflated; ratios within the run are less affected.**' : ''}`,
    `- Node ${m.node}; DuckDB ${m.duckdb} (\`@duckdb/node-api\`); DuckDB threads ${run.engine.threads ?? `default (${m.cores})`}, memory limit ${run.engine.memoryLimit ?? 'DuckDB\'s default (80% of RAM)'}${run.engine.memoryLimit ? (run.engine.memoryLimitFromConfig ? ' (from the config)' : ' (threadcount\'s default when the config sets none)') : ''}; ${run.engine.jobs} sub-questions at a time.`,
    `- Per size, one first run of ours, then ${run.reps} warm run(s) of ours and of the floor, alternating, each in a fresh process; medians shown (ours: min–max in brackets). Peers run once per size. Peak memory is the process's peak resident set (\`maxRSS\`), the largest over the runs.`,
    '',
    '## Reproduce',
    '',
    `This report: \`${run.command}\`. In general:`,
    '',
    '```',
    'npm run bench                     # 1M, 10M and 30M rows, 3 runs each',
    'npm run bench -- --sizes 1M,10M   # fewer sizes',
    'npm run bench -- --quick          # 1M only, one run: a smoke test',
    'npm run bench -- --report-from .cache/bench/last-run.json   # this report again from the raw results, measuring nothing',
    '```',
    '',
    'The demo data is generated once per size into `.cache/bench/<rows>/` and reused while the generator\'s SQL is unchanged; raw measurements go to `.cache/bench/last-run.json`. pandas is used when `python3` (or `/usr/bin/python3`) imports it; otherwise it is skipped with a note.',
    '',
  );

  for (const [i, s] of sizes.entries()) {
    const r = run.sizes[i]!;
    const a = r.arquero;
    const p = r.pandas;
    push(
      `## ${rowsLabel(s.rows)} rows`,
      '',
      `Data file ${(r.databaseBytes / 2 ** 20).toFixed(0)} MiB${r.generatedSeconds !== null ? `, generated in this run in ${r.generatedSeconds.toFixed(0)} s` : ', reused from the cache'}.`,
      '',
      '| measure | time (s) | peak RSS (MB) |',
      '| --- | ---: | ---: |',
      `| Ours, first run on this data (quality check run in full) | ${sec(s.cold.total)} | ${mb(s.cold.rss)} |`,
      `| · its data-quality check (one query) | ${sec(s.cold.checks)} | |`,
      `| **Ours, end to end** (warm: quality report kept) [${sec(s.totalMin)}–${sec(s.totalMax)}] | **${sec(s.total)}** | **${mb(s.rss)}** |`,
      `| · open the dataset, read its coverage | ${sec(s.phase.open)} | |`,
      `| · data-quality check (read from the cache) | ${sec(s.phase.checks)} | |`,
      `| · SQL of the plan (wall; ${sec(s.sqlSum)} s summed over steps) | ${sec(s.phase.sql)} | |`,
      `| · statistics and captions | ${sec(s.phase.read)} | |`,
      `| · chart rendering (${r.oursCold.chartRenderMs.length} charts and the digest) | ${sec(s.phase.render)} | |`,
      `| · files and posts | ${sec(s.phase.post)} | |`,
      `| Ours as a whole process (Node start-up and loading included) | ${sec(median(r.oursProcessMs))} | |`,
      s.cpu !== null ? `| · CPU time of ours, every thread (user + system), end to end | ${sec(s.cpu)} | |` : '',
      `| **Floor**: the ${s.distinct} statements DuckDB executes for the plan (each distinct one once, the rollup stored once), sequential | **${sec(s.floor)}** | ${mb(s.floorRss)} |`,
      s.floorCpu !== null ? `| · CPU time of the floor, every thread (user + system) | ${sec(s.floorCpu)} | |` : '',
      `| Floor with all ${s.statements} statements as compiled (repeats included) | ${sec(s.floorAll)} | |`,
      `| Single GROUP BY at the finest grain | ${sec(s.groupBy)} | |`,
      s.customerGroupBy !== null ? `| Bare GROUP BY customer over the per-customer question's window (a count each, nothing else) | ${sec(s.customerGroupBy)} | |` : '',
      a ? `| arquero: load into JS arrays + compute | ${sec(a.totalMs)} | ${mb(a.maxRssKb)} |` : `| arquero | ${r.arqueroNote ?? 'n/a'} | |`,
      a ? `| · load / compute | ${sec(a.loadMs)} / ${sec(a.computeMs)} | |` : '',
      p ? `| pandas: read CSV + compute | ${sec(p.totalMs)} | ${mb(p.maxRssKb)} |` : `| pandas | ${r.pandasNote ?? 'n/a'} | |`,
      p ? `| · read / compute${p.exportMs !== null ? ` (CSV export by DuckDB, once: ${sec(p.exportMs)} s)` : ''} | ${sec(p.readMs)} / ${sec(p.computeMs)} | |` : '',
      '',
      `Numbers checked against ours: arquero ${agreementText(r.arqueroAgreement)}; pandas ${agreementText(r.pandasAgreement)}${r.oursAgreement ? `; our runs among themselves ${agreementText(r.oursAgreement)}` : ''}.`,
      '',
    );
    const diffs = [...(r.arqueroAgreement?.differences ?? []).map((d) => ({ ...d, peer: `arquero ${d.peer}` })), ...(r.pandasAgreement?.differences ?? []).map((d) => ({ ...d, peer: `pandas ${d.peer}` }))];
    if (diffs.length > 0) {
      push('First differences:', '', ...diffs.slice(0, 10).map((d) => `- \`${d.key}\`: ours ${d.ours}, ${d.peer}`), '');
    }
  }
  // Drop the empty rows left by missing peers.
  for (let i = lines.length - 1; i >= 0; i--) if (lines[i] === '' && lines[i - 1]?.startsWith('|') && lines[i + 1]?.startsWith('|')) lines.splice(i, 1);

  push('## Ratios', '', `| ratio | ${sizes.map((s) => rowsLabel(s.rows)).join(' | ')} |`, `| --- | ${sizes.map(() => '---:').join(' | ')} |`);
  const row = (name: string, f: (s: Summary, r: SizeResult) => string) => push(`| ${name} | ${sizes.map((s, i) => f(s, run.sizes[i]!)).join(' | ')} |`);
  row('ours ÷ floor', (s) => ratio(s.total / s.floor));
  row('ours first run ÷ floor', (s) => ratio(s.cold.total / s.floor));
  row('ours SQL phase ÷ single GROUP BY', (s) => ratio(s.phase.sql / s.groupBy));
  row('ours SQL phase ÷ floor', (s) => ratio(s.phase.sql / s.floor));
  row('floor ÷ single GROUP BY', (s) => ratio(s.floor / s.groupBy));
  row('floor, shared-scan part (the rollup and the statements over it) ÷ single GROUP BY', (s) => ratio(s.sharedScan / s.groupBy));
  row('floor, table-reading part (per-customer question) ÷ single GROUP BY', (s) => ratio(s.tableScan / s.groupBy));
  row('floor, per-customer question ÷ bare GROUP BY customer', (s) => (s.customerGroupBy !== null ? ratio(s.tableScan / s.customerGroupBy) : 'n/a'));
  row('bare GROUP BY customer ÷ single GROUP BY', (s) => (s.customerGroupBy !== null ? ratio(s.customerGroupBy / s.groupBy) : 'n/a'));
  row('arquero ÷ ours (with its load)', (s, r) => peerRatio(r.arquero?.totalMs, r.arqueroStoppedAtMs, s.total));
  row('arquero compute only ÷ ours', (s, r) => peerRatio(r.arquero?.computeMs, null, s.total));
  row('pandas ÷ ours (with its read)', (s, r) => peerRatio(r.pandas?.totalMs, r.pandasStoppedAtMs, s.total));
  row('pandas compute only ÷ ours', (s, r) => peerRatio(r.pandas?.computeMs, null, s.total));
  row('ours peak RSS (MB)', (s) => mb(s.rss));
  row('ours first run peak RSS (MB)', (s) => mb(s.cold.rss));
  row('ours time per million rows (s)', (s) => (s.total / 1000 / (s.rows / 1e6)).toFixed(2));
  push('');

  // Where the floor's time goes at the largest size.
  const largest = run.sizes.at(-1)!;
  const names = executedNames(distinctQueries(largest.ours[0]!.queries));
  const perStatement = names.map((name, i) => ({ name, ms: median(largest.floor.map((f) => f.perStatementMs[i] ?? NaN)) }));
  push(
    `## The floor statement by statement (${rowsLabel(largest.rows)} rows)`,
    '',
    '| # | query | ms |',
    '| ---: | --- | ---: |',
    ...perStatement.map((q, i) => `| ${i + 1} | ${q.name} | ${msText(q.ms)} |`),
    '',
  );

  const ack = run.ack;
  const chartMedian = median(allCharts);
  push(
    '## Chart rendering',
    '',
    allCharts.length
      ? `Median ${msText(chartMedian)} ms per chart at 1200×675 (p90 ${msText(percentile(allCharts, 0.9))} ms, ${allCharts.length} charts over every run); the digest ${msText(median(sizes.flatMap((s) => s.digest)))} ms. Charts render while the other sub-question's SQL runs, so these include time shared with DuckDB. By size: ${sizes.map((s) => `${rowsLabel(s.rows)} ${msText(median(s.charts))} ms`).join(', ')}.`
      : 'No chart was rendered.',
    '',
    '## Chat side: acknowledgement',
    '',
  );
  if (ack) {
    push(
      `Rounds of ${ack.requests} requests sent at once to \`threadcount serve\` (a child process) on 127.0.0.1 through \`node:http\`, one socket each, after an unmeasured warm-up round, the bot left to finish between rounds: ${ack.rounds} rounds each of the 404 floor and of \`POST /api/threads\` (percentiles over all their requests), then one round reading the bot's replies (${ack.completed} of ${(ack.rounds + 1) * ack.requests} measured requests completed, ${sec(ack.wallMs)} s; server peak RSS ${ack.serverMaxRssKb ? `${mb(ack.serverMaxRssKb)} MB` : 'n/a'}). The client runs on the same two cores as the server.`,
      '',
      '| from the request to | median (ms) | p99 (ms) |',
      '| --- | ---: | ---: |',
      `| the HTTP floor: a 404 for an unknown thread (no message, no bot work) | ${msText(median(ack.notFoundMs))} | ${msText(percentile(ack.notFoundMs, 0.99))} |`,
      `| the API's acknowledgement (201: message recorded, the bot starts on it) | ${msText(median(ack.acceptedMs))} | ${msText(percentile(ack.acceptedMs, 0.99))} |`,
      `| the same, when every sender also opens its thread's event stream | ${msText(median(ack.acceptedWithStreamsMs))} | ${msText(percentile(ack.acceptedWithStreamsMs, 0.99))} |`,
      `| the bot's first reply in the thread ("On it: …", read from the event stream) | ${msText(median(ack.acknowledgedMs))} | ${msText(percentile(ack.acknowledgedMs, 0.99))} |`,
      ...serverSideRows(ack),
      '',
      ...ackReading(ack),
    );
  } else push(`Not measured: ${run.ackError ?? 'unknown error'}.`, '');
  push(...sharedStateSection(ack));
  const warehouse = warehouseSection(run);
  push(...warehouse.lines);

  // Targets, judged on this run.
  // A peer stopped at its limit (a multiple of our time) was slower; one not run at all is not counted.
  const peersSlower = run.sizes.every((r, i) => (!r.arquero || r.arquero.totalMs > sizes[i]!.total) && (!r.pandas || r.pandas.totalMs > sizes[i]!.total));
  const peersRun = run.sizes.some((r) => r.arquero || r.pandas || r.arqueroStoppedAtMs || r.pandasStoppedAtMs);
  const peersSlowerCompute = run.sizes.every((r, i) => (!r.arquero || r.arquero.computeMs > sizes[i]!.total) && (!r.pandas || r.pandas.computeMs > sizes[i]!.total));
  const ackP99 = ack ? percentile(ack.acceptedMs, 0.99) : NaN;
  const verdict = (ok: boolean | null) => (ok === null ? 'not measured' : ok ? 'met' : '**not met**');
  const t10 = <T>(f: (s: Summary) => T): T | null => (at10 ? f(at10) : null);
  push(
    '## Targets',
    '',
    '| target | measured | verdict |',
    '| --- | --- | --- |',
    `| end to end ≤ 1.25× the SQL floor at 10M | ${t10((s) => `${ratioAgainst(s.total / s.floor, 1.25)} (${sec(s.total)} s vs ${sec(s.floor)} s); the first run on new data ${ratio(s.cold.total / s.floor)} (${sec(s.cold.total)} s)${s.cpu !== null && s.floorCpu !== null ? `. Ours used ${sec(s.cpu)} s of CPU against the floor's ${sec(s.floorCpu)} s; on ${run.machine.cores} cores that takes at least ${sec(s.cpu / run.machine.cores)} s (${ratio(s.cpu / run.machine.cores / s.floor)} the floor) even with no waiting, and ours kept the cores ${((s.cpu / run.machine.cores / s.total) * 100).toFixed(0)}% busy` : ''}`) ?? 'no 10M run'} | ${verdict(t10((s) => s.total <= 1.25 * s.floor))}${t10((s) => s.total <= 1.25 * s.floor && s.cold.total > 1.25 * s.floor) ? ' (warm runs; not on the first run)' : ''} |`,
    `| every peer slower than us, at every size | ${run.sizes.map((r, i) => `${rowsLabel(r.rows)}: arquero ${peerRatio(r.arquero?.totalMs, r.arqueroStoppedAtMs, sizes[i]!.total)}, pandas ${peerRatio(r.pandas?.totalMs, r.pandasStoppedAtMs, sizes[i]!.total)}`).join('; ')} (peer ÷ ours, with their load/read) | ${verdict(peersRun ? peersSlower : null)}${peersSlower && !peersSlowerCompute ? ' (not on compute alone)' : ''} |`,
    `| the plan's SQL phase within 1.5× of the single GROUP BY at 10M | ${t10((s) => `${ratioAgainst(s.phase.sql / s.groupBy, 1.5)} (${sec(s.phase.sql)} s vs ${sec(s.groupBy)} s); of the floor, the shared scan (the rollup and every statement over it) is ${ratio(s.sharedScan / s.groupBy)} (${sec(s.sharedScan)} s) and the per-customer question, which groups every customer and no rollup by day can serve, ${ratio(s.tableScan / s.groupBy)} (${sec(s.tableScan)} s)${s.customerGroupBy !== null ? `; grouping the same rows by customer with nothing else computed takes ${ratio(s.customerGroupBy / s.groupBy)} (${sec(s.customerGroupBy)} s)${s.customerGroupBy > 1.5 * s.groupBy ? ', so no plan that answers the per-customer question can come within 1.5× of this reference' : ''}` : ''}`) ?? 'no 10M run'} | ${verdict(t10((s) => s.phase.sql <= 1.5 * s.groupBy))} |`,
    `| peak memory ≤ 500 MB at 10M | ${t10((s) => `${mb(s.rss)} MB warm; ${mb(s.cold.rss)} MB on the first run`) ?? 'no 10M run'} | ${verdict(t10((s) => Math.max(s.rss, s.cold.rss) <= 500 * 1024))}${t10((s) => s.rss <= 500 * 1024 && s.cold.rss > 500 * 1024) ? ' (met by the warm runs only)' : ''} |`,
    `| median chart render ≤ 50 ms | ${allCharts.length ? `${msText(chartMedian)} ms over every run (${sizes.map((s) => `${rowsLabel(s.rows)}: ${msText(median(s.charts))} ms`).join(', ')}), sharing the cores with the SQL running alongside` : 'n/a'} | ${verdict(allCharts.length ? chartMedian <= 50 : null)} |`,
    ...warehouse.targets,
    `| acknowledgement p99 ≤ 100 ms (200 concurrent) | ${ack ? `${msText(ackP99)} ms for the API's 201 (the HTTP floor's p99: ${msText(percentile(ack.notFoundMs, 0.99))} ms)${ack.acceptedServerMs?.length ? `; ${msText(percentile(ack.acceptedServerMs, 0.99))} ms as the server timed it, from accepting the connection` : ''}; the bot's reply ${msText(percentile(ack.acknowledgedMs, 0.99))} ms` : 'n/a'} | ${verdict(ack ? ackP99 <= 100 : null)} |`,
    '',
  );

  push('## Reading the cost curve', '', ...costCurve(sizes, perStatement.find((q) => q.name === 'frequency')), '');
  return `${lines.filter((l, i, all) => !(l === '' && all[i - 1] === '')).join('\n').trimEnd()}\n`;
}

/** A name for each statement the floor runs, as rollup.ts's executedStatements orders them: a shared rollup stored before its first reader. */
function executedNames(queries: NamedQuery[]): string[] {
  const stored = new Set<string>();
  const names: string[] = [];
  for (const q of queries) {
    if (q.scan && !stored.has(q.scan.key)) {
      stored.add(q.scan.key);
      names.push('the rollup, stored once');
    }
    names.push(q.scan ? `${q.name} (over the rollup)` : q.name);
  }
  return names;
}

/**
 * What bounds the acknowledgement here. Under a burst the last requests wait for the server to
 * accept, read and answer all the others on its one event loop, and the client shares the cores,
 * so the 404's p99 is what any answer costs on this machine; the 201's extra is its own work.
 */
/** The server's own time for the same answers (its Server-Timing header), when the run has it. */
function serverSideRows(ack: NonNullable<BenchRun['ack']>): string[] {
  const rows: [string, number[] | undefined][] = [
    ['the 404, as the server timed it (Server-Timing: from accepting the connection to writing the answer)', ack.notFoundServerMs],
    ['the 201, as the server timed it', ack.acceptedServerMs],
  ];
  return rows.filter(([, ms]) => ms && ms.length > 0).map(([label, ms]) => `| ${label} | ${msText(median(ms!))} | ${msText(percentile(ms!, 0.99))} |`);
}

function ackReading(ack: NonNullable<BenchRun['ack']>): string[] {
  const floorP99 = percentile(ack.notFoundMs, 0.99);
  const acceptedP99 = percentile(ack.acceptedMs, 0.99);
  const out = [
    acceptedP99 > floorP99
      ? `The API's 201 at the 99th percentile is ${msText(acceptedP99 - floorP99)} ms above the HTTP floor's (${ratio(acceptedP99 / floorP99)}): reading and checking the body, recording the message, and the bot's work on the first requests (its state store's writes) running while the last ones still wait.`
      : `The API's 201 at the 99th percentile is no slower than the HTTP floor's (${ratio(acceptedP99 / floorP99)}): at this load, reading and checking the body and recording the message cost less than the rounds' own variation.`,
  ];
  const serverP99 = ack.acceptedServerMs?.length ? percentile(ack.acceptedServerMs, 0.99) : null;
  if (serverP99 !== null) {
    out.push(
      `Timed by the server itself, from accepting each connection to writing its 201, the 99th percentile is ${msText(serverP99)} ms. The client's p99 is ${msText(Math.max(0, acceptedP99 - serverP99))} ms higher: connection set-up before the server accepts, and the client's own turn on the shared cores.`,
    );
  }
  if (floorP99 > 100) {
    out.push(`The floor's own p99, ${msText(floorP99)} ms for a 404 that does no work, is above the 100 ms target: with 200 new connections at once and the client on the same two cores, no answer can come sooner on this machine.`);
  }
  return [...out, ''];
}

/** A few sentences computed from the run: fixed and per-row costs, and where the time goes. */
function costCurve(sizes: Summary[], perCustomer: { ms: number } | undefined): string[] {
  if (sizes.length === 0) return [];
  const out: string[] = [];
  const first = sizes[0]!;
  const last = sizes.at(-1)!;
  if (sizes.length > 1) {
    const perMillion = (last.total - first.total) / ((last.rows - first.rows) / 1e6);
    const floorPerMillion = (last.floor - first.floor) / ((last.rows - first.rows) / 1e6);
    out.push(
      `- From ${rowsLabel(first.rows)} to ${rowsLabel(last.rows)} rows (${(last.rows / first.rows).toFixed(0)}× the data) ours goes from ${sec(first.total)} s to ${sec(last.total)} s (${(last.total / first.total).toFixed(1)}×): about ${sec(perMillion)} s per extra million rows, against ${sec(floorPerMillion)} s for the floor. The steps that do not depend on the data's size stay small: rendering ${sec(first.phase.render)}–${sec(last.phase.render)} s (any growth with size comes from sharing the two cores with the SQL running alongside), statistics and captions ${sec(first.phase.read)}–${sec(last.phase.read)} s, files ${sec(first.phase.post)}–${sec(last.phase.post)} s, opening ${sec(first.phase.open)}–${sec(last.phase.open)} s. So at ${rowsLabel(first.rows)} the fixed costs weigh most (ours ${ratio(first.total / first.floor)} the floor), and from ${rowsLabel(sizes[1]!.rows)} on the cost is the SQL's.`,
    );
  }
  for (const s of sizes) {
    const sqlShare = (s.phase.sql + s.phase.checks) / s.total;
    out.push(
      `- At ${rowsLabel(s.rows)}: SQL (the plan's queries plus the data-quality check) is ${(sqlShare * 100).toFixed(0)}% of the wall time, and the plan's SQL phase is ${ratio(s.phase.sql / s.floor)} the floor. The data-quality check, which runs before the plan's queries and which the floor does not include, takes ${sec(s.cold.checks)} s on the first run on new data (${ratio(s.cold.total / s.floor)} the floor in all) and ${sec(s.phase.checks)} s once its report is kept. The floor is ${ratio(s.floor / s.groupBy)} the single GROUP BY.`,
    );
  }
  if (perCustomer) {
    out.push(
      `- At ${rowsLabel(last.rows)} the one query a rollup cannot serve, bookings per customer (grouped by customer), takes ${sec(perCustomer.ms)} s, ${((perCustomer.ms / last.floor) * 100).toFixed(0)}% of the floor; the single GROUP BY takes ${sec(last.groupBy)} s. Peak memory follows the two high-cardinality groupings: per customer here and per booking id in the data-quality check's duplicate-key count.`,
    );
  }
  out.push(
    "- The plan's additive sub-questions read one rollup of the table (stored once, then read by each of them); the per-customer question still reads every row, and a run starts it first so the rollup readers run beside it. The data-quality check's duplicate-key count groups every booking id; its report is kept per version of the data, so only the first request after the data changes pays for it (the first run above).",
  );
  return out;
}

/** Team deployment: one replica with its state in PostgreSQL, under the same 200 requests at once. */
function sharedStateSection(ack: BenchRun['ack']): string[] {
  const out = ['## Chat side: state in PostgreSQL (team deployment)', ''];
  const shared = ack?.shared;
  if (!shared) {
    out.push(ack?.sharedError ? `Not measured: ${ack.sharedError}.` : 'Not measured: no PostgreSQL URL was given (THREADCOUNT_BENCH_PG_URL or THREADCOUNT_TEST_PG_URL).', '');
    return out;
  }
  out.push(
    `One \`threadcount serve\` replica with \`conversation.state\` in PostgreSQL (threads, post keys, audit log, the local channel's thread log and the run queue), sent ${shared.requests} requests at once through the local channel API after an unmeasured warm-up round; each sender read its thread's event stream until the bot's first message. ${shared.completed} of ${shared.requests} answered within the time limit. Replica peak RSS ${shared.serverMaxRssKb ? `${mb(shared.serverMaxRssKb)} MB` : 'n/a'}; PostgreSQL ran on the same two cores.`,
    '',
    '| from the request to | median (ms) | p99 (ms) |',
    '| --- | ---: | ---: |',
    `| the API's acknowledgement (201: message written to PostgreSQL) | ${msText(median(shared.acceptedMs))} | ${msText(percentile(shared.acceptedMs, 0.99))} |`,
    `| the bot's first reply in the thread (read from the event stream) | ${msText(median(shared.acknowledgedMs))} | ${msText(percentile(shared.acknowledgedMs, 0.99))} |`,
    '',
  );
  return out;
}

interface WarehouseSummary {
  w: WarehouseResult;
  total: number;
  /** DuckDB's median on the same data, in the same run. */
  duckdb: number | null;
  totalMin: number;
  totalMax: number;
  phase: Record<Phase, number>;
  floor: number;
  rss: number;
  /** Per distinct statement of the plan (from the first floor run): rows returned, rows the shards sent, aggregated or not. */
  returned: number;
  fromShards: number;
  fromAggregatedScans: number;
  fromRowScans: number;
  rowStatements: string[];
  scans: number;
  aggregatedScans: number;
}

function summariseWarehouse(w: WarehouseResult): WarehouseSummary {
  const phase = (p: Phase) => median(w.ours.map((o) => o.phases[p].wallMs));
  const statements = w.floor[0]?.perStatement ?? [];
  const rowScans = statements.filter((st) => st.foreignScans > st.aggregatedScans);
  return {
    w,
    total: median(w.ours.map((o) => o.totalMs)),
    duckdb: w.duckdb?.length ? median(w.duckdb.map((o) => o.totalMs)) : null,
    totalMin: Math.min(...w.ours.map((o) => o.totalMs)),
    totalMax: Math.max(...w.ours.map((o) => o.totalMs)),
    phase: { open: phase('open'), checks: phase('checks'), sql: phase('sql'), read: phase('read'), render: phase('render'), post: phase('post') },
    floor: median(w.floor.map((f) => f.floorMs)),
    rss: Math.max(...w.ours.map((o) => o.maxRssKb)),
    returned: statements.reduce((n, st) => n + st.rowsReturned, 0),
    fromShards: statements.reduce((n, st) => n + st.rowsFromShards, 0),
    fromAggregatedScans: statements.filter((st) => st.foreignScans === st.aggregatedScans).reduce((n, st) => n + st.rowsFromShards, 0),
    fromRowScans: rowScans.reduce((n, st) => n + st.rowsFromShards, 0),
    rowStatements: [...new Set(rowScans.map((st) => st.name))],
    scans: statements.reduce((n, st) => n + st.foreignScans, 0),
    aggregatedScans: statements.reduce((n, st) => n + st.aggregatedScans, 0),
  };
}

const count = (n: number) => n.toLocaleString('en');

/** The warehouse path: PostgreSQL plain and sharded, with its own floor and the rows moved. */
function warehouseSection(run: BenchRun): { lines: string[]; targets: string[] } {
  const out = ['## Warehouse: PostgreSQL, plain and sharded', ''];
  const results = run.warehouse ?? [];
  if (results.length === 0) {
    out.push(run.warehouseError ? `Not measured: ${run.warehouseError}.` : 'Not measured in this run (`--warehouse-sizes none`, or a run from before it was measured).', '');
    return { lines: out, targets: [] };
  }
  const all = results.map(summariseWarehouse);
  const col = (w: WarehouseResult) => `${rowsLabel(w.rows)} ${w.layout}`;
  const sharded = results.find((w) => w.layout === 'sharded');
  out.push(
    `The same request, answers and charts, with the dataset in PostgreSQL ${run.postgres ?? ''} on throwaway servers started by \`.ci/postgres.sh\` on this machine (so every server shares its ${run.machine.cores} cores with our process and with the others: this measures what the warehouse path costs, not how it scales out):`,
    '',
    '- **plain**: one server, `bookings` one table with a BRIN index on `sail_date` (the rows arrive in date order, so each window reads only its blocks).',
    `- **sharded**: a coordinator whose \`bookings\` is range-partitioned on \`sail_date\`, one partition per year, each a postgres_fdw foreign table on one of two shard servers${sharded ? ` (${sharded.partitions.map((p) => `${p.name} on ${p.server}`).join(', ')})` : ''}; threadcount turns on partition-wise aggregation, so each day-level GROUP BY runs on the shard holding the partition. The dataset names \`booked_at\` as its freshness column (indexed on each shard): the coordinator has no write counters for foreign partitions, and the column's maximum is how a run tells the data has not changed.`,
    '- **First run**: nothing kept for this data yet: the coverage and the quality checks run (the repeated-key count in full), as on the first request after a load. **Warm runs**: the version check finds both kept.',
    "- **Floor**: the plan's statements exactly as our warm run bound them (each with its day-level rollup as a CTE, as shown in the thread), each distinct one once, one after another on one connection with the same settings, results read fully. Then each once more under `EXPLAIN (ANALYZE, VERBOSE)`, to count the rows each shard sent the coordinator and whether that foreign scan was an aggregate computed on the shard (its remote SQL holds the GROUP BY).",
    `- Per layout and size: one first run, then ${run.reps} warm run(s) of ours and of the floor, alternating, each in a fresh process; medians (ours: min–max in brackets). **The machine is shared and was noisy** (load ${run.machine.loadStart[0]?.toFixed(1)} at the start, ${run.machine.loadEnd[0]?.toFixed(1)} at the end): the absolute times move from run to run, the ratios, taken within this one run, less so.`,
    '',
    `| measure | ${results.map(col).join(' | ')} |`,
    `| --- | ${results.map(() => '---:').join(' | ')} |`,
    `| load into the layout (s) | ${results.map((w) => sec(w.loadSeconds * 1000)).join(' | ')} |`,
    `| ours, first run on this data (s) | ${results.map((w) => sec(w.oursCold.totalMs)).join(' | ')} |`,
    `| · its open (coverage) + quality check (s) | ${results.map((w) => `${sec(w.oursCold.phases.open.wallMs)} + ${sec(w.oursCold.phases.checks.wallMs)}`).join(' | ')} |`,
    `| **ours, end to end** (warm) (s) | ${all.map((a) => `**${sec(a.total)}** [${sec(a.totalMin)}–${sec(a.totalMax)}]`).join(' | ')} |`,
    `| the same request on DuckDB, same data, this run (s) | ${all.map((a) => (a.duckdb !== null ? sec(a.duckdb) : 'n/a')).join(' | ')} |`,
    `| ours on this layout ÷ DuckDB | ${all.map((a) => (a.duckdb !== null ? ratio(a.total / a.duckdb) : 'n/a')).join(' | ')} |`,
    `| · open: version check, coverage kept (s) | ${all.map((a) => sec(a.phase.open)).join(' | ')} |`,
    `| · quality: version check, report kept (s) | ${all.map((a) => sec(a.phase.checks)).join(' | ')} |`,
    `| · SQL of the plan (wall, s) | ${all.map((a) => sec(a.phase.sql)).join(' | ')} |`,
    `| · statistics, captions, charts, files (wall, s) | ${all.map((a) => `${sec(a.phase.read)}, ${sec(a.phase.render)}, ${sec(a.phase.post)}`).join(' | ')} |`,
    `| **floor**: the plan's ${all[0]!.w.floor[0]?.distinct ?? 'n/a'} distinct statements on that engine, sequential (s) | ${all.map((a) => `**${sec(a.floor)}**`).join(' | ')} |`,
    `| **ours ÷ floor** | ${all.map((a) => `**${ratioAgainst(a.total / a.floor, 1.5)}**`).join(' | ')} |`,
    `| ours first run ÷ floor | ${all.map((a) => ratio(a.w.oursCold.totalMs / a.floor)).join(' | ')} |`,
    `| rows the plan's statements returned to threadcount | ${all.map((a) => count(a.returned)).join(' | ')} |`,
    `| rows the shards sent the coordinator | ${all.map((a) => (a.w.layout === 'sharded' ? count(a.fromShards) : '—')).join(' | ')} |`,
    `| · from foreign scans aggregated on the shard (${all.filter((a) => a.w.layout === 'sharded').map((a) => `${a.aggregatedScans} of ${a.scans} scans`).join('; ')}) | ${all.map((a) => (a.w.layout === 'sharded' ? count(a.fromAggregatedScans) : '—')).join(' | ')} |`,
    `| · from scans sending rows (${[...new Set(all.flatMap((a) => a.rowStatements))].join(', ') || 'none'}) | ${all.map((a) => (a.w.layout === 'sharded' ? count(a.fromRowScans) : '—')).join(' | ')} |`,
    `| ours peak RSS (MB) | ${all.map((a) => mb(a.rss)).join(' | ')} |`,
    `| numbers against DuckDB's answers on the same data | ${results.map((w) => agreementText(w.agreement)).join(' | ')} |`,
    '',
  );
  const largest = all.filter((a) => a.w.layout === 'sharded').at(-1);
  if (largest) {
    const statements = largest.w.floor[0]?.perStatement ?? [];
    out.push(
      `Statement by statement, ${rowsLabel(largest.w.rows)} sharded (floor, median ms over its runs; rows from the first):`,
      '',
      '| # | query | ms | rows to threadcount | rows from the shards | scans aggregated on the shard |',
      '| ---: | --- | ---: | ---: | ---: | ---: |',
      ...statements.map((st, i) => `| ${i + 1} | ${st.name} | ${msText(median(largest.w.floor.map((f) => f.perStatement[i]?.ms ?? NaN)))} | ${count(st.rowsReturned)} | ${count(st.rowsFromShards)} | ${st.aggregatedScans} of ${st.foreignScans} |`),
      '',
    );
  }
  const within = all.every((a) => a.total <= 1.5 * a.floor);
  const rowScans = all.filter((a) => a.w.layout === 'sharded' && a.fromRowScans > 0);
  const targets = [
    `| warehouse: end to end ≤ 1.5× the engine's own floor (warm) | ${all.map((a) => `${col(a.w)} ${ratioAgainst(a.total / a.floor, 1.5)} (${sec(a.total)} s vs ${sec(a.floor)} s)`).join('; ')}; first runs ${all.map((a) => `${col(a.w)} ${ratio(a.w.oursCold.totalMs / a.floor)}`).join(', ')} | ${within ? 'met' : '**not met**'} |`,
    `| warehouse: the shards send only the aggregated rows the answers need | ${all
      .filter((a) => a.w.layout === 'sharded')
      .map((a) => `${rowsLabel(a.w.rows)}: ${a.aggregatedScans} of ${a.scans} foreign scans aggregated on the shard, ${count(a.fromAggregatedScans)} day-level rows; ${a.fromRowScans > 0 ? `${count(a.fromRowScans)} rows from ${a.rowStatements.join(', ')}, which groups by customer, a key no time partition holds whole` : 'no scan sent rows'}`)
      .join('; ')} | ${rowScans.length === 0 ? 'met' : '**met for every day-level statement; not for the per-customer question**'} |`,
  ];
  return { lines: out, targets };
}
