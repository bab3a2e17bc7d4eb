import 'server-only';
import { createHash } from 'node:crypto';
import path from 'node:path';
import { db, type Db } from '../../db/client';
import { ForbiddenError, InvalidTransitionError, ServiceUnavailableError, ValidationError } from '../errors';
import { evidenceKinds } from '../record-kinds';
import { editRecord } from '../records/write-path';
import type { RecordActor } from '../records/kind';
import type { RecordType } from '../records/types';
import { newAttachmentKey, recordAttachment } from '../storage';
import { assertAcceptableFile } from './detect';
import type { UploadedAttachmentDto } from './dto';
import { getAttachment } from './queries';
import { getRecordAccess } from './record-access';
import { type AttachmentStore, defaultAttachmentStore } from './store';

/*
 * Adding evidence to a record. The order is chosen so that a refusal costs nothing and a fault
 * leaves nothing half-done: check the person and the record, check the file's real type and size,
 * store the object, then write the row and its audit entry in one transaction that re-checks the
 * record under a lock. If storage fails nothing is written; if the database fails the stored object
 * is removed again (best effort: an orphan object holds no GMP meaning without its row).
 * Evidence is never edited or deleted (21 CFR 211.180; ALCOA+ enduring): there is no command for it.
 */

export interface UploadAttachmentInput {
  recordType: RecordType;
  recordId: number;
  file: { name: string; bytes: Buffer };
}

export const storageDownMessage =
  'File storage is not reachable, so nothing was saved. Try again in a minute; the record and everything you typed are still here.';

/** The name as the person's computer called it, without any folder, control characters or excess length. */
export function cleanFileName(raw: string): string {
  const base = path.posix.basename(raw.replace(/\\/g, '/'));
  const cleaned = base.replace(/[\u0000-\u001f\u007f]/g, '').trim();
  if (cleaned === '' || cleaned === '.' || cleaned === '..') {
    throw new ValidationError('The file has no name. Pick it again.', { file: ['The file has no name. Pick it again.'] });
  }
  if (cleaned.length <= 255) return cleaned;
  const ext = path.extname(cleaned).slice(0, 16);
  return cleaned.slice(0, 255 - ext.length) + ext;
}

/**
 * The record as this person may see it, if they may add evidence to it now; otherwise the same
 * refusal the write path gives under the lock (404 not visible, 403 not theirs, 409 its state).
 */
export async function assertMayAttach(actor: RecordActor, recordType: RecordType, recordId: number, database: Db = db) {
  const access = await getRecordAccess(database, recordType, recordId, actor);
  if (access.attachRefusal) {
    throw access.attachRefusalStatus === 409 ? new InvalidTransitionError(access.attachRefusal) : new ForbiddenError(access.attachRefusal);
  }
  return access;
}

export async function uploadAttachment(
  actor: RecordActor,
  input: UploadAttachmentInput,
  options: { store?: AttachmentStore; database?: Db } = {},
): Promise<UploadedAttachmentDto> {
  const store = options.store ?? defaultAttachmentStore;
  const database = options.database ?? db;
  const fileName = cleanFileName(input.file.name);

  const access = await assertMayAttach(actor, input.recordType, input.recordId, database);
  const contentType = await assertAcceptableFile(input.file.bytes, fileName);
  const sha256 = createHash('sha256').update(input.file.bytes).digest('hex');
  const key = newAttachmentKey(input.recordType, input.recordId);

  try {
    await store.put({ key, buffer: input.file.bytes, contentType });
  } catch (err) {
    console.error('[attachments] storing an object failed', err);
    throw new ServiceUnavailableError(storageDownMessage);
  }

  let id: number;
  let recordVersion: number;
  try {
    // On the record's own write path (its "evidence" section): checked again under the record's lock
    // (it may have been closed while the file was on its way), and the record takes a new version, so
    // a signature over its evidence no longer matches and a form opened before the file arrived is stale.
    const outcome = await editRecord(evidenceKinds[access.recordType].kind, {
      id: input.recordId,
      section: 'evidence',
      actor,
      expectedVersion: null,
      action: 'attachment_added',
      async apply(_row, { tx }) {
        const stored = await recordAttachment(tx, {
          recordType: input.recordType,
          recordId: input.recordId,
          key,
          fileName,
          contentType,
          sizeBytes: input.file.bytes.length,
          sha256,
          uploadedBy: actor.id,
        });
        return { audit: [stored.change], result: stored.id };
      },
    });
    id = outcome.result!;
    recordVersion = (outcome.record as { version: number }).version;
  } catch (err) {
    await store.remove(key).catch((removeErr: unknown) => console.error(`[attachments] orphan object ${key} not removed`, removeErr instanceof Error ? removeErr.message : removeErr));
    throw err;
  }
  return { ...(await getAttachment(id, actor, database)), recordVersion };
}
