/**
 * The methods paragraph states what Quorum enforced about the ratings and what it knows about the
 * raters (issue 13 item 2, issue 15 item 8): blinding as enforced, frozen submissions and the lead's
 * reopenings, agreement on first-submitted votes, and certification on a calibration set — never
 * "trained raters" when nobody was certified. The wording is our own; the facts are the study's.
 */
import { describe, expect, it } from 'vitest';
import { methodsParagraph, type MethodsInput } from '@/lib/reports/methods-paragraph';

function paragraph(ratings: Partial<MethodsInput['ratings']>, unavailable = 'too few items'): string {
  return methodsParagraph({
    software: '0.1.0',
    runs: 2,
    components: 40,
    k: { min: 20, max: 20, median: 20 },
    decomposition: {
      dimMethods: ['iid-mdl'],
      contrasts: ['logcosh'],
      tolerance: 1e-4,
      maxIter: 200,
      dropVolumes: [],
      varianceNorm: true,
      detrend: false,
      masks: ['automatic'],
    },
    ratersPerRun: 2,
    votesPerComponent: { min: 2, max: 2, mean: 2 },
    consensusRule: 'majority',
    labelSet: ['signal', 'noise', 'uncertain'],
    uncertainInExport: 'keep',
    bootstrap: { resamples: 1000, seed: 1 },
    report: {
      summary: null,
      unavailable,
      raters: [
        { id: 1, name: 'a', votes: 40 },
        { id: 2, name: 'b', votes: 40 },
      ],
      decisions: { total: 40, pending: 0, unanimous: 30, majority: 0, reconciled: 10, override: 0 },
    } as never,
    ratings: { blinding: true, showVotesAfterSubmit: true, reopened: { assignments: 0, times: 0 }, raters: 2, certified: null, ...ratings },
  });
}

describe('methods paragraph: sentences', () => {
  it('ends the agreement sentence once when the reason already ends in a full stop (no "..")', () => {
    const text = paragraph({}, 'Agreement needs at least two raters who have submitted the same runs.');
    expect(text).toContain('could not be computed: Agreement needs at least two raters who have submitted the same runs. ');
    expect(text).not.toMatch(/\.\./);
  });
});

describe('methods paragraph: who rated', () => {
  it('never says "trained" and says nobody was certified when the study certified nobody', () => {
    const text = paragraph({ certified: null });
    expect(text).not.toMatch(/trained/i);
    expect(text).toContain('2 raters, none of them certified on a calibration set in Quorum, labelled every component');
  });
  it('says so when some raters failed or were never certified', () => {
    expect(paragraph({ raters: 3, certified: 0 })).toContain('3 raters, none of them certified');
    expect(paragraph({ raters: 3, certified: 2 })).toContain(
      "3 raters (2 of them certified on the study's calibration set, 1 not) labelled",
    );
  });
  it('says every rater passed certification only when all did', () => {
    expect(paragraph({ raters: 2, certified: 2 })).toContain("2 raters, all of whom passed certification on the study's calibration set");
    expect(paragraph({ raters: 1, certified: 1 })).toContain('1 rater, who passed certification');
  });
});

describe('methods paragraph: what was enforced', () => {
  it('blinding on: others withheld until the rater submitted, then only submitted raters shown', () => {
    const text = paragraph({ blinding: true, showVotesAfterSubmit: true });
    expect(text).toContain(
      "Quorum withheld the other raters' labels from each rater until that rater had submitted the run, and then showed only the labels of raters who had submitted it too.",
    );
  });
  it('others never shown when the study hides them, whatever the blinding flag', () => {
    for (const blinding of [true, false])
      expect(paragraph({ blinding, showVotesAfterSubmit: false })).toContain("Quorum never showed a rater another rater's labels.");
  });
  it('blinding off is stated as not blind', () => {
    expect(paragraph({ blinding: false, showVotesAfterSubmit: true })).toContain('Raters were not blind to each other');
  });
  it('states frozen submissions, the reopenings, and that agreement uses first-submitted labels', () => {
    expect(paragraph({})).toContain(
      "A rater's labels could not change after submission unless a study lead reopened the run for that rater; no submission was reopened. Agreement statistics use each rater's labels as first submitted.",
    );
    expect(paragraph({ reopened: { assignments: 1, times: 1 } })).toContain(
      'a study lead reopened 1 rater submission of a run (once in all, each with a recorded reason), and decisions use the labels as changed after reopening',
    );
    expect(paragraph({ reopened: { assignments: 2, times: 3 } })).toContain('reopened 2 rater submissions of a run (3 times in all');
  });
});
