/**
 * Lowers the CPU priority (nice value, 0–19) of this whole process.
 *
 * - On Linux the nice value belongs to each thread (setpriority(2), "NOTES": a per-thread
 *   attribute), so lowering only the calling thread leaves the threads Node started before it —
 *   V8's garbage-collector and compiler helpers, libuv's pool, a loader's worker — at normal
 *   priority. Each thread under /proc/self/task is lowered; threads started later inherit the value
 *   of the thread that starts them.
 * - With the kernel's automatic session groups (sched(7), "The autogroup feature"), nice values
 *   count only against processes of the same session: a worker started as its own service (its own
 *   session) would compete with the web app as an equal whatever its nice value. When this process
 *   leads its own session, its group's nice value is lowered too (/proc/self/autogroup). When it does
 *   not (started from a shell beside other programs), the group is left alone: it may hold the web app.
 *
 * Returns how many threads were lowered and whether the session group was.
 */
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';

export function lowerProcessPriority(nice: number): { threads: number; sessionGroup: boolean } {
  const value = Math.max(0, Math.min(19, Math.round(nice)));
  os.setPriority(value);
  if (process.platform !== 'linux') return { threads: 1, sessionGroup: false };
  let threads = 0;
  for (const tid of readdirSync('/proc/self/task')) {
    try {
      os.setPriority(Number(tid), value);
      threads++;
    } catch {
      // the thread ended meanwhile
    }
  }
  return { threads, sessionGroup: leadsOwnSession() && lowerSessionGroup(value) };
}

/** Field 6 of /proc/self/stat is the session id (proc(5)); a session leader's id is its pid. */
function leadsOwnSession(): boolean {
  const stat = readFileSync('/proc/self/stat', 'utf8');
  const session = Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[3]);
  return session === process.pid;
}

function lowerSessionGroup(value: number): boolean {
  if (!existsSync('/proc/self/autogroup')) return false;
  try {
    writeFileSync('/proc/self/autogroup', String(value));
    return true;
  } catch {
    return false; // no automatic session groups in this kernel, or not allowed
  }
}
