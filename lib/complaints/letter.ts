import { escapeHtml } from '../mail/templates/layout';

/*
 * The answer to a complainant: a first draft filled with the record's facts (number, product, lot,
 * what they reported, what was found), which QA then edits in the rich-text editor, and the e-mail
 * that carries the final letter. Pure: the page, the seed and the tests build the same letter.
 */

export interface LetterFacts {
  siteName: string;
  number: string;
  complainantName: string;
  receivedOn: string;
  product: string | null;
  lot: string | null;
  reported: string;
  /** The investigation summary, or the reason no investigation was needed. */
  found: string | null;
  signerName: string;
  signerTitle: string;
}

const paragraph = (text: string) => `<p>${escapeHtml(text)}</p>`;

export function draftLetterHtml(f: LetterFacts): string {
  const about = f.product ? `${f.product}${f.lot ? `, lot ${f.lot}` : ''}` : 'our product';
  const found = f.found?.trim()
    ? `What we found: ${f.found.trim()}`
    : 'What we found: [describe what the review of the retained samples and the batch record showed].';
  return [
    paragraph(`Dear ${f.complainantName},`),
    paragraph(`Thank you for contacting ${f.siteName} on ${f.receivedOn} about ${about}. We recorded your report under reference ${f.number}.`),
    paragraph(`You told us: ${f.reported.trim()}`),
    paragraph(found),
    paragraph('[Say what we are doing about it and, where it applies, what the customer should do with the product they still hold.]'),
    paragraph('If you have any question about this answer, please reply quoting the reference above.'),
    paragraph('Yours sincerely,'),
    paragraph(`${f.signerName}, ${f.signerTitle}, ${f.siteName}`),
  ].join('\n');
}

/** Text the editor template leaves for the writer to replace; a letter still holding one is not sent. */
export const placeholderPattern = /\[(?:describe|say) [^\]]*\]/i;

export interface ResponseMail {
  subject: string;
  text: string;
  html: string;
}

/** The e-mail carrying the letter: the cleaned letter HTML and its plain-text form, nothing else. */
export function responseMail(input: { siteName: string; number: string; letterHtml: string; letterText: string }): ResponseMail {
  return {
    subject: `Your report to ${input.siteName} (reference ${input.number})`,
    text: `${input.letterText}\n`,
    html: `<!doctype html><html><body style="font-family: sans-serif; line-height: 1.5; max-width: 40rem">${input.letterHtml}</body></html>`,
  };
}

/** A contact that is an e-mail address (the only kind the outbox can send to). */
export function isEmailAddress(contact: string | null): boolean {
  return contact !== null && /^[^\s@<>()",;:]+@[^\s@<>()",;:]+\.[A-Za-z]{2,}$/.test(contact.trim());
}
