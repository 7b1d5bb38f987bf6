import { bandOrNull } from './study-bands';
import { bootstrapVector, type BootstrapOptions, type ConfidenceInterval } from './bootstrap';
import { cohenKappaFromFlat, pairPercentAgreementFromFlat } from './cohen-kappa';
import { detectionFromFlat, encodeReference, fillConfusion, toRows } from './confusion';
import { AgreementError } from './errors';
import { fleissKappaFromSums } from './fleiss-kappa';
import { gwetAC1FromSums } from './gwet-ac1';
import { accumulateItemSums, accumulateWeightedItemSums, compressItems, itemTerms, newItemSums } from './item-sums';
import { krippendorffAlphaFromSums } from './krippendorff-alpha';
import { pabakFromSums } from './pabak';
import { percentAgreementFromSums, specificAgreementFromSums } from './percent-agreement';
import { defined, undefinedStat, type StatResult } from './result';
import { MISSING, ratingsTableFromVotes, type Vote } from './table';
import type { AgreementBand } from './bands';

/** One component as the study page sees it: its run, each rater's label (null = no vote), the decision. */
export type StudyItem = {
  id: string;
  runId: string;
  votes: Readonly<Record<string, string | null | undefined>>;
  decision?: string | null;
};

export type StudyAgreementInput = {
  /** The study's label set, in order (e.g. ['signal', 'noise', 'uncertain']). */
  categories: readonly string[];
  items: readonly StudyItem[];
  /** Category treated as positive for sensitivity/specificity (default 'noise'). */
  positiveCategory?: string;
  /** Bootstrap for the overall statistics (default 1000 resamples, seed 1); false for none. */
  bootstrap?: BootstrapOptions | false;
};

export type StatWithCI = StatResult & { ci: ConfidenceInterval | null; band?: AgreementBand | null };

export type StudyAgreement = {
  categories: readonly string[];
  raters: readonly string[];
  excludedRaters: readonly string[];
  items: number;
  overall: {
    percentAgreement: StatWithCI;
    fleissKappa: StatWithCI & { omitted: number; votesPerItem: number };
    krippendorffAlpha: StatWithCI;
    pabak: StatWithCI;
    gwetAC1: StatWithCI;
    specificAgreement: Record<string, StatResult>;
  };
  pairs: Array<{
    raterA: string;
    raterB: string;
    n: number;
    cohenKappa: StatResult & { band: AgreementBand | null };
    percentAgreement: StatResult;
  }>;
  vsDecision: Array<{
    rater: string;
    n: number;
    cohenKappa: StatResult & { band: AgreementBand | null };
    sensitivity: StatResult;
    specificity: StatResult;
    /** Share of the rater's votes (all items) that are the positive category. */
    noiseRate: StatResult;
    confusion: number[][];
  }>;
  runs: Array<{ runId: string; items: number; raters: number; krippendorffAlpha: StatResult; percentAgreement: StatResult }>;
};

/**
 * Everything a study's agreement page needs, in one pass over integer-coded typed arrays:
 * overall percent agreement, Fleiss' κ, Krippendorff's α, PABAK and Gwet's AC1 with seeded
 * percentile-bootstrap 95% CIs over components (one shared set of resamples, allocation-free per
 * resample), specific agreement per category; Cohen's κ and percent agreement for every rater
 * pair that shares items; per rater against the decision: κ, noise sensitivity/specificity
 * ('uncertain' counts as not-noise on both sides), noise rate and confusion matrix; per run α and
 * percent agreement. See the individual statistics for formulas and sources.
 */
