// Figures behind the default dimensionality method: on realistic phantom runs, every automatic
// method's k, and at each of those k the reproducibility index of the components (5 restarts) and how
// many true sources are found. Prints one JSON line per run and k, then a table.
//
//   node --import tsx scripts/measure-dimensionality.ts [--runs XS:1,S:1] [--methods iid-mdl,mdl,…] [--restarts 5] [--threads 2]
//
// --methods limits the decompositions with restarts to those methods' k (all methods' k are printed).
//
// Slow on purpose (several full decompositions per run, up to k = 100 at S size): a measurement, not a test.
import { parseArgs } from 'node:util';
import { decomposeRun, type DecompositionResult } from '@/lib/decomposition/pipeline';
import { decodeNifti, encodeNifti1 } from '@/lib/nifti';
import { generatePhantom, phantomToNiftiInput, type Phantom, type PhantomSize } from '@/lib/phantom';

function pearson(a: ArrayLike<number>, b: ArrayLike<number>): number {
  const n = a.length;
  let ma = 0,
    mb = 0;
  for (let i = 0; i < n; i++) {
    ma += a[i]!;
    mb += b[i]!;
  }
  ma /= n;
  mb /= n;
  let sab = 0,
    saa = 0,
    sbb = 0;
  for (let i = 0; i < n; i++) {
    const x = a[i]! - ma,
      y = b[i]! - mb;
    sab += x * y;
    saa += x * x;
    sbb += y * y;
  }
  return saa > 0 && sbb > 0 ? sab / Math.sqrt(saa * sbb) : 0;
}

/** Best |r| of each truth map with any component map, and which component. */
function matches(p: Phantom, r: DecompositionResult) {
  const V = r.voxelsInMask;
  return p.truth.sources.map((s) => {
    const truth = Array.from(r.maskIndices, (i) => s.map[i]!);
    let best = 0,
      component = -1;
    for (let c = 0; c < r.k; c++) {
      const v = Math.abs(pearson(truth, r.maps.subarray(c * V, (c + 1) * V)));
      if (v > best) [best, component] = [v, c];
    }
    return { name: s.name, r: best, component };
  });
}

const median = (xs: number[]) => {
  if (!xs.length) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2;
};
const f2 = (x: number) => (Number.isFinite(x) ? x.toFixed(2) : '—');

async function main() {
  const { values } = parseArgs({
    options: {
      runs: { type: 'string', default: 'XS:1,S:1' },
      restarts: { type: 'string', default: '5' },
      threads: { type: 'string', default: '2' },
      methods: { type: 'string' },
    },
  });
  const only = values.methods ? new Set(values.methods.split(',')) : null;
  const restarts = Number(values.restarts);
  const threads = Number(values.threads);
  const table: string[] = ['run        method   k    median repro  ≥0.8   sources |r|≥0.5  true-source repro median  other repro median'];
  for (const spec of values.runs!.split(',')) {
    const [size, seed] = spec.split(':') as [PhantomSize, string];
    const p = generatePhantom({ size, seed: Number(seed ?? 1), model: 'realistic' });
    const image = decodeNifti(encodeNifti1(phantomToNiftiInput(p)));
    const input = { image, mask: p.truth.brainMask };
    const auto = await decomposeRun(input, { restarts: 1, threads });
    const bound = auto.dimension.range[1];
    const estimates = auto.dimension.estimates;
    console.log(
      JSON.stringify({
        run: `${size}:${seed}`,
        voxels: auto.voxelsInMask,
        timepoints: auto.timepoints,
        sources: p.truth.sources.length,
        bound,
        estimates,
        iidSubsampling: auto.iidSubsampling,
        smoothnessEffectiveSamples: Math.round(auto.smoothness.effectiveSamples),
      }),
    );
    const byK = new Map<number, string[]>();
    for (const [method, k] of Object.entries(estimates)) {
      if (only && !only.has(method)) continue;
      const kk = Math.min(bound, Math.max(2, k));
      byK.set(kk, [...(byK.get(kk) ?? []), method]);
    }
    for (const [k, methods] of [...byK.entries()].sort((a, b) => a[0] - b[0])) {
      const t0 = performance.now();
      const r = await decomposeRun(input, { components: k, restarts, threads });
      const rep = Array.from(r.reproducibility ?? []);
      const m = matches(p, r);
      const found = m.filter((x) => x.r >= 0.5);
      const sourceComponents = new Set(found.map((x) => x.component));
      const trueRep = [...sourceComponents].map((c) => rep[c]!);
      const otherRep = rep.filter((_, c) => !sourceComponents.has(c));
      const row = {
        run: `${size}:${seed}`,
        methods,
        k,
        medianReproducibility: median(rep),
        atLeast08: rep.filter((v) => v >= 0.8).length,
        sourcesFound: found.length,
        trueSourceReproducibility: median(trueRep),
        otherReproducibility: median(otherRep),
        seconds: Number(((performance.now() - t0) / 1000).toFixed(1)),
        converged: r.converged,
        restartsConverged: r.restarts?.converged,
      };
      console.log(JSON.stringify(row));
      table.push(
        `${row.run.padEnd(10)} ${methods.join('/').padEnd(8)} ${String(k).padStart(3)}  ${f2(row.medianReproducibility).padStart(12)}  ${String(row.atLeast08).padStart(4)}   ${String(found.length).padStart(15)}  ${f2(row.trueSourceReproducibility).padStart(24)}  ${f2(row.otherReproducibility).padStart(18)}`,
      );
    }
  }
  console.log(table.join('\n'));
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : String(err));
  process.exit(1);
});
