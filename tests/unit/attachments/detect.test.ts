import { describe, expect, it } from 'vitest';
import { assertAcceptableFile, detectFileType, looksLikeCsv } from '@/lib/attachments/detect';
import { FileTooLargeError, FileTypeRefusedError } from '@/lib/attachments/errors';
import { maxAttachmentBytes } from '@/lib/attachments/limits';
import { exe, jpeg, pdf, storedZip, tinyPng, xlsx } from './sample-files';

async function refusal(bytes: Uint8Array, name: string): Promise<FileTypeRefusedError> {
  const err = await assertAcceptableFile(bytes, name).catch((e: unknown) => e);
  expect(err).toBeInstanceOf(FileTypeRefusedError);
  return err as FileTypeRefusedError;
}

describe('accepted evidence, recognised by content', () => {
  it.each([
    ['PNG (ISO/IEC 15948 signature)', tinyPng(), 'photo.png', 'image/png'],
    ['JPEG (ITU-T T.81 SOI marker)', jpeg, 'IMG_0001.jpg', 'image/jpeg'],
    ['PDF (ISO 32000-1 §7.5.2 header)', pdf, 'weights.pdf', 'application/pdf'],
    ['XLSX (ECMA-376 package)', xlsx, 'ipc.xlsx', 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet'],
  ])('accepts %s', async (_what, bytes, name, type) => {
    expect(await assertAcceptableFile(bytes, name)).toBe(type);
  });

  it('goes by the bytes, not the name: a PNG called .pdf is stored as a PNG', async () => {
    expect(await assertAcceptableFile(tinyPng(), 'scan.pdf')).toBe('image/png');
  });

  it('accepts a comma, semicolon or tab separated table as CSV (common practice: delimiter sniffing)', async () => {
    expect(await assertAcceptableFile(Buffer.from('time,mass_mg\n10:00,402.1\n10:05,"399,8"\n'), 'weights.csv')).toBe('text/csv');
    expect(await assertAcceptableFile(Buffer.from('\uFEFFzeit;masse\r\n10:00;402,1\r\n'), 'gewichte.csv')).toBe('text/csv');
    expect(await assertAcceptableFile(Buffer.from('a\tb\tc\n1\t2\t3\n'), 'export.tsv')).toBe('text/csv');
  });

  it('takes text that is not a table as plain text (a balance printout)', async () => {
    expect(await assertAcceptableFile(Buffer.from('BALANCE BW-B07\nNet 402.1 mg\nStable\n'), 'printout.txt')).toBe('text/plain');
  });

  it('tells a table from text with uneven delimiters (common practice)', () => {
    expect(looksLikeCsv('a,b,c\n1,2,3\n')).toBe(true);
    expect(looksLikeCsv('Dear QA, the ring was dented.\nRegards\n')).toBe(false);
    expect(looksLikeCsv('')).toBe(false);
  });
});

describe('refused files, named for what they really are', () => {
  it('refuses a Windows program renamed to .pdf', async () => {
    const err = await refusal(exe, 'batch-record.pdf');
    expect(err.message).toContain('“batch-record.pdf” is a Windows program (.exe)');
    expect(err.fieldErrors.file).toEqual([err.message]);
  });

  it('refuses a Linux program (ELF magic 7F 45 4C 46, System V ABI)', async () => {
    const elf = Buffer.concat([Buffer.from([0x7f, 0x45, 0x4c, 0x46, 2, 1, 1]), Buffer.alloc(120)]);
    expect((await refusal(elf, 'photo.jpg')).message).toContain('a Linux program');
  });

  it('refuses a web page renamed to .pdf: a browser would run its script', async () => {
    const html = Buffer.from('<!DOCTYPE html><html><body><script>fetch("/api/users")</script></body></html>');
    expect((await refusal(html, 'report.pdf')).message).toContain('a web page (HTML)');
  });

  it('refuses SVG, with or without an XML prolog, because it can carry scripts', async () => {
    const bare = Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>');
    const prolog = Buffer.from('<?xml version="1.0"?>\n<svg xmlns="http://www.w3.org/2000/svg" width="4" height="4"/>');
    expect((await refusal(bare, 'dent.png')).message).toContain('SVG');
    expect((await refusal(prolog, 'dent.svg')).message).toContain('SVG');
  });

  it('refuses a table with a script tag hidden in a cell', async () => {
    expect((await refusal(Buffer.from('lot,note\nBW-1,<script>alert(1)</script>\n'), 'x.csv')).message).toContain('web page');
  });

  it('refuses other XML, shell scripts, binary junk and text that is not UTF-8', async () => {
    expect((await refusal(Buffer.from('<?xml version="1.0"?><batch/>'), 'b.xml')).message).toContain('XML');
    expect((await refusal(Buffer.from('#!/bin/sh\necho hi\n'), 'run.csv')).message).toContain('a script');
    expect((await refusal(Buffer.from([1, 2, 0, 4, 5, 6, 7, 8]), 'x.pdf')).message).toContain('unrecognised binary');
    expect((await refusal(Buffer.from('Masse gepr\xfcft\n', 'latin1'), 'x.txt')).message).toContain('UTF-8');
  });

  it('refuses an older Office file and says how to save it instead', async () => {
    const cfb = Buffer.concat([Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]), Buffer.alloc(1024)]);
    expect((await refusal(cfb, 'ipc.xls')).message).toContain('save it as .xlsx or PDF');
  });

  it('refuses an empty file', async () => {
    expect((await refusal(Buffer.alloc(0), 'empty.pdf')).message).toContain('is empty');
  });

  it('reports what it found through detectFileType without throwing', async () => {
    expect(await detectFileType(exe)).toEqual({ ok: false, reason: 'a Windows program (.exe)' });
    expect(await detectFileType(pdf)).toEqual({ ok: true, contentType: 'application/pdf' });
  });
});

describe('the 25 MB limit (26,214,400 bytes)', () => {
  it('is 25 × 1024 × 1024 bytes', () => {
    expect(maxAttachmentBytes).toBe(26_214_400);
  });

  it('accepts a PDF of exactly 26,214,400 bytes and refuses one byte more', async () => {
    const atLimit = Buffer.alloc(maxAttachmentBytes, 0x20);
    pdf.copy(atLimit);
    expect(await assertAcceptableFile(atLimit, 'big.pdf')).toBe('application/pdf');
    const over = Buffer.alloc(maxAttachmentBytes + 1, 0x20);
    pdf.copy(over);
    const err = await assertAcceptableFile(over, 'big.pdf').catch((e: unknown) => e);
    expect(err).toBeInstanceOf(FileTooLargeError);
    expect((err as FileTooLargeError).message).toMatch(/up to 25 MB/);
  });
});

describe('ZIP packages', () => {
  it('refuses a ZIP that is not a spreadsheet (ECMA-376 content types missing)', async () => {
    const err = await assertAcceptableFile(storedZip({ 'notes.txt': 'hello' }), 'ipc.xlsx').catch((e: unknown) => e);
    expect(err).toBeInstanceOf(FileTypeRefusedError);
    expect((err as Error).message).toContain('a ZIP archive');
  });
});
