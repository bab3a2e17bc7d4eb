import 'server-only';
import type { Readable } from 'node:stream';
import { getEnv } from '../env';
import { getObjectStream, getStorageClient, presignedGetUrl, putAttachmentObject } from '../storage';

/*
 * The few object-storage operations evidence needs, behind one interface so a test can point them
 * at a storage service it stops on purpose. The default goes through lib/storage (MinIO SDK).
 */

export interface AttachmentStore {
  put(input: { key: string; buffer: Buffer; contentType: string }): Promise<void>;
  /** Best effort: removes an object no row points at. */
  remove(key: string): Promise<void>;
  presign(key: string, seconds: number, downloadName: string): Promise<string>;
  stream(key: string): Promise<Readable>;
}

export const defaultAttachmentStore: AttachmentStore = {
  async put(input) {
    await putAttachmentObject(input);
  },
  async remove(key) {
    await getStorageClient().removeObject(getEnv().S3_BUCKET, key);
  },
  presign: (key, seconds, downloadName) => presignedGetUrl(key, seconds, downloadName),
  stream: (key) => getObjectStream(key),
};
