import { escapeHtml, htmlLayout, textFooter, type MailContent } from './layout';

/** To a rater whose submitted run a lead reopened: which run, who, why, and the link back to it. */
export function runReopenedMail({
  facility,
  name,
  leadName,
  studyName,
  runName,
  reason,
  url,
}: {
  facility: string;
  name: string;
  leadName: string;
  studyName: string;
  runName: string;
  reason: string;
  url: string;
}): MailContent {
  const subject = `${facility}: ${runName} is open for you again`;
  const text = `Hello ${name},

${leadName} reopened ${runName} (${studyName}) so that you can change your votes on it.

Reason: ${reason}

Your votes are as you left them. Change what needs changing and submit the run again: ${url}
${textFooter(facility)}`;
  const html = htmlLayout({
    facility,
    paragraphs: [
      `Hello ${escapeHtml(name)},`,
      `${escapeHtml(leadName)} reopened <strong>${escapeHtml(runName)}</strong> (${escapeHtml(studyName)}) so that you can change your votes on it.`,
      `Reason: ${escapeHtml(reason)}`,
      'Your votes are as you left them. Change what needs changing and submit the run again.',
    ],
    action: { label: 'Open the run', url },
  });
  return { subject, text, html };
}
