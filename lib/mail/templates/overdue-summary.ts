import { escapeHtml, formatUtc, htmlLayout, textFooter, type MailContent } from './layout';

export type OverdueLine = { raterName: string; runName: string; dueAt: Date; labelled: number; total: number };
export type OverdueStudy = { studyName: string; url: string; lines: OverdueLine[] };

/** To a study lead, once a day: assignments past their due date and not submitted, by study. */
export function overdueSummaryMail({ facility, name, studies }: { facility: string; name: string; studies: OverdueStudy[] }): MailContent {
  const n = studies.reduce((s, x) => s + x.lines.length, 0);
  const subject = `${facility}: ${n} overdue assignment${n === 1 ? '' : 's'}`;
  const line = (l: OverdueLine) => `${l.runName} — ${l.raterName}, due ${formatUtc(l.dueAt)}, ${l.labelled}/${l.total} labelled`;
  const text = `Hello ${name},

These assignments are past their due date and not submitted:

${studies.map((s) => `${s.studyName}\n${s.lines.map((l) => `- ${line(l)}`).join('\n')}\n  Assignments: ${s.url}`).join('\n\n')}
${textFooter(facility)}`;
  const html = htmlLayout({
    facility,
    paragraphs: [
      `Hello ${escapeHtml(name)},`,
      'These assignments are past their due date and not submitted:',
      ...studies.map(
        (s) =>
          `<strong>${escapeHtml(s.studyName)}</strong> · <a href="${escapeHtml(s.url)}">assignments</a><ul style="margin:4px 0 0;padding-left:18px">${s.lines
            .map((l) => `<li>${escapeHtml(line(l))}</li>`)
            .join('')}</ul>`,
      ),
    ],
  });
  return { subject, text, html };
}
