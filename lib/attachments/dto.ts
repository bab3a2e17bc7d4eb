import { isPreviewable, typeLabel } from './limits';

/* What the evidence list shows of one file. Pure: shared by the queries and the components. */

export interface AttachmentDto {
  id: number;
  recordType: string;
  recordId: number;
  fileName: string;
  contentType: string;
  typeLabel: string;
  sizeBytes: number;
  /** Hex, computed by the app from the bytes it received and stored (ALCOA+ original). */
  sha256: string;
  uploadedById: number;
  uploadedByName: string;
  /** ISO 8601, UTC. */
  uploadedAt: string;
  /** Goes through a permission check, then redirects to a short-lived link. */
  downloadPath: string;
  /** For images a browser can show; null otherwise. */
  previewPath: string | null;
}

/** What an upload answers: the file, and the version the record has now (adding evidence gives it a new one). */
export interface UploadedAttachmentDto extends AttachmentDto {
  recordVersion: number;
}

export function toAttachmentDto(row: {
  id: number;
  recordType: string;
  recordId: number;
  fileName: string;
  contentType: string;
  sizeBytes: number;
  sha256: string;
  uploadedBy: number;
  uploadedByName: string;
  createdAt: Date;
}): AttachmentDto {
  return {
    id: row.id,
    recordType: row.recordType,
    recordId: row.recordId,
    fileName: row.fileName,
    contentType: row.contentType,
    typeLabel: typeLabel(row.contentType),
    sizeBytes: row.sizeBytes,
    sha256: row.sha256,
    uploadedById: row.uploadedBy,
    uploadedByName: row.uploadedByName,
    uploadedAt: row.createdAt.toISOString(),
    downloadPath: `/api/attachments/${row.id}/download`,
    previewPath: isPreviewable(row.contentType) ? `/api/attachments/${row.id}/preview` : null,
  };
}
