/*
 * What evidence may be: the accepted kinds of file and the size limit. Pure and free of Node APIs,
 * so the upload widget can warn before sending and the server decides with the same numbers.
 */

/** 25 MiB. A phone photo is 2–8 MB and a scanned batch record page well under that. */
export const maxAttachmentBytes = 25 * 1024 * 1024;

/** Room for the multipart boundary and headers around the one file in an upload request. */
export const multipartOverheadBytes = 64 * 1024;

export const acceptedTypes = {
  'image/jpeg': 'JPEG image',
  'image/png': 'PNG image',
  'image/webp': 'WebP image',
  'image/heic': 'HEIC photo',
  'image/heif': 'HEIF photo',
  'application/pdf': 'PDF document',
  'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet': 'Excel workbook (.xlsx)',
  'text/csv': 'CSV table',
  'text/plain': 'Plain text',
} as const;
export type AcceptedType = keyof typeof acceptedTypes;

/** Browsers show these inline; HEIC/HEIF mostly do not, so they are offered as downloads only. */
const previewable = new Set<string>(['image/jpeg', 'image/png', 'image/webp']);

export function isPreviewable(contentType: string): boolean {
  return previewable.has(contentType);
}

export function typeLabel(contentType: string): string {
  return (acceptedTypes as Record<string, string>)[contentType] ?? contentType;
}

/** For the file picker's `accept`: a hint to the browser only; the server checks the content. */
export const acceptHint: Record<string, string[]> = {
  'image/*': ['.jpg', '.jpeg', '.png', '.webp', '.heic', '.heif'],
  'application/pdf': ['.pdf'],
  'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet': ['.xlsx'],
  'text/csv': ['.csv'],
  'text/plain': ['.txt'],
};

export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} KB`;
  return `${(bytes / 1024 / 1024).toFixed(1)} MB`;
}

export const tooLargeMessage = (bytes: number | null) =>
  `The file is too large${bytes === null ? '' : ` (${formatBytes(bytes)})`}: files up to 25 MB can be attached. Take a smaller photo or split the document.`;
