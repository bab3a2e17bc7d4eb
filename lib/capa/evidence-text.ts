import { cleanRichTextForSaving, richTextToPlainText } from '../rich-text/sanitize';

/*
 * Evidence of completion of a CAPA action: rich text from the editor, cleaned before it is saved
 * and shown. Pure: used by the command on the server and by the pages to show it.
 */

/** At least a short sentence of readable text: "done" proves nothing (21 CFR 820.100(a)(7)). */
export const evidenceMinChars = 10;

/**
 * capa_actions.evidence and the audit entry that carries it whole (21 CFR 11.10(e)) are TEXT columns
 * (65,535 bytes); the audit entry holds the text JSON-escaped beside the other changed fields, so the
 * saved evidence stays well under half of that.
 */
export const evidenceMaxBytes = 30_000;

export const evidenceEmptyMessage = `Describe the evidence that the action was done (${evidenceMinChars} characters at least).`;
export const evidenceTooLongMessage = `The evidence is too long for the record (over ${evidenceMaxBytes.toLocaleString('en-US')} characters of formatted text). Attach longer documents as files in the Evidence section.`;

export type CleanedEvidence = { ok: true; html: string } | { ok: false; message: string };

/** The evidence as it will be saved: allow-listed HTML, not empty, not longer than the record holds. */
export function cleanEvidence(raw: string): CleanedEvidence {
  const cleaned = cleanRichTextForSaving(raw);
  if (!cleaned.ok) return { ok: false, message: evidenceTooLongMessage };
  if (cleaned.empty || richTextToPlainText(cleaned.html).length < evidenceMinChars) return { ok: false, message: evidenceEmptyMessage };
  if (new TextEncoder().encode(cleaned.html).length > evidenceMaxBytes) return { ok: false, message: evidenceTooLongMessage };
  return { ok: true, html: cleaned.html };
}

const startsWithBlock = /^\s*<(?:p|h[1-6]|ul|ol|table|blockquote|pre|hr|div)\b/i;

/**
 * Evidence written before it was rich text is plain text with line breaks. It becomes one paragraph
 * per line, and angle brackets in it stay text ("pressure < 9 inHg"). Entities are left alone: text
 * saved through cleanRichTextForSaving already holds "&lt;", and the view's sanitiser encodes a bare "&".
 */
export function evidenceAsHtml(stored: string): string {
  if (startsWithBlock.test(stored)) return stored;
  return stored
    .split(/\r?\n/)
    .map((line) => line.trim())
    .filter((line) => line !== '')
    .map((line) => `<p>${line.replace(/</g, '&lt;').replace(/>/g, '&gt;')}</p>`)
    .join('');
}
