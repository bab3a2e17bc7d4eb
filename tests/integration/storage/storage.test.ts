import { createHash, randomUUID } from 'node:crypto';
import type { Readable } from 'node:stream';
import { and, desc, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/db/client';
import { attachments, auditEntries, users } from '@/db/schema';
import { verifyAuditChain } from '@/lib/audit';
import { ValidationError } from '@/lib/errors';
import {
  ensureBucket,
  getObjectStream,
  getStorageClient,
  maxObjectBytes,
  newAttachmentKey,
  presignedGetUrl,
  putAttachmentObject,
  recordAttachment,
  statObject,
} from '@/lib/storage';
import { getEnv } from '@/lib/env';

/*
 * Object storage through the MinIO SDK against the S3-compatible fake that `npm test` starts. The
 * checksum is what lets a stored file be shown to be the original (ALCOA+ "original", 21 CFR 11.10(a)
 * "ability to discern invalid or altered records").
 */

const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');

async function readAll(stream: Readable): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks);
}

/** Deterministic, non-repeating bytes, so a truncated or shifted read cannot match by chance. */
function sampleBytes(size: number): Buffer {
  const out = Buffer.alloc(size);
  let x = 0x2545f491;
  for (let i = 0; i < size; i++) {
    x ^= x << 13;
    x ^= x >>> 17;
    x ^= x << 5;
    out[i] = x & 0xff;
  }
  return out;
}

const created: string[] = [];

beforeAll(async () => {
  await ensureBucket();
});

afterAll(async () => {
  for (const key of created) await getStorageClient().removeObject(getEnv().S3_BUCKET, key);
  await closeDb();
});

describe('object storage', () => {
  it('stores an object and reads back the same bytes, SHA-256 and size', async () => {
    const body = sampleBytes(300_000);
    const key = newAttachmentKey('deviation', 42);
    created.push(key);
    const stored = await putAttachmentObject({ key, buffer: body, contentType: 'image/jpeg' });
    expect(stored).toEqual({ key, sizeBytes: body.length, sha256: sha256(body) });

    const back = await readAll(await getObjectStream(key));
    expect(back.length).toBe(body.length);
    expect(sha256(back)).toBe(stored.sha256);

    const info = await statObject(key);
    expect(info.sizeBytes).toBe(body.length);
    expect(info.contentType).toBe('image/jpeg');
    expect(info.sha256).toBe(stored.sha256);
  });

  it('is idempotent about the bucket', async () => {
    await ensureBucket();
    await ensureBucket();
    expect(await getStorageClient().bucketExists(getEnv().S3_BUCKET)).toBe(true);
  });

  it('hands out a presigned link that downloads the object without credentials', async () => {
    const body = Buffer.from('weight check printout, batch BW-2026-0702-A\n');
    const key = newAttachmentKey('batch', 3);
    created.push(key);
    await putAttachmentObject({ key, buffer: body, contentType: 'text/plain' });
    const url = await presignedGetUrl(key, 60, 'weights BW-2026-0702-A.txt');
    const res = await fetch(url);
    expect(res.status).toBe(200);
    expect(Buffer.from(await res.arrayBuffer()).equals(body)).toBe(true);
    expect(res.headers.get('content-disposition')).toContain('weights%20BW-2026-0702-A.txt');
  });

  it('refuses a file over 64 MiB before uploading anything', async () => {
    const key = newAttachmentKey('deviation', 43);
    const tooBig = Buffer.alloc(maxObjectBytes + 1);
    const err = await putAttachmentObject({ key, buffer: tooBig, contentType: 'application/pdf' }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ValidationError);
    expect((err as ValidationError).message).toMatch(/64 MiB/);
    expect((err as ValidationError).fieldErrors.file?.length).toBe(1);
    await expect(statObject(key)).rejects.toThrow();
  });

  it('accepts exactly 64 MiB in one upload', async () => {
    const key = newAttachmentKey('deviation', 44);
    created.push(key);
    const body = Buffer.alloc(maxObjectBytes, 7);
    const stored = await putAttachmentObject({ key, buffer: body, contentType: 'application/octet-stream' });
    expect((await statObject(key)).sizeBytes).toBe(maxObjectBytes);
    expect(stored.sha256).toBe(sha256(body));
  }, 60_000);
});

describe('recordAttachment', () => {
  it('records the attachment row in the caller\'s transaction and names the audit change for the write path (21 CFR 11.10(e))', async () => {
    const email = `attach-${randomUUID()}@brackwater.example`;
    const [u] = await db.insert(users).values({ email, name: 'Attachment Tester', role: 'operator', passwordHash: 'x' }).$returningId();
    const actor = { id: u!.id, name: 'Attachment Tester' };
    const body = sampleBytes(1_000);
    const key = newAttachmentKey('deviation', 77);
    created.push(key);
    const stored = await putAttachmentObject({ key, buffer: body, contentType: 'image/png' });

    const { id, change } = await db.transaction((tx) =>
      recordAttachment(tx, {
        recordType: 'deviation',
        recordId: 77,
        key,
        fileName: 'ring BWR-0302 dent.png',
        contentType: 'image/png',
        sizeBytes: stored.sizeBytes,
        sha256: stored.sha256,
        uploadedBy: actor.id,
      }),
    );
    const [row] = await db.select().from(attachments).where(eq(attachments.id, id));
    expect(row).toMatchObject({ recordType: 'deviation', recordId: 77, objectKey: key, sizeBytes: 1_000, sha256: stored.sha256, uploadedBy: actor.id });
    // The record's write path puts this change in the record's own audit entry (tests/integration/attachments).
    expect(change).toEqual({
      field: 'attachment',
      from: null,
      to: { id, fileName: 'ring BWR-0302 dent.png', contentType: 'image/png', sizeBytes: 1_000, sha256: stored.sha256 },
    });
  });

  it('leaves no row when the transaction rolls back', async () => {
    const [u] = await db.insert(users).values({ email: `attach-${randomUUID()}@brackwater.example`, name: 'Rollback Tester', role: 'operator', passwordHash: 'x' }).$returningId();
    const key = newAttachmentKey('deviation', 78);
    await expect(
      db.transaction(async (tx) => {
        await recordAttachment(tx, { recordType: 'deviation', recordId: 78, key, fileName: 'a.png', contentType: 'image/png', sizeBytes: 1, sha256: 'a'.repeat(64), uploadedBy: u!.id });
        throw new Error('the deviation update failed');
      }),
    ).rejects.toThrow('the deviation update failed');
    expect(await db.select().from(attachments).where(eq(attachments.objectKey, key))).toEqual([]);
  });
});
