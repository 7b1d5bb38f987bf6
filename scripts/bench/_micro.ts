import { KernelPool, sharedFloat32, sharedFloat64 } from '@/lib/decomposition/worker-pool';
import { symmetricDecorrelation } from '@/lib/decomposition/fastica';
import { gaussianSource } from '@/lib/decomposition/random';
const T = 300, V = 61728;
const g = gaussianSource(1);
const x = sharedFloat32(T * V); for (let i = 0; i < x.length; i++) x[i] = g();
async function time(label: string, reps: number, fn: () => Promise<unknown> | unknown) {
  await fn();
  const c0 = process.cpuUsage(); const t0 = performance.now();
  for (let r = 0; r < reps; r++) await fn();
  const c = process.cpuUsage(c0);
  console.log(`${label.padEnd(28)} wall ${((performance.now() - t0) / reps).toFixed(1)} ms  cpu ${((c.user + c.system) / 1000 / reps).toFixed(1)} ms`);
}
const pool = new KernelPool(2, { kernels: 'wasm' });
const parts = pool.partition(V);
const outs = parts.map(() => sharedFloat64(T * T));
await time(`gram T=300`, 2, () => pool.run('gramChunk', parts, (r, i) => [x, T, V, r[0], r[1], outs[i]]));
for (const k of (process.argv[2] ?? '40,80').split(',').map(Number)) {
  const z = sharedFloat32(k * V); for (let i = 0; i < z.length; i++) z[i] = g();
  const p = new Float64Array(k * T).map(() => g() / 30), c = new Float64Array(k);
  await time(`k=${k} project`, 2, () => pool.run('projectChunk', parts, (r) => [x, T, V, p, c, k, r[0], r[1], z]));
  const w = symmetricDecorrelation(new Float64Array(k * k).map(() => g()), k);
  await time(`k=${k} symdecorr`, 10, () => symmetricDecorrelation(w, k));
  const Gs = parts.map(() => sharedFloat64(k * k)), gps = parts.map(() => sharedFloat64(k));
  await time(`k=${k} ica pass (cached z)`, 10, () => pool.run('icaChunk', parts, (r, i) => [z, k, V, w, 0, 1, r[0], r[1], Gs[i], gps[i], 'key' + k]));
}
await pool.close();
