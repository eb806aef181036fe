// Watching and stopping a server started as a child process (the benchmark's replicas and the
// deployment tests' ones).
import type { ChildProcess } from 'node:child_process';
import { readFileSync } from 'node:fs';

/** The process's peak resident set (VmHWM) in KiB, from /proc; null once it has gone or off Linux. */
export function peakRssKb(pid: number | undefined): number | null {
  if (pid === undefined) return null;
  try {
    const m = /^VmHWM:\s+(\d+) kB$/m.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
    return m ? Number(m[1]) : null;
  } catch {
    return null;
  }
}

/** SIGTERM, then SIGKILL if it has not exited within `graceMs`; resolves once it has exited. */
export async function stopChild(child: ChildProcess, graceMs = 10_000): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
  child.kill('SIGTERM');
  const timer = setTimeout(() => child.kill('SIGKILL'), graceMs);
  await exited;
  clearTimeout(timer);
}
