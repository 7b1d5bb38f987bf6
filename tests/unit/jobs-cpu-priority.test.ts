/**
 * lowerProcessPriority (lib/jobs/cpu-priority.ts) lowers every thread of the process, not only the
 * calling one. Read back from Linux itself: field 19 of /proc/<pid>/task/<tid>/stat is the nice
 * value (proc(5), /proc/pid/stat). A child process starts a worker thread, then lowers its priority.
 */
import { execFileSync } from 'node:child_process';
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
  process.stdout.write(JSON.stringify(nices));
  process.exit(0);
});
`;

describe.runIf(process.platform === 'linux')('lowerProcessPriority', () => {
  it('every thread of the process runs at the lowered nice value, threads started before it included', () => {
    const out = execFileSync(process.execPath, ['--import', 'tsx', '-e', child, new URL('../../lib/jobs/cpu-priority.ts', import.meta.url).pathname], { encoding: 'utf8' });
    const nices = JSON.parse(out) as number[];
    expect(nices.length, 'Node runs several threads (V8 helpers, libuv, the worker)').toBeGreaterThan(3);
    expect(new Set(nices)).toEqual(new Set([12]));
  });
});
