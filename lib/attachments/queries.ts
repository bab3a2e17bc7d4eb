import 'server-only';
import type { Readable } from 'node:stream';
import { and, asc, eq } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db/client';
import { attachments, users } from '../../db/schema';
import type { Actor } from '../auth/permissions';
import { NotFoundError, ServiceUnavailableError } from '../errors';
import type { RecordType } from '../records/types';
import { type AttachmentDto, toAttachmentDto } from './dto';
import { isPreviewable } from './limits';
import { getRecordAccess } from './record-access';
import { type AttachmentStore, defaultAttachmentStore } from './store';

/*
 * Reading evidence. Whoever may read the record may list, preview and download its files; anyone
 * else is told the file does not exist. Reads are not audited: the audit trail records changes to
 * GMP data (21 CFR 11.10(e)), and a download changes nothing.
 */

/** Five minutes: long enough to start a download on a slow line, short enough that a forwarded link dies. */
export const downloadLinkSeconds = 300;

const columns = {
  id: attachments.id,
  recordType: attachments.recordType,
  recordId: attachments.recordId,
  objectKey: attachments.objectKey,
  fileName: attachments.fileName,
  contentType: attachments.contentType,
  sizeBytes: attachments.sizeBytes,
  sha256: attachments.sha256,
  uploadedBy: attachments.uploadedBy,
  uploadedByName: users.name,
  createdAt: attachments.createdAt,
};

export async function listAttachments(
  recordType: RecordType,
  recordId: number,
  viewer: Actor,
  dbOrTx: DbOrTx = db,
): Promise<AttachmentDto[]> {
  await getRecordAccess(dbOrTx, recordType, recordId, viewer);
  const rows = await dbOrTx
    .select(columns)
    .from(attachments)
    .innerJoin(users, eq(users.id, attachments.uploadedBy))
    .where(and(eq(attachments.recordType, recordType), eq(attachments.recordId, recordId)))
    .orderBy(asc(attachments.id));
  return rows.map(toAttachmentDto);
}

/** The file's row, if the viewer may read the record it belongs to. */
async function readableAttachment(id: number, viewer: Actor, dbOrTx: DbOrTx) {
  const [row] = await dbOrTx
    .select(columns)
    .from(attachments)
    .innerJoin(users, eq(users.id, attachments.uploadedBy))
    .where(eq(attachments.id, id));
  if (!row) throw new NotFoundError('This file');
  try {
    await getRecordAccess(dbOrTx, row.recordType as RecordType, row.recordId, viewer);
  } catch (err) {
    if (err instanceof NotFoundError) throw new NotFoundError('This file');
    throw err;
  }
  return row;
}

export async function getAttachment(id: number, viewer: Actor, dbOrTx: DbOrTx = db): Promise<AttachmentDto> {
  return toAttachmentDto(await readableAttachment(id, viewer, dbOrTx));
}

export interface DownloadLink {
  url: string;
  expiresInSeconds: number;
  fileName: string;
}

/** A presigned GET that offers the original file name; handed out only after the read check. */
export async function getDownloadLink(
  id: number,
  viewer: Actor,
  options: { seconds?: number; store?: AttachmentStore; dbOrTx?: DbOrTx } = {},
): Promise<DownloadLink> {
  const row = await readableAttachment(id, viewer, options.dbOrTx ?? db);
  const seconds = options.seconds ?? downloadLinkSeconds;
  const url = await (options.store ?? defaultAttachmentStore).presign(row.objectKey, seconds, row.fileName);
  return { url, expiresInSeconds: seconds, fileName: row.fileName };
}

export interface PreviewObject {
  stream: Readable;
  contentType: string;
  sizeBytes: number;
  fileName: string;
}

/** The bytes of an image a browser can show, for an <img> on the record's page. */
export async function openPreview(
  id: number,
  viewer: Actor,
  options: { store?: AttachmentStore; dbOrTx?: DbOrTx } = {},
): Promise<PreviewObject> {
  const row = await readableAttachment(id, viewer, options.dbOrTx ?? db);
  if (!isPreviewable(row.contentType)) throw new NotFoundError('A preview of this file');
  let stream: Readable;
  try {
    stream = await (options.store ?? defaultAttachmentStore).stream(row.objectKey);
  } catch (err) {
    console.error('[attachments] preview could not be read from storage', err);
    throw new ServiceUnavailableError('File storage is not reachable, so the preview cannot be shown. Try again in a minute.');
  }
  return { stream, contentType: row.contentType, sizeBytes: row.sizeBytes, fileName: row.fileName };
}

/** Why this viewer may not add evidence to the record now, or null when they may (the command checks again). */
export async function getAttachRefusal(recordType: RecordType, recordId: number, viewer: Actor, dbOrTx: DbOrTx = db): Promise<string | null> {
  return (await getRecordAccess(dbOrTx, recordType, recordId, viewer)).attachRefusal;
}
