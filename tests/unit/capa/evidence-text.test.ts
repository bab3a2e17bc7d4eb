import { describe, expect, it } from 'vitest';
import { cleanEvidence, evidenceAsHtml, evidenceEmptyMessage, evidenceMaxBytes, evidenceTooLongMessage } from '@/lib/capa/evidence-text';
import { sanitizeRichText } from '@/lib/rich-text/sanitize';

/*
 * Evidence of completion of a CAPA action as rich text. 21 CFR 820.100(a)(7): the actions and their
 * results are documented, so an empty "done" is refused; the stored text is what the audit entry
 * carries whole (21 CFR 11.10(e)), so it must fit the record. Script is dropped because the text is
 * shown to other people (OWASP XSS prevention, common practice).
 */

describe('cleaning evidence before it is saved', () => {
  it('keeps the formatting the editor makes and drops script with its content', () => {
    const out = cleanEvidence('<p>Procedure <strong>SOP-FIL-007</strong> rev 8</p><script>alert(1)</script><ul><li>trained 9</li></ul>');
    expect(out).toEqual({ ok: true, html: '<p>Procedure <strong>SOP-FIL-007</strong> rev 8</p><ul><li>trained 9</li></ul>' });
  });

  it('refuses an empty editor, whitespace, or markup with no readable text (21 CFR 820.100(a)(7))', () => {
    for (const raw of ['', '   ', '<p></p>', '<p> </p><script>alert("a long enough script")</script>', '<img src=x onerror=alert(1)>']) {
      expect(cleanEvidence(raw)).toEqual({ ok: false, message: evidenceEmptyMessage });
    }
  });

  it('refuses fewer than 10 readable characters, accepts 10 (common practice: a word is not evidence)', () => {
    expect(cleanEvidence('<p>Done ok.</p>')).toEqual({ ok: false, message: evidenceEmptyMessage });
    expect(cleanEvidence('<p>Done: WO-1</p>')).toMatchObject({ ok: true });
  });

  it('refuses text longer than the record and its audit entry hold (21 CFR 11.10(e))', () => {
    const fits = `<p>${'a'.repeat(evidenceMaxBytes - 7)}</p>`;
    expect(cleanEvidence(fits)).toEqual({ ok: true, html: fits });
    expect(cleanEvidence(`<p>${'a'.repeat(evidenceMaxBytes - 6)}</p>`)).toEqual({ ok: false, message: evidenceTooLongMessage });
    // Counted in bytes: four-byte characters fill the column four times as fast.
    expect(cleanEvidence(`<p>${'😀'.repeat(evidenceMaxBytes / 4)}</p>`)).toEqual({ ok: false, message: evidenceTooLongMessage });
  });

  it('keeps plain text from a JSON client as text', () => {
    expect(cleanEvidence('Ring retired; new ring fitted and checked.')).toEqual({ ok: true, html: 'Ring retired; new ring fitted and checked.' });
  });
});

describe('showing evidence', () => {
  it('passes saved rich text through unchanged', () => {
    const html = '<p>Checked</p><table><tbody><tr><td>BWR-0104</td></tr></tbody></table>';
    expect(evidenceAsHtml(html)).toBe(html);
  });

  it('shows plain text written before rich text as one paragraph per line', () => {
    expect(evidenceAsHtml('Procedure revised.\n\nTraining records signed.\r\n')).toBe('<p>Procedure revised.</p><p>Training records signed.</p>');
  });

  it('keeps angle brackets in plain text as text, and entities as they were saved', () => {
    expect(sanitizeRichText(evidenceAsHtml('Vacuum < 9 inHg; <b>not bold</b>'))).toBe('<p>Vacuum &lt; 9 inHg; &lt;b&gt;not bold&lt;/b&gt;</p>');
    expect(sanitizeRichText(evidenceAsHtml('Vacuum &lt; 9 inHg & R&D'))).toBe('<p>Vacuum &lt; 9 inHg &amp; R&amp;D</p>');
  });
});