export function studyAgreement(input: StudyAgreementInput): StudyAgreement {
  const votes: Vote[] = [];
  const itemIds = new Set<string>();
  for (const it of input.items) {
    if (itemIds.has(it.id)) throw new AgreementError('bad_input', `item "${it.id}" appears twice`);
    itemIds.add(it.id);
    for (const [rater, label] of Object.entries(it.votes)) votes.push({ item: it.id, rater, label: label ?? null });
  }
  const table = ratingsTableFromVotes({ categories: input.categories, votes, items: [...itemIds] });
  const excludedRaters = table.excludedRaters;
  const n = table.nItems;
  const k = table.nCategories;
  const r = table.nRaters;
  const terms = itemTerms(table);
  const sums = newItemSums(k);
  const all = new Int32Array(n);
  for (let i = 0; i < n; i++) all[i] = i;
  accumulateItemSums(terms, all, n, sums);

  const percent = percentAgreementFromSums(sums);
  const fleiss = fleissKappaFromSums(sums, terms.fleissVotes);
  const alpha = krippendorffAlphaFromSums(sums);
  const pab = pabakFromSums(sums, k);
  const ac1 = gwetAC1FromSums(sums);

  let cis: (ConfidenceInterval | null)[] = [null, null, null, null, null];
  if (input.bootstrap !== false) {
    // A resample is a histogram over the few distinct per-item count vectors (compressItems).
    const { patterns, patternOf } = compressItems(terms);
    const weight = new Float64Array(patterns.n);
    const scratch = newItemSums(k);
    cis = bootstrapVector(
      n,
      5,
      (idx, len, out) => {
        weight.fill(0);
        for (let s = 0; s < len; s++) weight[patternOf[idx[s]]] += 1;
        accumulateWeightedItemSums(patterns, weight, scratch, false);
        const pa = scratch.pairable >= 2 ? scratch.agreeSum / scratch.pairable : NaN;
        out[0] = pa;
        out[1] = fleissKappaFromSums(scratch, terms.fleissVotes).value ?? NaN;
        out[2] = krippendorffAlphaFromSums(scratch).value ?? NaN;
        out[3] = (k * pa - 1) / (k - 1);
        out[4] = gwetAC1FromSums(scratch).value ?? NaN;
      },
      input.bootstrap,
    );
  }

  const overall: StudyAgreement['overall'] = {
    percentAgreement: { ...percent, ci: cis[0] },
    fleissKappa: { ...fleiss, votesPerItem: terms.fleissVotes, ci: cis[1], band: bandOrNull(fleiss.value) },
    krippendorffAlpha: { ...alpha, ci: cis[2], band: bandOrNull(alpha.value) },
    pabak: { ...pab, ci: cis[3], band: bandOrNull(pab.value) },
    gwetAC1: { ...ac1, ci: cis[4], band: bandOrNull(ac1.value) },
    specificAgreement: specificAgreementFromSums(sums, table.categories),
  };

  // Rater pairs.
  const flat = new Float64Array(k * k);
  const pairs: StudyAgreement['pairs'] = [];
  for (let a = 0; a < r; a++) {
    for (let b = a + 1; b < r; b++) {
      const m = fillConfusion(table.codes, r, a, table.codes, r, b, k, all, n, flat);
      if (m === 0) continue;
      const kappa = cohenKappaFromFlat(flat, k, m);
      pairs.push({
        raterA: table.raters[a],
        raterB: table.raters[b],
        n: m,
        cohenKappa: { ...kappa, band: bandOrNull(kappa.value) },
        percentAgreement: pairPercentAgreementFromFlat(flat, k, m),
      });
    }
  }

  // Raters against the decision.
  const vsDecision: StudyAgreement['vsDecision'] = [];
  const hasDecision = input.items.some((it) => it.decision !== undefined && it.decision !== null && it.decision !== '');
  if (hasDecision) {
    const positive = input.positiveCategory ?? 'noise';
    const p = table.categories.indexOf(positive);
    if (p < 0) throw new AgreementError('unknown_category', `positive category "${positive}" is not one of ${table.categories.join(', ')}`);
    const byId = new Map(input.items.map((it) => [it.id, it.decision ?? null]));
    const ref = encodeReference(
      table,
      table.items.map((id) => byId.get(id) ?? null),
    );
    for (let j = 0; j < r; j++) {
      const m = fillConfusion(table.codes, r, j, ref, 1, 0, k, all, n, flat);
      if (m === 0) continue;
      const kappa = cohenKappaFromFlat(flat, k, m);
      const det = detectionFromFlat(flat, k, p);
      let own = 0;
      let pos = 0;
      for (let i = 0; i < n; i++) {
        const c = table.codes[i * r + j];
        if (c === MISSING) continue;
        own++;
        if (c === p) pos++;
      }
      vsDecision.push({
        rater: table.raters[j],
        n: m,
        cohenKappa: { ...kappa, band: bandOrNull(kappa.value) },
        sensitivity: det.sensitivity,
        specificity: det.specificity,
        noiseRate: own > 0 ? defined(pos / own, own) : undefinedStat('the rater has no votes', 0),
        confusion: toRows(flat, k),
      });
    }
  }

  // Runs.
  const runItems = new Map<string, number[]>();
  const idOrder = new Map(table.items.map((id, i) => [id, i]));
  for (const it of input.items) {
    const i = idOrder.get(it.id) as number;
    const list = runItems.get(it.runId);
    if (list) list.push(i);
    else runItems.set(it.runId, [i]);
  }
  const runSums = newItemSums(k);
  const runs: StudyAgreement['runs'] = [];
  for (const [runId, list] of runItems) {
    const idx = Int32Array.from(list);
    accumulateItemSums(terms, idx, idx.length, runSums);
    let raters = 0;
    for (let j = 0; j < r; j++) {
      for (let t = 0; t < idx.length; t++)
        if (table.codes[idx[t] * r + j] !== MISSING) {
          raters++;
          break;
        }
    }
    runs.push({
      runId,
      items: idx.length,
      raters,
      krippendorffAlpha: krippendorffAlphaFromSums(runSums),
      percentAgreement: percentAgreementFromSums(runSums),
    });
  }

  return { categories: table.categories, raters: table.raters, excludedRaters, items: n, overall, pairs, vsDecision, runs };
}
