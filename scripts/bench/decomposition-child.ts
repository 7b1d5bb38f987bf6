// Child process of the decomposition benchmark (a fresh process per step, so peak RSS is the
// step's own). Each mode prints one JSON line. Modes:
//   gen SIZE FILE          write the phantom of SIZE (seed 1) as int16 NIfTI (gz by extension)
//   mask FILE MASKFILE     write the automatic brain mask of FILE's mean image (uint8 NIfTI)
//   ica FILE MASKFILE K    one FastICA end to end, from the NIfTI to the maps: read, in-mask matrix
//                          (demeaned, variance-normalised), T × T covariance, PCA, whitening to K,
//                          FastICA (log-cosh, tol 1e-4, max 200 iterations), maps S = W·Z
//   full FILE MASKFILE K OUTDIR   decomposeRun with its defaults except components = K, then the
//                          output files (what `quorum decompose --components K` does)
//   run FILE OUTDIR        decomposeRun with all defaults (automatic k), then the output files
import { readNiftiFile, writeNiftiFile, type NiftiImage } from '@/lib/nifti';
import { generatePhantom, phantomToNiftiInput, type PhantomSize } from '@/lib/phantom';
import {
  buildDataMatrix,
  decomposeRun,
  fastIca,
  KernelPool,
  meanImage,
  sharedFloat32,
  temporalCovariance,
  temporalPca,
  whiten,
} from '@/lib/decomposition';
import { autoBrainMask } from '@/lib/decomposition/brain-mask';
import { kernelBackend } from '@/lib/decomposition/worker-pool';
import { writeDecompositionOutputs } from '../cli/decompose';

const rssMb = () => process.resourceUsage().maxRSS / 1024;
const print = (o: unknown) => process.stdout.write(JSON.stringify(o) + '\n');

async function readMask(file: string, image: NiftiImage): Promise<Uint8Array> {
  const m = await readNiftiFile(file);
  const vol = new Float32Array(m.voxelsPerVolume);
  m.readVolume(0, vol);
  if (vol.length !== image.voxelsPerVolume) throw new Error('mask grid differs from the run');
  return Uint8Array.from(vol, (v) => (v > 0 ? 1 : 0));
}

const [mode, a, b, c, d] = process.argv.slice(2);
if (mode === 'gen' && a && b) {
  const t0 = performance.now();
  const p = generatePhantom({ size: a as PhantomSize, seed: 1 });
  const t1 = performance.now();
  await writeNiftiFile(b, phantomToNiftiInput(p, { datatype: 'int16' }));
  print({ generateSeconds: (t1 - t0) / 1000, writeSeconds: (performance.now() - t1) / 1000, sources: p.truth.sources.length });
} else if (mode === 'mask' && a && b) {
  const image = await readNiftiFile(a);
  const dims: [number, number, number] = [image.nx, image.ny, image.nz];
  const m = meanImage(image, 0);
  const mask = autoBrainMask(m.mean, dims);
  for (let i = 0; i < mask.length; i++) if (m.nonFinite[i]) mask[i] = 0;
  const h = image.header;
  await writeNiftiFile(b, { dims, pixdim: h.pixdim.slice(1, 4), affine: h.affine, datatype: 'uint8', data: mask });
  print({ dims: [...dims, image.nt], voxelsInMask: mask.reduce((s, v) => s + v, 0) });
} else if (mode === 'ica' && a && b && c) {
  const k = Number(c);
  const sec: Record<string, number> = {};
  let mark = performance.now();
  const t0 = mark;
  const lap = (name: string) => {
    const now = performance.now();
    sec[name] = (now - mark) / 1000;
    mark = now;
  };
  const image = await readNiftiFile(a);
  const mask = await readMask(b, image);
  const candidates = Int32Array.from([...mask.keys()].filter((i) => mask[i]));
  lap('read');
  const dm = buildDataMatrix(image, candidates, 0, { detrend: false, varianceNorm: true });
  const { x, T, V } = dm;
  lap('matrix');
  const pool = new KernelPool();
  try {
    const cov = await temporalCovariance(x, T, V, pool);
    lap('covariance');
    const pca = temporalPca(cov.cov, T);
    lap('pca');
    const wh = await whiten(x, T, V, pca.vectors, pca.eigenvalues, cov.spatialMean, k, pool);
    lap('whitening');
    const cpu0 = process.cpuUsage();
    const ica = await fastIca(wh.z, k, V, pool, { contrast: 'logcosh', tol: 1e-4, maxIter: 200, seed: 1, retry: false });
    lap('ica');
    const icaCpu = process.cpuUsage(cpu0);
    const s = sharedFloat32(k * V);
    await pool.run('unmixChunk', pool.partition(V), (r) => [wh.z, k, V, ica.w, r[0], r[1], s]);
    lap('unmix');
    print({
      seconds: { ...sec, endToEnd: (performance.now() - t0) / 1000 },
      k,
      V,
      T,
      iterations: ica.iterations,
      warmStartIterations: ica.warmStartIterations,
      warmStartVoxels: ica.warmStartVoxels,
      converged: ica.converged,
      attempts: ica.attempts,
      threads: pool.threads,
      backend: kernelBackend(),
      maxRssMb: rssMb(),
      icaCpuSeconds: (icaCpu.user + icaCpu.system) / 1e6,
    });
  } finally {
    await pool.close();
  }
} else if ((mode === 'full' && a && b && c && d) || (mode === 'run' && a && b)) {
  const t0 = performance.now();
  const image = await readNiftiFile(a);
  const full = mode === 'full';
  const mask = full ? await readMask(b, image) : undefined;
  const out = full ? d! : b;
  const read = (performance.now() - t0) / 1000;
  const r = await decomposeRun({ image, mask }, full ? { components: Number(c) } : {});
  const t2 = performance.now();
  await writeDecompositionOutputs(out, image.header, r);
  const write = (performance.now() - t2) / 1000;
  print({
    seconds: { read, ...r.seconds, write, endToEnd: (performance.now() - t0) / 1000 },
    k: r.k,
    voxelsInMask: r.voxelsInMask,
    timepoints: r.timepoints,
    iterations: r.iterations,
    converged: r.converged,
    warmStartIterations: r.warmStartIterations,
    attempts: r.icaAttempts,
    threads: r.threads,
    backend: kernelBackend(),
    maxRssMb: rssMb(),
  });
} else {
  process.stderr.write(
    'usage: decomposition-child.ts gen SIZE FILE | mask FILE MASKFILE | ica FILE MASKFILE K | full FILE MASKFILE K OUTDIR | run FILE OUTDIR\n',
  );
  process.exit(2);
}
