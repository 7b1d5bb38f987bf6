/** Shared pieces of Quorum's e-mails: HTML escaping and one calm layout (inline styles, no images). */

export type MailContent = { subject: string; text: string; html: string };

export function escapeHtml(value: string): string {
  return value.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

/** Formats a UTC instant for a message, e.g. "3 December 2026, 14:05 UTC". */
export function formatUtc(at: Date): string {
  const date = at.toLocaleDateString('en-GB', { day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' });
  const time = at.toLocaleTimeString('en-GB', { hour: '2-digit', minute: '2-digit', timeZone: 'UTC' });
  return `${date}, ${time} UTC`;
}

/**
 * Wraps paragraphs (already escaped HTML) and one call-to-action link in the message layout.
 * The link is also printed as text so it can be copied.
 */
export function htmlLayout({
  facility,
  paragraphs,
  action,
}: {
  facility: string;
  paragraphs: string[];
  action?: { label: string; url: string };
}): string {
  const p = paragraphs.map((x) => `<p style="margin:0 0 14px">${x}</p>`).join('\n');
  const button = action
    ? `<p style="margin:20px 0"><a href="${escapeHtml(action.url)}" style="background:#7cc4b8;color:#0f1417;padding:10px 16px;border-radius:4px;text-decoration:none;font-weight:600">${escapeHtml(action.label)}</a></p>
<p style="margin:0 0 14px;font-size:12px;color:#5c6670">Or copy this address into your browser:<br><span style="word-break:break-all">${escapeHtml(action.url)}</span></p>`
    : '';
  return `<!doctype html>
<html><body style="margin:0;padding:24px;background:#f4f5f6;font-family:system-ui,sans-serif;font-size:14px;line-height:1.5;color:#1d2329">
<div style="max-width:520px;margin:0 auto;background:#ffffff;border:1px solid #dde1e4;border-radius:6px;padding:24px">
<p style="margin:0 0 18px;font-weight:600">Quorum · ${escapeHtml(facility)}</p>
${p}
${button}
<p style="margin:24px 0 0;font-size:12px;color:#5c6670">Quorum is research software for rating fMRI components; it is not for clinical use.</p>
</div></body></html>`;
}

export function textFooter(facility: string): string {
  return `\n--\nQuorum · ${facility}\nResearch software for rating fMRI components; not for clinical use.\n`;
}
