/**
 * lowerProcessPriority (lib/worker/cpu-priority.ts) lowers every thread of the process, not only the
 * calling one. Read back from Linux itself: field 19 of /proc/<pid>/task/<tid>/stat is the nice
 * value (proc(5), /proc/pid/stat); /proc/<pid>/autogroup ends with the session group's nice value
 * (sched(7), "The autogroup feature"). A child process starts a worker thread, then lowers its priority.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { describe, expect, it } from 'vitest';

const child = `
const { Worker } = require('node:worker_threads');
const fs = require('node:fs');
const w = new Worker('setInterval(() => {}, 1000)', { eval: true });
w.on('online', async () => {
  const { lowerProcessPriority } = await import(process.argv[1]);
  lowerProcessPriority(12);
  const nices = fs.readdirSync('/proc/self/task').map((tid) => {
    const stat = fs.readFileSync('/proc/self/task/' + tid + '/stat', 'utf8');
    return Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[16]); // field 19 counted from 1
  });
  const group = fs.existsSync('/proc/self/autogroup') ? fs.readFileSync('/proc/self/autogroup', 'utf8').trim() : null;
  process.stdout.write(JSON.stringify({ nices, group }));
  process.exit(0);
});
`;

const modulePath = new URL('../../lib/worker/cpu-priority.ts', import.meta.url).pathname;

describe.runIf(process.platform === 'linux')('lowerProcessPriority', () => {
  it('every thread of the process runs at the lowered nice value, threads started before it included', () => {
    const out = execFileSync(process.execPath, ['--import', 'tsx', '-e', child, modulePath], { encoding: 'utf8' });
    const { nices, group } = JSON.parse(out) as { nices: number[]; group: string | null };
    expect(nices.length, 'Node runs several threads (V8 helpers, libuv, the worker)').toBeGreaterThan(3);
    expect(new Set(nices)).toEqual(new Set([12]));
    // not a session leader: the session's group (shared with this test runner) is left alone
    if (group) expect(group).not.toMatch(/ nice 12$/);
  });

  it.runIf(existsSync('/proc/self/autogroup') && existsSync('/usr/bin/setsid'))(
    'a process leading its own session lowers its session group too',
    () => {
      const run = spawnSync('/usr/bin/setsid', ['--wait', process.execPath, '--import', 'tsx', '-e', child, modulePath], {
        encoding: 'utf8',
      });
      expect(run.status, run.stderr).toBe(0);
      const { nices, group } = JSON.parse(run.stdout) as { nices: number[]; group: string };
      expect(new Set(nices)).toEqual(new Set([12]));
      expect(group).toMatch(/ nice 12$/);
    },
  );
});
