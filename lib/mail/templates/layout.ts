/*
 * The frame every notification shares: site name, the record's number and title, a few paragraphs
 * and one link into the app, as an HTML part and an equivalent plain-text part (many quality
 * mailboxes show text only). Pure: the message templates built on it are testable without I/O.
 */

export interface MailLayoutInput {
  siteName: string;
  /** e.g. "DEV-2026-0042"; shown before the heading and in the text part. */
  recordNumber?: string | null;
  heading: string;
  paragraphs: string[];
  link?: { url: string; label: string } | null;
  /** Small print at the bottom, e.g. why the reader got this message. */
  footer?: string | null;
}

export interface RenderedMail {
  text: string;
  html: string;
}

export function escapeHtml(value: string): string {
  return value
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&#39;');
}

const defaultFooter = 'This is an automatic message. Replies are not read.';

export function renderMailLayout(input: MailLayoutInput): RenderedMail {
  const footer = input.footer ?? defaultFooter;
  const title = input.recordNumber ? `${input.recordNumber}: ${input.heading}` : input.heading;

  const text = [
    input.siteName,
    '',
    title,
    '='.repeat(Math.min(title.length, 72)),
    '',
    ...input.paragraphs.flatMap((p) => [p, '']),
    ...(input.link ? [`${input.link.label}: ${input.link.url}`, ''] : []),
    '-- ',
    footer,
    '',
  ].join('\n');

  const e = escapeHtml;
  const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${e(title)}</title></head>
<body style="margin:0;padding:0;background:#f4f5f7;font-family:Arial,Helvetica,sans-serif;color:#1c2430">
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="background:#f4f5f7"><tr><td align="center" style="padding:24px 12px">
<table role="presentation" width="600" cellpadding="0" cellspacing="0" style="max-width:600px;background:#ffffff;border:1px solid #d9dde3">
<tr><td style="padding:14px 24px;background:#2b3d4f;color:#ffffff;font-size:14px;font-weight:bold">${e(input.siteName)}</td></tr>
<tr><td style="padding:24px">
${input.recordNumber ? `<p style="margin:0 0 4px;font-size:13px;color:#5a6573;font-family:Consolas,monospace">${e(input.recordNumber)}</p>\n` : ''}<h1 style="margin:0 0 16px;font-size:20px;line-height:1.3">${e(input.heading)}</h1>
${input.paragraphs.map((p) => `<p style="margin:0 0 12px;font-size:15px;line-height:1.5">${e(p)}</p>`).join('\n')}
${input.link ? `<p style="margin:20px 0 0"><a href="${e(input.link.url)}" style="display:inline-block;padding:10px 18px;background:#2b5f8a;color:#ffffff;text-decoration:none;font-weight:bold">${e(input.link.label)}</a></p>\n<p style="margin:12px 0 0;font-size:12px;color:#5a6573">Or open: ${e(input.link.url)}</p>` : ''}
</td></tr>
<tr><td style="padding:12px 24px;border-top:1px solid #e3e6ea;font-size:12px;color:#5a6573">${e(footer)}</td></tr>
</table></td></tr></table>
</body></html>
`;
  return { text, html };
}
