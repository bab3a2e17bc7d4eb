import 'server-only';
import { createHash, randomUUID } from 'node:crypto';
import type { Readable } from 'node:stream';
import { Client } from 'minio';
import type { DbOrTx } from '../../db/client';
import { attachments } from '../../db/schema';
import type { FieldChange } from '../audit';
import { getEnv } from '../env';
import { ValidationError } from '../errors';
import type { RecordType } from '../records/types';

/*
 * Attachments live in S3-compatible object storage (MinIO in production, a local fake in
 * development), addressed by key; the database keeps the key, the size and the SHA-256 so a file
 * can be checked against what was uploaded (ALCOA+: original and accurate).
 */

/** Uploads stay in one PUT: above this the SDK switches to multipart upload. */
export const maxObjectBytes = 64 * 1024 * 1024;

const g = globalThis as unknown as { __plumblineStorage?: Client };

export function getStorageClient(): Client {
  if (!g.__plumblineStorage) {
    const env = getEnv();
    g.__plumblineStorage = new Client({
      endPoint: env.S3_ENDPOINT,
      port: env.S3_PORT,
      useSSL: env.S3_USE_SSL,
      accessKey: env.S3_ACCESS_KEY,
      secretKey: env.S3_SECRET_KEY,
      region: env.S3_REGION,
      pathStyle: true,
    });
  }
  return g.__plumblineStorage;
}

const bucket = () => getEnv().S3_BUCKET;

export async function ensureBucket(): Promise<void> {
  const client = getStorageClient();
  if (!(await client.bucketExists(bucket()))) await client.makeBucket(bucket(), getEnv().S3_REGION);
}

/** A fresh key under the record it belongs to; the file name stays in the database only. */
export function newAttachmentKey(recordType: RecordType, recordId: number): string {
  return `${recordType}/${recordId}/${randomUUID()}`;
}

export interface StoredObject {
  key: string;
  sizeBytes: number;
  sha256: string;
}

export async function putAttachmentObject(input: { key: string; buffer: Buffer; contentType: string }): Promise<StoredObject> {
  const sizeBytes = input.buffer.length;
  if (sizeBytes > maxObjectBytes) {
    const message = `The file is ${(sizeBytes / 1024 / 1024).toFixed(1)} MiB; files up to 64 MiB can be attached.`;
    throw new ValidationError(message, { file: [message] });
  }
  const sha256 = createHash('sha256').update(input.buffer).digest('hex');
  await getStorageClient().putObject(bucket(), input.key, input.buffer, sizeBytes, {
    'Content-Type': input.contentType,
    'X-Amz-Meta-Sha256': sha256,
  });
  return { key: input.key, sizeBytes, sha256 };
}

export function getObjectStream(key: string): Promise<Readable> {
  return getStorageClient().getObject(bucket(), key);
}

/** A time-limited download link, e.g. for a browser; the file name offered is the original one. */
export function presignedGetUrl(key: string, seconds: number, downloadName?: string): Promise<string> {
  const headers = downloadName
    ? { 'response-content-disposition': `attachment; filename*=UTF-8''${encodeURIComponent(downloadName)}` }
    : undefined;
  return getStorageClient().presignedGetObject(bucket(), key, seconds, headers);
}

export interface ObjectInfo {
  sizeBytes: number;
  contentType: string | null;
  /** The SHA-256 recorded as object metadata at upload, when the store kept it. */
  sha256: string | null;
  lastModified: Date;
}

export async function statObject(key: string): Promise<ObjectInfo> {
  const stat = await getStorageClient().statObject(bucket(), key);
  const meta = Object.fromEntries(Object.entries(stat.metaData ?? {}).map(([k, v]) => [k.toLowerCase(), v]));
  return {
    sizeBytes: stat.size,
    contentType: typeof meta['content-type'] === 'string' ? meta['content-type'] : null,
    sha256: typeof meta['sha256'] === 'string' ? meta['sha256'] : null,
    lastModified: stat.lastModified,
  };
}

export interface AttachmentInput {
  recordType: RecordType;
  recordId: number;
  key: string;
  fileName: string;
  contentType: string;
  sizeBytes: number;
  sha256: string;
  uploadedBy: number;
}

/**
 * Records an uploaded object against a record inside the caller's transaction, and returns the
 * audit change to record with it. The caller is the record's write path (lib/attachments), which
 * has checked that the actor may add evidence to it now.
 */
export async function recordAttachment(tx: DbOrTx, input: AttachmentInput): Promise<{ id: number; change: FieldChange }> {
  const [row] = await tx
    .insert(attachments)
    .values({
      recordType: input.recordType,
      recordId: input.recordId,
      objectKey: input.key,
      fileName: input.fileName,
      contentType: input.contentType,
      sizeBytes: input.sizeBytes,
      sha256: input.sha256,
      uploadedBy: input.uploadedBy,
    })
    .$returningId();
  return {
    id: row!.id,
    change: {
      field: 'attachment',
      from: null,
      to: { id: row!.id, fileName: input.fileName, contentType: input.contentType, sizeBytes: input.sizeBytes, sha256: input.sha256 },
    },
  };
}
