import { escapeHtml, htmlLayout, textFooter, type MailContent } from './layout';

/** To a study lead: a certified rater's calibration score has dropped below the study's threshold. */
export function calibrationDriftMail({
  facility,
  name,
  studyName,
  raterName,
  reason,
  url,
}: {
  facility: string;
  name: string;
  studyName: string;
  raterName: string;
  reason: string;
  url: string;
}): MailContent {
  const subject = `${facility}: ${raterName} is below the calibration threshold in "${studyName}"`;
  const text = `Hello ${name},

${raterName} was certified in "${studyName}", but on the latest calibration runs ${reason}.
Until they reach the threshold again, no live runs are assigned to them.

Calibration: ${url}
${textFooter(facility)}`;
  const html = htmlLayout({
    facility,
    paragraphs: [
      `Hello ${escapeHtml(name)},`,
      `<strong>${escapeHtml(raterName)}</strong> was certified in “${escapeHtml(studyName)}”, but on the latest calibration runs ${escapeHtml(reason)}.`,
      'Until they reach the threshold again, no live runs are assigned to them.',
    ],
    action: { label: 'Open calibration', url },
  });
  return { subject, text, html };
}
