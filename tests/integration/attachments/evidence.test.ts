import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Readable } from 'node:stream';
import { Client } from 'minio';
import { and, asc, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { attachments, auditEntries } from '@/db/schema';
import { uploadAttachment } from '@/lib/attachments/commands';
import { FileTooLargeError, FileTypeRefusedError } from '@/lib/attachments/errors';
import { evidenceStatus, readUploadedFile } from '@/lib/attachments/upload-request';
import { maxAttachmentBytes } from '@/lib/attachments/limits';
import { getDownloadLink, listAttachments, openPreview } from '@/lib/attachments/queries';
import { type AttachmentStore, defaultAttachmentStore } from '@/lib/attachments/store';
import { cancelDeviation, createDraft, submitDeviation } from '@/lib/deviations/commands';
import { getEnv } from '@/lib/env';
import { ForbiddenError, InvalidTransitionError, NotFoundError, ServiceUnavailableError } from '@/lib/errors';
import { ensureBucket, statObject } from '@/lib/storage';
import { startS3Fake } from '@/scripts/services/s3';
import { exe, pdf, tinyPng } from '../../unit/attachments/sample-files';
import { makeUser, testPassword } from '../support/fixtures';

/*
 * Evidence on deviations against MariaDB and the S3-compatible fake (through the MinIO SDK), with the
 * storage settings of the running test stack. Sources: 21 CFR 11.10(e) (audit trail of every
 * change), 21 CFR 11.10(d) and EU GMP Annex 11 §12.1 (access limited to authorised people),
 * ALCOA+ "original" via the SHA-256, 21 CFR 211.180 (records kept: nothing is deleted).
 */

const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');

async function readAll(stream: Readable): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks);
}

const draftInput = {
  title: 'Dented bodies at the outfeed (evidence test)',
  whatHappened: 'Dented capsule bodies seen in the outfeed chute; photos taken on the tablet.',
  occurredAt: new Date(Date.now() - 3_600_000),
  heldBatchIds: [],
};

async function draftOf(role: 'operator' | 'supervisor' = 'operator') {
  const author = await makeUser(role);
  const draft = await createDraft(author, draftInput);
  return { author, record: draft.record };
}

async function reported() {
  const { author, record } = await draftOf();
  const submitted = await submitDeviation(author, { id: record.id, version: record.version });
  return { author, record: submitted.record };
}

const rowsFor = (recordId: number) =>
  db.select().from(attachments).where(and(eq(attachments.recordType, 'deviation'), eq(attachments.recordId, recordId)));

const auditFor = (recordId: number) =>
  db
    .select()
    .from(auditEntries)
    .where(and(eq(auditEntries.recordType, 'deviation'), eq(auditEntries.recordId, recordId), eq(auditEntries.action, 'attachment_added')))
    .orderBy(asc(auditEntries.id));

beforeAll(async () => {
  await ensureBucket();
});
afterAll(closeDb);

