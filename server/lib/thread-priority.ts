import { readlinkSync } from 'node:fs';
import { setPriority } from 'node:os';

/** The kernel's id of the calling thread (Linux: /proc/thread-self is "<pid>/task/<tid>"). */
export function currentThreadId(): number {
  return Number(readlinkSync('/proc/thread-self').split('/').pop());
}

/**
 * Raises the nice value of the calling thread alone to `nice` (0–19), so the thread only gets the CPU time the
 * server's event loop and the database leave over. On Linux the nice value belongs to each thread and
 * `setpriority(PRIO_PROCESS, tid)` sets it for that thread only; threads it starts afterwards inherit it
 * (the run's helper threads). An unprivileged process may raise it but never lower it again. Returns
 * whether it was applied: not with `nice` 0, not on other systems, not where /proc is missing.
 */
export function lowerThreadPriority(nice: number): boolean {
  if (!(nice > 0) || process.platform !== 'linux') return false;
  try {
    setPriority(currentThreadId(), Math.min(19, Math.round(nice)));
    return true;
  } catch {
    return false;
  }
}
