import { describe, expect, it } from 'vitest';
import { draftLetterHtml, isEmailAddress, placeholderPattern, responseMail } from '@/lib/complaints/letter';

/*
 * The answer to the complainant. 21 CFR 211.198(b)(3) keeps the reply with the complaint file; what
 * the first draft says is common practice (thank them, quote the reference, what they reported, what
 * was found, what we do).
 */

const facts = {
  siteName: 'Brackwater Capsule Co.',
  number: 'CMP-2026-0042',
  complainantName: 'Ottilie <Fernsby>',
  receivedOn: '2026-11-13',
  product: 'Magnesium Glycinate 500 mg',
  lot: 'BW-2026-1012-A',
  reported: 'Three capsules were empty.',
  found: null,
  signerName: 'Idris Vantongeren',
  signerTitle: 'QA Investigator',
};

describe('the first draft of the letter', () => {
  it('fills in the record’s facts, escaped as text (common practice)', () => {
    const html = draftLetterHtml(facts);
    for (const fact of ['CMP-2026-0042', 'Magnesium Glycinate 500 mg, lot BW-2026-1012-A', 'Three capsules were empty.', '2026-11-13', 'Idris Vantongeren']) {
      expect(html).toContain(fact);
    }
    expect(html).toContain('Dear Ottilie &lt;Fernsby&gt;,');
    expect(html).not.toContain('<Fernsby>');
  });

  it('leaves bracketed notes where the writer must say what was found and done, so an unfinished letter is caught', () => {
    expect(placeholderPattern.test(draftLetterHtml(facts))).toBe(true);
    expect(placeholderPattern.test(draftLetterHtml({ ...facts, found: 'A blocked dosing bore.' }).replace(/\[Say[^\]]*\]/, 'We cleaned it.'))).toBe(false);
  });
});

describe('sending', () => {
  it('sends only to an e-mail address', () => {
    expect(isEmailAddress('ottilie@customers.example')).toBe(true);
    expect(isEmailAddress(' ottilie@customers.example ')).toBe(true);
    for (const c of ['+1 555 0100', '12 Harbour Lane, Brackwater', 'ottilie@', null]) expect(isEmailAddress(c)).toBe(false);
  });

  it('carries the letter and its plain text, with the reference in the subject', () => {
    const mail = responseMail({ siteName: 'Brackwater Capsule Co.', number: 'CMP-2026-0042', letterHtml: '<p>Dear Ottilie,</p>', letterText: 'Dear Ottilie,' });
    expect(mail.subject).toContain('CMP-2026-0042');
    expect(mail.html).toContain('<p>Dear Ottilie,</p>');
    expect(mail.text).toBe('Dear Ottilie,\n');
  });
});
