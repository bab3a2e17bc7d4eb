import { fileTypeFromBuffer } from 'file-type';
import { FileTooLargeError, FileTypeRefusedError } from './errors';
import { type AcceptedType, maxAttachmentBytes } from './limits';

/*
 * Deciding what a file really is from its bytes, never from its name (a renamed program or web page
 * must not pass as a PDF). Binary formats are recognised by their magic numbers through file-type;
 * text has none, so CSV and plain text are recognised by content: valid UTF-8, no NUL bytes, and
 * for CSV the same number of delimited fields on every sampled line (common practice, the way
 * spreadsheet importers sniff a delimiter). Markup (HTML, SVG, XML) is refused even though it is
 * text: a browser may run the scripts it carries.
 */

export type Detection = { ok: true; contentType: AcceptedType } | { ok: false; reason: string };

const binaryAccepted = new Set<string>([
  'image/jpeg',
  'image/png',
  'image/webp',
  'image/heic',
  'image/heif',
  'application/pdf',
  'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
]);

/** Plain words for what a refused file turned out to be. */
const knownRefusals: Record<string, string> = {
  exe: 'a Windows program (.exe)',
  elf: 'a Linux program',
  macho: 'a macOS program',
  cfb: 'an older Office file (.xls or .doc); save it as .xlsx or PDF',
  zip: 'a ZIP archive',
  docx: 'a Word document',
  pptx: 'a PowerPoint presentation',
  xml: 'an XML document',
  gif: 'a GIF image; take a photo or save it as PNG',
  msi: 'a Windows installer',
};

function describeBinary(ext: string, mime: string): string {
  return knownRefusals[ext] ?? `a ${ext.toUpperCase()} file (${mime})`;
}

/** Anywhere in the text: a table with a script tag in a cell is still refused. */
const markup: { pattern: RegExp; what: string }[] = [
  { pattern: /<svg[\s>]/i, what: 'an SVG drawing, which can carry scripts' },
  { pattern: /<!doctype\s+html|<html[\s>]|<head[\s>]|<body[\s>]|<script[\s>]|<iframe[\s>]/i, what: 'a web page (HTML)' },
];

/** The most common delimiter layouts of exported tables: comma, semicolon (European locales), tab. */
const delimiters = [',', ';', '\t'] as const;

function fieldCount(line: string, delimiter: string): number {
  let count = 1;
  let quoted = false;
  for (const ch of line) {
    if (ch === '"') quoted = !quoted;
    else if (ch === delimiter && !quoted) count++;
  }
  return count;
}

/** At least two fields and the same count on every sampled non-empty line. */
export function looksLikeCsv(text: string): boolean {
  const lines = text
    .split(/\r\n|\n|\r/)
    .filter((l) => l.trim() !== '')
    .slice(0, 50);
  if (lines.length === 0) return false;
  return delimiters.some((d) => {
    const first = fieldCount(lines[0]!, d);
    return first >= 2 && lines.every((l) => fieldCount(l, d) === first);
  });
}

function detectText(bytes: Uint8Array): Detection {
  if (bytes.includes(0)) return { ok: false, reason: 'an unrecognised binary file' };
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    return { ok: false, reason: 'neither a recognised file type nor UTF-8 text' };
  }
  const start = text.replace(/^\uFEFF/, '').trimStart();
  for (const m of markup) {
    if (m.pattern.test(text)) return { ok: false, reason: m.what };
  }
  if (start.startsWith('<')) return { ok: false, reason: 'a markup document (XML or HTML)' };
  if (start.startsWith('#!')) return { ok: false, reason: 'a script' };
  return { ok: true, contentType: looksLikeCsv(start) ? 'text/csv' : 'text/plain' };
}

export async function detectFileType(bytes: Uint8Array): Promise<Detection> {
  const found = await fileTypeFromBuffer(bytes);
  if (!found) return detectText(bytes);
  if (binaryAccepted.has(found.mime)) return { ok: true, contentType: found.mime as AcceptedType };
  if (found.ext === 'xml') return detectText(bytes);
  return { ok: false, reason: describeBinary(found.ext, found.mime) };
}

export function assertWithinLimit(sizeBytes: number): void {
  if (sizeBytes > maxAttachmentBytes) throw new FileTooLargeError(sizeBytes);
}

const acceptedList = 'photos (JPEG, PNG, WebP, HEIC), PDF, Excel (.xlsx), CSV or plain text';

/**
 * The file's real type, or a refusal naming what it is. The claimed name is used only in the message.
 */
export async function assertAcceptableFile(bytes: Uint8Array, claimedName: string): Promise<AcceptedType> {
  assertWithinLimit(bytes.length);
  if (bytes.length === 0) throw new FileTypeRefusedError(`“${claimedName}” is empty. Pick the file again.`);
  const detected = await detectFileType(bytes);
  if (detected.ok) return detected.contentType;
  throw new FileTypeRefusedError(
    `“${claimedName}” is ${detected.reason}, whatever its name says. Only ${acceptedList} can be attached.`,
  );
}
