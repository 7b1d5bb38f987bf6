import { escapeHtml, htmlLayout, textFooter, type MailContent } from './layout';

/** To a study lead: every assigned rater has submitted a run; `pending` decisions wait for them. */
export function votesCompleteMail({
  facility,
  name,
  studyName,
  runName,
  raters,
  pending,
  url,
}: {
  facility: string;
  name: string;
  studyName: string;
  runName: string;
  raters: number;
  pending: number;
  url: string;
}): MailContent {
  const subject = `${facility}: ${runName} is rated${pending ? ` — ${pending} decision${pending === 1 ? '' : 's'} waiting` : ''}`;
  const waiting = pending
    ? `${pending} component${pending === 1 ? '' : 's'} ${pending === 1 ? 'waits' : 'wait'} for your decision.`
    : "Every component was decided by the study's rule; nothing waits for you.";
  const text = `Hello ${name},

All ${raters} assigned rater${raters === 1 ? ' has' : 's have'} submitted ${runName} in "${studyName}".
${waiting}

Reconcile: ${url}
${textFooter(facility)}`;
  const html = htmlLayout({
    facility,
    paragraphs: [
      `Hello ${escapeHtml(name)},`,
      `All ${raters} assigned rater${raters === 1 ? ' has' : 's have'} submitted <strong>${escapeHtml(runName)}</strong> in “${escapeHtml(studyName)}”.`,
      escapeHtml(waiting),
    ],
    action: { label: pending ? 'Reconcile' : 'Open the study', url },
  });
  return { subject, text, html };
}
