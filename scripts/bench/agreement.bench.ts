// Agreement bench: studyAgreement on 200 runs × 60 components × 3 raters (6 raters in the study,
// 3 per run, ~2% missing votes) with 1000 bootstrap resamples of the headline statistics. Target ≤ 1 s.
import { performance } from 'node:perf_hooks';
import { studyAgreement, type StudyItem } from '@/lib/agreement';
import { createRng } from '@/lib/random';

const RUNS = 200;
const COMPONENTS = 60;
const RATERS = ['ana', 'ben', 'chen', 'dara', 'eli', 'fay'];
const LABELS = ['signal', 'noise', 'uncertain'] as const;

function makeItems(seed: number): StudyItem[] {
  const rng = createRng(seed, 'golden-xor');
  const items: StudyItem[] = [];
  for (let run = 0; run < RUNS; run++) {
    const pool = [...RATERS];
    const panel = [0, 1, 2].map(() => pool.splice(rng.int(pool.length), 1)[0]);
    for (let c = 1; c <= COMPONENTS; c++) {
      const truth = rng.next() < 0.7 ? 'noise' : 'signal';
      const votes: Record<string, string | null> = {};
      for (const r of panel) {
        const u = rng.next();
        votes[r] = u < 0.02 ? null : u < 0.85 ? truth : LABELS[rng.int(3)];
      }
      const counts = new Map<string, number>();
      for (const v of Object.values(votes)) if (v) counts.set(v, (counts.get(v) ?? 0) + 1);
      const top = [...counts.entries()].sort((a, b) => b[1] - a[1])[0];
      items.push({ id: `run${run}-c${c}`, runId: `run${run}`, votes, decision: top && top[1] >= 2 ? top[0] : 'uncertain' });
    }
  }
  return items;
}

export async function main(): Promise<void> {
  const items = makeItems(2026);
  const input = { categories: LABELS, items, bootstrap: { resamples: 1000, seed: 1 } };
  studyAgreement({ ...input, bootstrap: { resamples: 20, seed: 1 } }); // warm-up (JIT)
  const times: number[] = [];
  let last: ReturnType<typeof studyAgreement> | undefined;
  for (let rep = 0; rep < 3; rep++) {
    const t0 = performance.now();
    last = studyAgreement(input);
    times.push(performance.now() - t0);
  }
  const o = last!.overall;
  const fmt = (x: number | null) => (x === null ? 'null' : x.toFixed(4));
  console.log(`studyAgreement: ${RUNS} runs × ${COMPONENTS} components × 3 raters (${items.length} items), 1000 resamples`);
  console.log(
    `  time per call: ${times.map((t) => `${t.toFixed(0)} ms`).join(', ')} (best ${Math.min(...times).toFixed(0)} ms; target ≤ 1000 ms)`,
  );
  console.log(
    `  α = ${fmt(o.krippendorffAlpha.value)} [${fmt(o.krippendorffAlpha.ci!.lower)}, ${fmt(o.krippendorffAlpha.ci!.upper)}], ` +
      `Fleiss κ = ${fmt(o.fleissKappa.value)} (n ${o.fleissKappa.n}), AC1 = ${fmt(o.gwetAC1.value)}, PABAK = ${fmt(o.pabak.value)}, ` +
      `percent = ${fmt(o.percentAgreement.value)}; ${last!.pairs.length} pairs, ${last!.runs.length} runs`,
  );
}
