// A small pool of node:worker_threads that run the kernels of kernels.ts over voxel ranges of
// SharedArrayBuffer-backed arrays (no copies of voxel-sized data). The worker source is built from
// the kernels' own source text, so it needs no loader for TypeScript and runs the same code as the
// main thread. Work is always cut into the same PARTITIONS voxel ranges whatever the thread count
// (partial sums are added in range order), so results are bit-identical on 1, 2 … 16 threads and
// when workers cannot start and the ranges run on the calling thread.
import { Worker } from 'node:worker_threads';
import { availableParallelism } from 'node:os';
import { gramChunk, icaChunk, projectChunk, unmixChunk } from './kernels';
import { DecompositionError } from './errors';

const KERNELS = { gramChunk, icaChunk, projectChunk, unmixChunk } as const;
export type KernelName = keyof typeof KERNELS;

function workerSource(): string {
  const defs = Object.entries(KERNELS)
    .map(([name, fn]) => `const ${name} = (${fn.toString()});`)
    .join('\n');
  return `
const { parentPort } = require('node:worker_threads');
${defs}
const K = { ${Object.keys(KERNELS).join(', ')} };
parentPort.on('message', (msg) => {
  try {
    K[msg.op](...msg.args);
    parentPort.postMessage({ id: msg.id, ok: true });
  } catch (err) {
    parentPort.postMessage({ id: msg.id, ok: false, message: String(err && err.message || err) });
  }
});`;
}

/** A Float32Array backed by a SharedArrayBuffer (so worker threads see it without copying). */
export function sharedFloat32(length: number): Float32Array {
  return new Float32Array(new SharedArrayBuffer(length * 4));
}

/** A Float64Array backed by a SharedArrayBuffer. */
export function sharedFloat64(length: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(length * 8));
}

/** Splits [0, n) into `parts` contiguous ranges (multiples of 256 except the last). */
export function splitRange(n: number, parts: number): Array<[number, number]> {
  const p = Math.max(1, Math.min(parts, Math.ceil(n / 256)));
  const step = Math.ceil(n / p / 256) * 256;
  const out: Array<[number, number]> = [];
  for (let s = 0; s < n; s += step) out.push([s, Math.min(n, s + step)]);
  return out;
}

/** Number of voxel ranges every parallel kernel call is cut into (independent of thread count). */
export const PARTITIONS = 16;

export class KernelPool {
  readonly threads: number;
  private workers: Worker[] = [];
  private nextId = 1;
  private pending = new Map<number, { resolve: () => void; reject: (e: Error) => void }>();

  /** threads: number of partitions/workers; default = available cores. 1 = run on this thread. */
  constructor(threads?: number) {
    const n = Math.max(1, Math.floor(threads ?? availableParallelism()));
    this.threads = n;
    if (n > 1) {
      try {
        const src = workerSource();
        for (let i = 0; i < n; i++) {
          const w = new Worker(src, { eval: true });
          w.on('message', (m: { id: number; ok: boolean; message?: string }) => {
            const p = this.pending.get(m.id);
            if (!p) return;
            this.pending.delete(m.id);
            if (m.ok) p.resolve();
            else p.reject(new DecompositionError('worker_failed', `A decomposition worker failed: ${m.message}`));
          });
          w.on('error', (err) => {
            for (const p of this.pending.values()) p.reject(new DecompositionError('worker_failed', `A decomposition worker crashed: ${err.message}`));
            this.pending.clear();
          });
          w.unref();
          this.workers.push(w);
        }
      } catch {
        void this.close();
        this.workers = [];
      }
    }
  }

  /** The fixed voxel ranges of [0, n) that kernels run over (see PARTITIONS). */
  partition(n: number): Array<[number, number]> {
    return splitRange(n, PARTITIONS);
  }

  /** True when work runs on worker threads (false: on the calling thread). */
  get parallel(): boolean {
    return this.workers.length > 0;
  }

  /**
   * Runs kernel `op` once per partition; argsFor(range, index) gives its arguments. Typed arrays
   * in the arguments must be SharedArrayBuffer-backed when they are outputs.
   */
  async run(op: KernelName, parts: Array<[number, number]>, argsFor: (range: [number, number], index: number) => unknown[]): Promise<void> {
    if (this.workers.length === 0) {
      const fn = KERNELS[op] as (...a: unknown[]) => void;
      parts.forEach((r, i) => fn(...argsFor(r, i)));
      return;
    }
    // Workers are unref'd between runs (an idle pool never keeps the process alive) and ref'd
    // while a run is pending.
    for (const w of this.workers) w.ref();
    try {
      await Promise.all(
      parts.map(
        (r, i) =>
          new Promise<void>((resolve, reject) => {
            const id = this.nextId++;
            this.pending.set(id, { resolve, reject });
            this.workers[i % this.workers.length]!.postMessage({ id, op, args: argsFor(r, i) });
          }),
      ),
      );
    } finally {
      for (const w of this.workers) w.unref();
    }
  }

  async close(): Promise<void> {
    const ws = this.workers;
    this.workers = [];
    await Promise.all(ws.map((w) => w.terminate()));
  }
}