describe('uploading evidence', () => {
  it('stores the object, the row and the audit entry; the SHA-256 is that of the bytes sent (21 CFR 11.10(e); ALCOA+ original)', async () => {
    const { author, record } = await draftOf();
    const png = tinyPng();
    const dto = await uploadAttachment(author, { recordType: 'deviation', recordId: record.id, file: { name: 'outfeed dent.png', bytes: png } });

    expect(dto).toMatchObject({ fileName: 'outfeed dent.png', contentType: 'image/png', sizeBytes: png.length, sha256: sha256(png), uploadedByName: author.name });
    expect(dto.previewPath).toBe(`/api/attachments/${dto.id}/preview`);
    const [row] = await rowsFor(record.id);
    expect(row).toMatchObject({ id: dto.id, sha256: sha256(png), uploadedBy: author.id });
    const stored = await statObject(row!.objectKey);
    expect(stored.sizeBytes).toBe(png.length);
    expect(stored.contentType).toBe('image/png');
    const back = await readAll((await openPreview(dto.id, author)).stream);
    expect(sha256(back)).toBe(row!.sha256);

    const [entry] = await auditFor(record.id);
    expect(entry).toMatchObject({ userId: author.id });
    expect(JSON.parse(entry!.changes)).toEqual([
      { field: 'attachment', from: null, to: { id: dto.id, fileName: 'outfeed dent.png', contentType: 'image/png', sizeBytes: png.length, sha256: sha256(png) } },
    ]);
  });

  it('records the type found in the bytes, not the one the name claims', async () => {
    const { author, record } = await draftOf();
    const dto = await uploadAttachment(author, { recordType: 'deviation', recordId: record.id, file: { name: 'C:\\fakepath\\scan.pdf', bytes: tinyPng() } });
    expect(dto).toMatchObject({ fileName: 'scan.pdf', contentType: 'image/png' });
  });

  it('refuses a program renamed to .pdf, stores nothing and says what it is', async () => {
    const { author, record } = await draftOf();
    const err = await uploadAttachment(author, { recordType: 'deviation', recordId: record.id, file: { name: 'weights.pdf', bytes: exe } }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(FileTypeRefusedError);
    expect((err as Error).message).toContain('Windows program');
    expect(await rowsFor(record.id)).toEqual([]);
    expect(evidenceStatus(err)).toBe(415);
  });

  it('an operator cannot attach to, list or download from another operator\'s draft (Annex 11 §12.1)', async () => {
    const { author, record } = await draftOf();
    const other = await makeUser('operator');
    const dto = await uploadAttachment(author, { recordType: 'deviation', recordId: record.id, file: { name: 'a.pdf', bytes: pdf } });
    await expect(uploadAttachment(other, { recordType: 'deviation', recordId: record.id, file: { name: 'b.pdf', bytes: pdf } })).rejects.toBeInstanceOf(NotFoundError);
    await expect(listAttachments('deviation', record.id, other)).rejects.toBeInstanceOf(NotFoundError);
    await expect(getDownloadLink(dto.id, other)).rejects.toBeInstanceOf(NotFoundError);
    // QA cannot see a draft either until it is submitted (same rule as the deviation itself).
    await expect(getDownloadLink(dto.id, await makeUser('qa_investigator'))).rejects.toBeInstanceOf(NotFoundError);
    expect(await rowsFor(record.id)).toHaveLength(1);
  });

  it('on a reported deviation: the author and QA may attach; another operator and the administrator may read but not attach', async () => {
    const { author, record } = await reported();
    const [qa, otherOperator, admin] = await Promise.all([makeUser('qa_investigator'), makeUser('operator'), makeUser('admin')]);
    await uploadAttachment(author, { recordType: 'deviation', recordId: record.id, file: { name: 'line.png', bytes: tinyPng() } });
    await uploadAttachment(qa, { recordType: 'deviation', recordId: record.id, file: { name: 'ipc.pdf', bytes: pdf } });
    await expect(uploadAttachment(otherOperator, { recordType: 'deviation', recordId: record.id, file: { name: 'x.pdf', bytes: pdf } })).rejects.toBeInstanceOf(ForbiddenError);
    await expect(uploadAttachment(admin, { recordType: 'deviation', recordId: record.id, file: { name: 'x.pdf', bytes: pdf } })).rejects.toBeInstanceOf(ForbiddenError);
    expect((await listAttachments('deviation', record.id, otherOperator)).map((a) => a.fileName)).toEqual(['line.png', 'ipc.pdf']);
    expect((await listAttachments('deviation', record.id, admin)).length).toBe(2);
  });

  it('nobody attaches to a cancelled deviation; its evidence stays readable', async () => {
    const { author, record } = await reported();
    const qa = await makeUser('qa_investigator');
    await uploadAttachment(author, { recordType: 'deviation', recordId: record.id, file: { name: 'before.pdf', bytes: pdf } });
    // Adding evidence gives the record a new version (a signature covers the files; a form opened before is stale).
    await cancelDeviation(qa, { id: record.id, version: record.version + 1, reason: 'Duplicate of an earlier report (test).', password: testPassword });
    const err = await uploadAttachment(qa, { recordType: 'deviation', recordId: record.id, file: { name: 'after.pdf', bytes: pdf } }).catch((e: unknown) => e);
    // Closed to everyone by its state, not by who is asking: 409.
    expect(err).toBeInstanceOf(InvalidTransitionError);
    expect((err as Error).message).toMatch(/closed or cancelled/);
    expect((await listAttachments('deviation', record.id, qa)).map((a) => a.fileName)).toEqual(['before.pdf']);
  });

  it('removes the stored object again when the record is closed while the file is on its way', async () => {
    const { author, record } = await reported();
    const qa = await makeUser('qa_investigator');
    let storedKey: string | null = null;
    const racing: AttachmentStore = {
      ...defaultAttachmentStore,
      async put(input) {
        await defaultAttachmentStore.put(input);
        storedKey = input.key;
        await cancelDeviation(qa, { id: record.id, version: record.version, reason: 'Raised in error (test).', password: testPassword });
      },
    };
    await expect(
      uploadAttachment(qa, { recordType: 'deviation', recordId: record.id, file: { name: 'late.pdf', bytes: pdf } }, { store: racing }),
    ).rejects.toBeInstanceOf(InvalidTransitionError);
    expect(storedKey).not.toBeNull();
    await expect(statObject(storedKey!)).rejects.toThrow();
    expect(await rowsFor(record.id)).toEqual([]);
  });
});

describe('download links', () => {
  it('hands out a presigned link valid 5 minutes that downloads the original bytes under the original name', async () => {
    const { author, record } = await reported();
    const dto = await uploadAttachment(author, { recordType: 'deviation', recordId: record.id, file: { name: 'IPC weights 10:00.pdf', bytes: pdf } });
    const reader = await makeUser('supervisor');
    const link = await getDownloadLink(dto.id, reader);
    expect(link.expiresInSeconds).toBe(300);
    expect(new URL(link.url).searchParams.get('X-Amz-Expires')).toBe('300');
    const res = await fetch(link.url);
    expect(res.status).toBe(200);
    expect(sha256(Buffer.from(await res.arrayBuffer()))).toBe(dto.sha256);
    expect(res.headers.get('content-disposition')).toContain(encodeURIComponent('IPC weights 10:00.pdf'));
  });

  it('a link stops working once it has expired (common practice: short-lived links)', async () => {
    const { author, record } = await reported();
    const dto = await uploadAttachment(author, { recordType: 'deviation', recordId: record.id, file: { name: 'short.pdf', bytes: pdf } });
    const link = await getDownloadLink(dto.id, author, { seconds: 1 });
    expect((await fetch(link.url)).status).toBe(200);
    await new Promise((r) => setTimeout(r, 2_100));
    expect((await fetch(link.url)).status).toBe(403);
  });

  it('serves no preview for files a browser should not show inline', async () => {
    const { author, record } = await reported();
    const dto = await uploadAttachment(author, { recordType: 'deviation', recordId: record.id, file: { name: 'a.pdf', bytes: pdf } });
    expect(dto.previewPath).toBeNull();
    await expect(openPreview(dto.id, author)).rejects.toBeInstanceOf(NotFoundError);
  });
});

describe('storage down', () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(path.join(tmpdir(), 'plumbline-s3-down-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('answers "storage is not reachable, nothing was saved" (503) and writes no row when the store stops', async () => {
    // Its own fake on its own port, so stopping it does not disturb the stack's (9100/9102/9110 are taken).
    const bucket = getEnv().S3_BUCKET;
    const fake = await startS3Fake({ port: 9117, dataDir: dir, bucket, allowedOrigins: ['http://localhost:3000'] });
    const client = new Client({ endPoint: fake.endpoint, port: fake.port, useSSL: false, accessKey: fake.accessKey, secretKey: fake.secretKey, region: 'us-east-1', pathStyle: true });
    const store: AttachmentStore = {
      put: async ({ key, buffer, contentType }) => void (await client.putObject(bucket, key, buffer, buffer.length, { 'Content-Type': contentType })),
      remove: (key) => client.removeObject(bucket, key),
      presign: (key, seconds) => client.presignedGetObject(bucket, key, seconds),
      stream: (key) => client.getObject(bucket, key),
    };
    const { author, record } = await draftOf();
    await uploadAttachment(author, { recordType: 'deviation', recordId: record.id, file: { name: 'up.pdf', bytes: pdf } }, { store });
    await fake.stop();

    const err = await uploadAttachment(author, { recordType: 'deviation', recordId: record.id, file: { name: 'down.pdf', bytes: pdf } }, { store }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ServiceUnavailableError);
    expect((err as Error).message).toMatch(/storage is not reachable, so nothing was saved/);
    expect(evidenceStatus(err)).toBe(503);
    expect((await rowsFor(record.id)).map((r) => r.fileName)).toEqual(['up.pdf']);
    expect(await auditFor(record.id)).toHaveLength(1);
  });
});

