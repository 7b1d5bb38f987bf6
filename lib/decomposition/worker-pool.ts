// A small pool of node:worker_threads that run the decomposition's kernels over voxel ranges of
// SharedArrayBuffer-backed arrays (no copies of voxel-sized data between threads). Two kernel sets
// with the same signatures: 'wasm' (WebAssembly SIMD, wasm/kernels.wasm via wasm-kernels.ts; the
// default) and 'js' (the typed-array reference loops of kernels.ts). The worker source is built from
// the kernels' own source text, so it needs no loader for TypeScript and runs the same code as the
// main thread. Work is always cut into the same PARTITIONS voxel ranges whatever the thread count
// (partial sums are added in range order), so results are bit-identical on 1, 2 … 16 threads and
// when workers cannot start and the ranges run on the calling thread.
import { readFileSync } from 'node:fs';
import { setFlagsFromString } from 'node:v8';
import { Worker } from 'node:worker_threads';
import { availableParallelism } from 'node:os';
import { gramChunk, icaChunk, projectChunk, unmixChunk } from './kernels';
import { wasmCache, wasmGramChunk, wasmIcaChunk, wasmMemory, wasmProjectChunk, wasmUnmixChunk, type KernelExports } from './wasm-kernels';
import { DecompositionError } from './errors';

const KERNELS = { gramChunk, icaChunk, projectChunk, unmixChunk } as const;
export type KernelName = keyof typeof KERNELS;
const WASM_KERNELS: Record<KernelName, (ex: KernelExports, ...a: never[]) => void> = {
  gramChunk: wasmGramChunk,
  icaChunk: wasmIcaChunk,
  projectChunk: wasmProjectChunk,
  unmixChunk: wasmUnmixChunk,
};

/** Kernel set: 'wasm' = WebAssembly SIMD (default), 'js' = the reference loops of kernels.ts. */
export type KernelBackend = 'wasm' | 'js';

let wasmModule: WebAssembly.Module | null | undefined;
/** The compiled kernels.wasm (once per process); null when it cannot be read or compiled. */
export function kernelModule(): WebAssembly.Module | null {
  if (wasmModule === undefined) {
    wasmModule = null;
    try {
      const bytes = readFileSync(new URL('./wasm/kernels.wasm', import.meta.url));
      try {
        wasmModule = new WebAssembly.Module(bytes);
      } catch {
        // Node 20's V8 has relaxed SIMD (fused multiply-add) behind a flag; Node ≥ 22 ships it.
        setFlagsFromString('--experimental-wasm-relaxed-simd');
        wasmModule = new WebAssembly.Module(bytes);
      }
    } catch {
      wasmModule = null;
    }
  }
  return wasmModule;
}

/** A fresh instance of kernels.wasm (its own memory), for this thread. */
export function kernelInstance(): KernelExports {
  const m = kernelModule();
  if (!m)
    throw new DecompositionError(
      'worker_failed',
      'The WebAssembly kernels (lib/decomposition/wasm/kernels.wasm) are missing; run npm run build:kernels.',
    );
  return new WebAssembly.Instance(m, {}).exports as unknown as KernelExports;
}

/**
 * The kernel set a new KernelPool uses by default: QUORUM_KERNELS=js|wasm when set, else 'wasm'
 * when kernels.wasm loads, else 'js' (with a process warning, once).
 */
export function kernelBackend(): KernelBackend {
  const env = process.env.QUORUM_KERNELS;
  if (env === 'js') return 'js';
  if (env !== undefined && env !== '' && env !== 'wasm') {
    throw new DecompositionError('bad_option', `QUORUM_KERNELS must be "wasm" or "js"; got "${env}".`);
  }
  if (kernelModule()) return 'wasm';
  if (!warnedNoWasm) {
    warnedNoWasm = true;
    process.emitWarning(
      'lib/decomposition/wasm/kernels.wasm could not be loaded; the decomposition runs the slower JavaScript kernels (run npm run build:kernels).',
    );
  }
  return 'js';
}
let warnedNoWasm = false;

function workerSource(backend: KernelBackend): string {
  const set: Record<string, (...args: never[]) => unknown> =
    backend === 'wasm' ? { ...WASM_KERNELS, wasmMemory, wasmCache } : { ...KERNELS };
  const defs = Object.entries(set)
    .map(([name, fn]) => `const ${name} = (${fn.toString()});`)
    .join('\n');
  return `
const { parentPort, workerData } = require('node:worker_threads');
${defs}
const K = { ${Object.keys(KERNELS).join(', ')} };
const EX = workerData && workerData.module ? new WebAssembly.Instance(workerData.module, {}).exports : null;
parentPort.on('message', (msg) => {
  try {
    if (EX) K[msg.op](EX, ...msg.args);
    else K[msg.op](...msg.args);
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

  readonly backend: KernelBackend;
  private local: KernelExports | null = null;

  /**
   * threads: number of workers; default = available cores. 1 = run on this thread.
   * kernels: kernel set (default kernelBackend()).
   */
  constructor(threads?: number, opts: { kernels?: KernelBackend } = {}) {
    const n = Math.max(1, Math.floor(threads ?? availableParallelism()));
    this.threads = n;
    this.backend = opts.kernels ?? kernelBackend();
    if (this.backend === 'wasm' && !kernelModule()) {
      throw new DecompositionError(
        'worker_failed',
        'The WebAssembly kernels (lib/decomposition/wasm/kernels.wasm) are missing; run npm run build:kernels.',
      );
    }
    if (n > 1) {
      try {
        const src = workerSource(this.backend);
        const workerData = this.backend === 'wasm' ? { module: kernelModule() } : {};
        for (let i = 0; i < n; i++) {
          const w = new Worker(src, { eval: true, workerData });
          w.on('message', (m: { id: number; ok: boolean; message?: string }) => {
            const p = this.pending.get(m.id);
            if (!p) return;
            this.pending.delete(m.id);
            if (m.ok) p.resolve();
            else p.reject(new DecompositionError('worker_failed', `A decomposition worker failed: ${m.message}`));
          });
          w.on('error', (err) => {
            for (const p of this.pending.values())
              p.reject(new DecompositionError('worker_failed', `A decomposition worker crashed: ${err.message}`));
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
      if (this.backend === 'wasm') {
        this.local ??= kernelInstance();
        const ex = this.local;
        const fn = WASM_KERNELS[op] as (ex: KernelExports, ...a: unknown[]) => void;
        parts.forEach((r, i) => fn(ex, ...argsFor(r, i)));
      } else {
        const fn = KERNELS[op] as (...a: unknown[]) => void;
        parts.forEach((r, i) => fn(...argsFor(r, i)));
      }
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
