/**
 * Lowers the CPU priority (nice value, 0–19) of this whole process. On Linux the nice value belongs
 * to each thread (setpriority(2), "NOTES": a per-thread attribute), so lowering only the calling
 * thread leaves the threads Node started before it — V8's garbage-collector and compiler helpers,
 * libuv's pool, a loader's worker — at normal priority. Each thread under /proc/self/task is
 * lowered; threads started later inherit the value of the thread that starts them.
 * Returns how many threads were lowered.
 */
import { readdirSync } from 'node:fs';
import os from 'node:os';

export function lowerProcessPriority(nice: number): number {
  const value = Math.max(0, Math.min(19, Math.round(nice)));
  os.setPriority(value);
  if (process.platform !== 'linux') return 1;
  let lowered = 0;
  for (const tid of readdirSync('/proc/self/task')) {
    try {
      os.setPriority(Number(tid), value);
      lowered++;
    } catch {
      // the thread ended meanwhile
    }
  }
  return lowered;
}
