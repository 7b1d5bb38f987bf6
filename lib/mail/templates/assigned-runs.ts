import { escapeHtml, formatUtc, htmlLayout, textFooter, type MailContent } from './layout';

export type AssignedRunLine = { studyName: string; runName: string; url: string; dueAt: Date | null };

/** One e-mail per rater per batch: every run newly assigned to them, with a link to its rating desk. */
export function assignedRunsMail({
  facility,
  name,
  runs,
  queueUrl,
}: {
  facility: string;
  name: string;
  runs: AssignedRunLine[];
  queueUrl: string;
}): MailContent {
  const n = runs.length;
  const subject = `${facility}: ${n} run${n === 1 ? '' : 's'} to rate`;
  const due = (r: AssignedRunLine) => (r.dueAt ? ` — due ${formatUtc(r.dueAt)}` : '');
  const text = `Hello ${name},

${n === 1 ? 'A run has' : `${n} runs have`} been assigned to you in Quorum at ${facility}:

${runs.map((r) => `- ${r.studyName}: ${r.runName}${due(r)}\n  ${r.url}`).join('\n')}

Your queue: ${queueUrl}
${textFooter(facility)}`;
  const list = `<ul style="margin:0;padding-left:18px">${runs
    .map((r) => `<li><a href="${escapeHtml(r.url)}">${escapeHtml(r.runName)}</a> · ${escapeHtml(r.studyName)}${escapeHtml(due(r))}</li>`)
    .join('')}</ul>`;
  const html = htmlLayout({
    facility,
    paragraphs: [
      `Hello ${escapeHtml(name)},`,
      `${n === 1 ? 'A run has' : `${n} runs have`} been assigned to you in Quorum at ${escapeHtml(facility)}:`,
      list,
    ],
    action: { label: 'Open your queue', url: queueUrl },
  });
  return { subject, text, html };
}
