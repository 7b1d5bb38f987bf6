/**
 * A methods paragraph a study lead can paste into a paper, generated from the study's numbers:
 * decomposition method and parameters, dimensionality method, raters per component, consensus
 * rule, agreement statistics with bootstrap CIs and the bootstrap settings, and how disagreements
 * were resolved. Our own wording; the cautions follow the paragraph. Pure function.
 */
import type { AgreementReport } from './agreement-report';
import { CAUTIONS } from '@/lib/exports/cautions';
import { sentence } from '@/lib/text';

export type MethodsInput = {
  software: string;
  runs: number;
  components: number;
  /** Components per run. */
  k: { min: number; max: number; median: number };
  decomposition: {
    dimMethods: string[];
    contrasts: string[];
    tolerance: number | null;
    maxIter: number | null;
    dropVolumes: number[];
    varianceNorm: boolean | null;
    detrend: boolean | null;
    masks: string[];
  };
  ratersPerRun: number;
  votesPerComponent: { min: number; max: number; mean: number };
  consensusRule: 'unanimous' | 'majority' | 'lead';
  labelSet: string[];
  uncertainInExport: 'keep' | 'remove';
  report: AgreementReport;
  bootstrap: { resamples: number; seed: number };
  /** How the ratings were made, as enforced (lib/db/queries/agreement.ts loadRatingFacts). */
  ratings: {
    blinding: boolean;
    showVotesAfterSubmit: boolean;
    reopened: { assignments: number; times: number };
    raters: number;
    /** Raters who passed the study's calibration set; null when the study certified nobody. */
    certified: number | null;
  };
};

const DIM: Record<string, string> = {
  'iid-mdl':
    'the minimum description length criterion (Wax & Kailath 1985) on an entropy-rate-guided i.i.d. subsample of voxels (Li, Adali & Calhoun 2007)',
  'iid-aic':
    'the Akaike information criterion (Wax & Kailath 1985) on an entropy-rate-guided i.i.d. subsample of voxels (Li, Adali & Calhoun 2007)',
  laplace: "Minka's Laplace approximation of the PCA model evidence (Minka 2000)",
  aic: 'the Akaike information criterion of Wax & Kailath (1985)',
  mdl: 'the minimum description length criterion of Wax & Kailath (1985)',
  fixed: 'a fixed number of components set in the protocol',
  variance: 'the number of components that keeps a set fraction of the variance',
};
const RULE: Record<string, string> = {
  unanimous: 'a component was decided only when every rater gave the same label; every other component went to the study lead',
  majority: 'a component was decided by a strict majority of its raters; ties went to the study lead',
  lead: 'a component was decided when its raters agreed; any disagreement went to the study lead',
};

const f2 = (x: number) => x.toFixed(2);
const list = (xs: string[], and = 'and') => (xs.length <= 1 ? xs.join('') : `${xs.slice(0, -1).join(', ')} ${and} ${xs[xs.length - 1]}`);
const range = (a: number, b: number) => (a === b ? String(a) : `${a}–${b}`);

function stat(
  name: string,
  s: { value: number | null; ci?: { lower: number | null; upper: number | null } | null } | undefined,
): string | null {
  if (!s || s.value == null) return null;
  const ci = s.ci && s.ci.lower != null && s.ci.upper != null ? ` (95% CI ${f2(s.ci.lower)}–${f2(s.ci.upper)})` : '';
  return `${name} ${f2(s.value)}${ci}`;
}

const times = (n: number) => (n === 1 ? 'once' : `${n} times`);

/** Who the raters were, as far as Quorum knows: certified on the study's calibration set, or not. */
function whoRated(r: MethodsInput['ratings']): string {
  const n = `${r.raters} rater${r.raters === 1 ? '' : 's'}`;
  if (r.certified === null || r.certified === 0) return `${cap(n)}, none of them certified on a calibration set in Quorum,`;
  if (r.certified === r.raters)
    return `${cap(n)}, ${r.raters === 1 ? 'who' : 'all of whom'} passed certification on the study's calibration set (agreement with the study lead's reference labels),`;
  return `${cap(n)} (${r.certified} of them certified on the study's calibration set, ${r.raters - r.certified} not)`;
}
const cap = (x: string) => x.charAt(0).toUpperCase() + x.slice(1);

/** What a rater could see of the other raters' labels, as the software enforced it. */
function whatWasShown(r: MethodsInput['ratings']): string {
  if (!r.showVotesAfterSubmit) return "Quorum never showed a rater another rater's labels.";
  if (r.blinding)
    return "Quorum withheld the other raters' labels from each rater until that rater had submitted the run, and then showed only the labels of raters who had submitted it too.";
  return 'Raters were not blind to each other: Quorum showed each rater the labels of raters who had already submitted the run, also before they submitted their own.';
}

