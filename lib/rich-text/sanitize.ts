import sanitizeHtml from 'sanitize-html';

/*
 * Rich text (investigation reports now; CAPA and complaint texts later) is stored as HTML and shown
 * to other people, so it is cleaned on the server before it is saved and again before it is shown.
 * The allow-list is what the editor can produce and nothing more: anything the editor cannot make
 * (script, style, event handlers, frames, images, forms, javascript: links) can only come from a
 * crafted request and is dropped. Pure: no I/O, safe to import anywhere.
 */

/** The longest report kept, counted after cleaning (a long report is ~20,000 characters). */
export const richTextMaxLength = 200_000;

export const richTextTooLongMessage = `The text is too long (over ${richTextMaxLength.toLocaleString('en-US')} characters of formatted text). Attach long documents as evidence instead.`;

/** A cell span outside 1-100 is either a mistake or an attempt to blow up the layout. */
const cellSpans: sanitizeHtml.Transformer = (tagName, attribs) => {
  const out: sanitizeHtml.Attributes = {};
  for (const span of ['colspan', 'rowspan'] as const) {
    const v = attribs[span];
    if (v !== undefined && /^(?:[1-9]\d?|100)$/.test(v)) out[span] = v;
  }
  return { tagName, attribs: out };
};

const options: sanitizeHtml.IOptions = {
  allowedTags: [
    'p',
    'h2',
    'h3',
    'h4',
    'strong',
    'em',
    'u',
    's',
    'code',
    'pre',
    'blockquote',
    'ul',
    'ol',
    'li',
    'a',
    'table',
    'colgroup',
    'col',
    'thead',
    'tbody',
    'tr',
    'th',
    'td',
    'hr',
    'br',
  ],
  allowedAttributes: {
    a: ['href', 'rel', 'target'],
    th: ['colspan', 'rowspan'],
    td: ['colspan', 'rowspan'],
    ol: ['start'],
  },
  allowedSchemes: ['http', 'https', 'mailto'],
  allowedSchemesByTag: {},
  allowedSchemesAppliedToAttributes: ['href'],
  // "//host/path" would inherit the page's scheme and lead off-site without saying so.
  allowProtocolRelative: false,
  // Dropped with their content: their text is code or styling, never part of the report.
  nonTextTags: ['script', 'style', 'textarea', 'option', 'noscript', 'iframe', 'object', 'embed', 'svg', 'math', 'template', 'title'],
  disallowedTagsMode: 'discard',
  transformTags: {
    // Editor headings start at h2 (the page owns h1); older or pasted h1 keeps its weight as h2.
    h1: 'h2',
    h5: 'h4',
    h6: 'h4',
    b: 'strong',
    i: 'em',
    strike: 's',
    del: 's',
    a: (tagName, attribs) => {
      const out: sanitizeHtml.Attributes = { rel: 'noopener noreferrer', target: '_blank' };
      if (attribs.href !== undefined) out.href = attribs.href;
      return { tagName, attribs: out };
    },
    th: cellSpans,
    td: cellSpans,
  },
  selfClosing: ['br', 'hr', 'col'],
};

/** The allow-listed HTML, without length check (for showing text already stored). */
export function sanitizeRichText(html: string): string {
  const clean = sanitizeHtml(html, options);
  // A link whose href was refused (javascript:, data:, ...) stays as plain text inside an <a> without href.
  return clean.replace(/<a rel="noopener noreferrer" target="_blank">([\s\S]*?)<\/a>/g, '$1');
}

export type RichTextResult = { ok: true; html: string; empty: boolean } | { ok: false; message: string };

/** Cleans text for saving: the cleaned HTML, whether anything readable is left, or why it is refused. */
export function cleanRichTextForSaving(html: string): RichTextResult {
  const clean = sanitizeRichText(html);
  if (clean.length > richTextMaxLength) return { ok: false, message: richTextTooLongMessage };
  return { ok: true, html: clean, empty: isRichTextEmpty(clean) };
}

/** Nothing a reader would see: no text, no table, no rule (an editor left empty writes "<p></p>"). */
export function isRichTextEmpty(html: string): boolean {
  return richTextToPlainText(html) === '' && !/<(?:table|hr)\b/i.test(html);
}

const entities: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', '#39': "'", apos: "'", nbsp: ' ' };

/**
 * Plain text for previews, lists and e-mail: block elements become line breaks, list items get a
 * dash, table cells a tab. Never HTML: the result is for text contexts (or to be escaped).
 */
export function richTextToPlainText(html: string): string {
  const text = sanitizeHtml(
    html
      .replace(/<\/p>\s*(<\/(?:li|td|th)>)/gi, '$1')
      .replace(/<li\b[^>]*>/gi, '\n- ')
      .replace(/<\/(?:p|h[1-6]|blockquote|pre|tr|ul|ol|table)>/gi, '\n')
      .replace(/<br\s*\/?>/gi, '\n')
      .replace(/<\/t[dh]>/gi, '\t'),
    { allowedTags: [], allowedAttributes: {}, nonTextTags: ['script', 'style', 'textarea', 'option', 'noscript', 'iframe', 'template', 'title'] },
  );
  return text
    .replace(/&(amp|lt|gt|quot|#39|apos|nbsp);/g, (_m, e: string) => entities[e] ?? '')
    .replace(/[ \t]+\n/g, '\n')
    .replace(/\n{3,}/g, '\n\n')
    .trim();
}