describe('the upload request', () => {
  const form = (parts: [string, Blob, string][]) => {
    const f = new FormData();
    for (const [name, blob, fileName] of parts) f.append(name, blob, fileName);
    return f;
  };

  it('reads the one file of a multipart/form-data body', async () => {
    const request = new Request('http://localhost/x', { method: 'POST', body: form([['file', new Blob([pdf]), 'w.pdf']]) });
    const file = await readUploadedFile(request);
    expect(file.name).toBe('w.pdf');
    expect(file.bytes.equals(pdf)).toBe(true);
  });

  it('refuses a declared body over the limit before reading it (413)', async () => {
    const request = new Request('http://localhost/x', {
      method: 'POST',
      headers: { 'content-type': 'multipart/form-data; boundary=x', 'content-length': String(maxAttachmentBytes * 2) },
      body: 'x',
    });
    const err = await readUploadedFile(request).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(FileTooLargeError);
    expect(evidenceStatus(err)).toBe(413);
  });

  it('stops a streamed body without a length as soon as it passes the limit', async () => {
    let sent = 0;
    const chunk = new Uint8Array(1024 * 1024);
    const body = new ReadableStream<Uint8Array>({
      pull(controller) {
        sent += chunk.length;
        controller.enqueue(chunk);
        if (sent > 200 * 1024 * 1024) controller.close();
      },
    });
    const request = new Request('http://localhost/x', {
      method: 'POST',
      headers: { 'content-type': 'multipart/form-data; boundary=x' },
      body,
      duplex: 'half',
    } as RequestInit);
    await expect(readUploadedFile(request)).rejects.toBeInstanceOf(FileTooLargeError);
    expect(sent).toBeLessThan(maxAttachmentBytes + 8 * 1024 * 1024);
  });

  it('asks for a file when the field is missing or holds text', async () => {
    const f = new FormData();
    f.append('file', 'not a file');
    await expect(readUploadedFile(new Request('http://localhost/x', { method: 'POST', body: f }))).rejects.toMatchObject({ fieldErrors: { file: ['Choose a file to attach.'] } });
  });
});