/** Frozen submissions, the lead's reopenings, and which votes the statistics use. */
function frozen(r: MethodsInput['ratings']): string {
  const reopened =
    r.reopened.assignments === 0
      ? 'no submission was reopened'
      : `a study lead reopened ${r.reopened.assignments} rater submission${r.reopened.assignments === 1 ? '' : 's'} of a run (${times(r.reopened.times)} in all, each with a recorded reason), and decisions use the labels as changed after reopening`;
  return `A rater's labels could not change after submission unless a study lead reopened the run for that rater; ${reopened}. Agreement statistics use each rater's labels as first submitted.`;
}

export function methodsParagraph(m: MethodsInput): string {
  const d = m.decomposition;
  const parts: string[] = [];
  const dims = d.dimMethods.map((x) => DIM[x] ?? x);
  const drop = [...new Set(d.dropVolumes)];
  parts.push(
    `Each of ${m.runs} fMRI run${m.runs === 1 ? '' : 's'} was decomposed with Quorum ${m.software}: ` +
      `${drop.length ? `after discarding the first ${list(drop.map(String))} volume${drop.length === 1 && drop[0] === 1 ? '' : 's'}, ` : ''}` +
      `each in-mask voxel's time series (${list(d.masks.map((x) => (x === 'uploaded' ? 'uploaded brain mask' : 'automatic brain mask from the mean image')))}) was centred` +
      `${d.detrend ? ', linearly detrended' : ''}${d.varianceNorm ? ' and scaled to unit variance' : ''}, ` +
      `reduced by temporal principal component analysis with the dimensionality chosen by ${list(dims)}, and separated into spatially independent components by symmetric FastICA ` +
      `(Hyvärinen 1999; contrast ${list(d.contrasts)}${d.tolerance != null ? `, tolerance ${d.tolerance}` : ''}${d.maxIter != null ? `, at most ${d.maxIter} iterations` : ''}, recorded seed). ` +
      `This gave ${range(m.k.min, m.k.max)} components per run (median ${m.k.median}; ${m.components} in all), ordered by variance explained and z-scored.`,
  );
  const v = m.votesPerComponent;
  parts.push(
    `${whoRated(m.ratings)} labelled every component as ${list(m.labelSet, 'or')} from its spatial map, time course, power spectrum and features. ` +
      `${whatWasShown(m.ratings)} ${frozen(m.ratings)} ` +
      `The protocol asked for ${m.ratersPerRun} raters per run, and components received ${range(v.min, v.max)} submitted votes (mean ${f2(v.mean)}) from ${m.report.raters.length} raters in all. ` +
      `Under the consensus rule, ${RULE[m.consensusRule]}.`,
  );
  const s = m.report.summary;
  if (s) {
    const o = s.overall;
    const stats = [
      stat("Krippendorff's α (nominal)", o.krippendorffAlpha),
      stat("Fleiss' κ", o.fleissKappa),
      stat('PABAK', o.pabak),
      stat("Gwet's AC1", o.gwetAC1),
      o.percentAgreement.value != null
        ? (stat('percent agreement', {
            value: 100 * o.percentAgreement.value,
            ci: o.percentAgreement.ci
              ? {
                  lower: o.percentAgreement.ci.lower == null ? null : 100 * o.percentAgreement.ci.lower,
                  upper: o.percentAgreement.ci.upper == null ? null : 100 * o.percentAgreement.ci.upper,
                }
              : null,
          })?.replace(/(\d)( \(|$)/, '$1 %$2') ?? null)
        : null,
    ].filter(Boolean) as string[];
    parts.push(
      `Inter-rater agreement over ${s.items} components, with "uncertain" as a category of its own, was ${list(stats)}; ` +
        `intervals are percentile bootstrap intervals over components (${m.bootstrap.resamples} resamples, seed ${m.bootstrap.seed}). ` +
        `Because signal and noise labels are imbalanced, PABAK and AC1 are reported beside κ.`,
    );
  } else {
    parts.push(sentence(`Inter-rater agreement could not be computed: ${m.report.unavailable ?? 'not enough overlapping votes'}`));
  }
  const c = m.report.decisions;
  const lead = c.reconciled + c.override;
  parts.push(
    `Of ${c.total} decisions, ${c.unanimous} were unanimous, ${c.majority} were reached by majority and ${lead} (${c.total ? f2((100 * lead) / c.total) : '0.00'} %) were resolved by the study lead with a recorded reason. ` +
      `Components decided noise${m.uncertainInExport === 'remove' ? ' or uncertain' : ''} were listed for removal${m.uncertainInExport === 'keep' ? '; uncertain components were kept' : ''}.`,
  );
  return parts.join(' ');
}

/** The paragraph as markdown with the cautions, for the release ZIP and the printable report. */
export function methodsMarkdown(m: MethodsInput, title = 'Methods: component classification'): string {
  return [`# ${title}`, '', methodsParagraph(m), '', '## Cautions', '', ...CAUTIONS.map((c) => `- ${c}`), ''].join('\n');
}
