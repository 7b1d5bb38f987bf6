// npm run bench -- suggestions: the learned suggestion model on the realistic phantom.
// Many subjects (one XS realistic run each, seed = subject number), decomposed as the worker does
// (k = BENCH_K components, default 26: at the XS size the automatic k (≈ 14) leaves most networks
// merged, while k 26–30 still reproduces and finds ≈ 23 of the 27 sources — see DEVELOPERS.md;
// restarts for the reproducibility index), features computed as stored, and each
// component labelled by the phantom's truth: the kind of the truth source whose map it matches
// (|r| ≥ 0.5), otherwise "noise" (a component that matches no source carries no network).
// Prints the subject-wise cross-validated accuracy and noise sensitivity of every candidate and of
// the chosen model (target ≥ 0.9 for both; issue 16).
//
//   BENCH_SUBJECTS=12 BENCH_K=26 BENCH_RESTARTS=3 BENCH_THREADS=1 npm run bench -- suggestions
import { componentFeatures } from '@/lib/decomposition/component-outputs';
import { decomposeRun, type DecompositionResult } from '@/lib/decomposition/pipeline';
import { decodeNifti, encodeNifti1 } from '@/lib/nifti';
import { generatePhantom, phantomToNiftiInput, type Phantom } from '@/lib/phantom';
import { trainSuggestionModel, type TrainingRow } from '@/lib/suggestions/cross-validate';

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

/** Truth label of each component: the kind of its best-matching truth map (|r| ≥ 0.5), else noise. */
function truthLabels(p: Phantom, r: DecompositionResult): Array<'signal' | 'noise'> {
  const V = r.voxelsInMask;
  const truths = p.truth.sources.map((s) => ({ kind: s.kind, map: Array.from(r.maskIndices, (i) => s.map[i]!) }));
  return Array.from({ length: r.k }, (_, c) => {
    const comp = r.maps.subarray(c * V, (c + 1) * V);
    let best = 0,
      kind: 'signal' | 'noise' = 'noise';
    for (const t of truths) {
      const v = Math.abs(pearson(t.map, comp));
      if (v > best) [best, kind] = [v, t.kind];
    }
    return best >= 0.5 ? kind : 'noise';
  });
}

export async function main() {
  const subjects = Number(process.env.BENCH_SUBJECTS ?? 12);
  const restarts = Number(process.env.BENCH_RESTARTS ?? 3);
  const threads = Number(process.env.BENCH_THREADS ?? 1);
  const components = Number(process.env.BENCH_K ?? 26);
  const rows: TrainingRow[] = [];
  const t0 = performance.now();
  for (let s = 1; s <= subjects; s++) {
    const p = generatePhantom({ size: 'XS', seed: s, model: 'realistic' });
    const image = decodeNifti(encodeNifti1(phantomToNiftiInput(p)));
    const r = await decomposeRun({ image, mask: p.truth.brainMask }, { components, restarts, threads, seed: s });
    const features = componentFeatures(r, p.motion);
    const labels = truthLabels(p, r);
    features.forEach((f, c) =>
      rows.push({ subject: String(s).padStart(2, '0'), features: { ...f, varianceExplained: r.explainedVariance[c]! }, label: labels[c]! }),
    );
    console.log(
      `subject ${s}: k ${r.k}, ${labels.filter((l) => l === 'noise').length} noise / ${labels.filter((l) => l === 'signal').length} signal`,
    );
  }
  const t1 = performance.now();
  const { report } = trainSuggestionModel(rows);
  const t2 = performance.now();
  console.log(`components ${report.n} (noise ${report.noise}) from ${report.subjects} subjects; ${report.folds} subject-wise folds`);
  for (const c of report.candidates) console.log(`  ${c.name.padEnd(40)} CV accuracy ${c.accuracy.toFixed(3)}`);
  const f3 = (v: number | null) => (v === null ? '—' : v.toFixed(3));
  console.log(`chosen: ${report.chosen}`);
  console.log(
    `subject-wise CV accuracy ${f3(report.score.percentAgreement.value)}, noise sensitivity ${f3(report.score.noise.sensitivity.value)}, specificity ${f3(report.score.noise.specificity.value)}, κ ${f3(report.score.cohenKappa.value)}, AC1 ${f3(report.score.gwetAC1.value)}`,
  );
  console.log(
    `top features: ${report.importance
      .slice(0, 5)
      .map((f) => `${f.feature} ${f.weight.toFixed(2)}`)
      .join(', ')}`,
  );
  console.log(`time: data ${((t1 - t0) / 1000).toFixed(1)} s, cross-validation + fit ${((t2 - t1) / 1000).toFixed(1)} s`);
}
