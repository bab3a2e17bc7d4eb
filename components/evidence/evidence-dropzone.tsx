'use client';

import { useRouter } from 'next/navigation';
import { useId, useRef, useState } from 'react';
import { useDropzone } from 'react-dropzone';
import type { UploadedAttachmentDto } from '@/lib/attachments/dto';
import { acceptHint, formatBytes, maxAttachmentBytes, tooLargeMessage } from '@/lib/attachments/limits';

/*
 * Adding evidence: drop files, pick them, or on a tablet take a photo with the back camera. Each
 * file is sent on its own (XMLHttpRequest, for upload progress) and gets its own line: progress,
 * done, or why it was refused (too large, wrong type, storage down, connection lost), with a retry.
 * A refused file never touches anything else on the page. The server checks everything again.
 */

type Status = 'uploading' | 'done' | 'failed';

interface Item {
  key: string;
  file: File;
  status: Status;
  progress: number;
  message: string | null;
}

export interface EvidenceDropzoneProps {
  /** POST target taking multipart/form-data with a "file" field, e.g. /api/deviations/42/attachments. */
  uploadUrl: string;
  /** Re-render the server components after each upload (the evidence list on a record page). */
  refreshAfterUpload?: boolean;
  /** Short sentence under the heading. */
  hint?: string;
  onUploaded?: (attachment: UploadedAttachmentDto) => void;
}

const offline = 'The server could not be reached. The file was not attached; try again when the connection is back.';

function send(url: string, file: File, onProgress: (fraction: number) => void): Promise<{ ok: true; data: UploadedAttachmentDto } | { ok: false; message: string }> {
  return new Promise((resolve) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', url);
    xhr.responseType = 'json';
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(e.loaded / e.total);
    };
    xhr.onload = () => {
      const body = xhr.response as (UploadedAttachmentDto & { message?: string }) | null;
      if (xhr.status === 201 && body) resolve({ ok: true, data: body });
      else resolve({ ok: false, message: body?.message ?? `The upload was refused (HTTP ${xhr.status}). Try again.` });
    };
    xhr.onerror = () => resolve({ ok: false, message: offline });
    xhr.ontimeout = () => resolve({ ok: false, message: offline });
    const form = new FormData();
    form.append('file', file, file.name);
    xhr.send(form);
  });
}

export function EvidenceDropzone({ uploadUrl, refreshAfterUpload = false, hint, onUploaded }: EvidenceDropzoneProps) {
  const router = useRouter();
  const [items, setItems] = useState<Item[]>([]);
  const counter = useRef(0);
  const cameraId = useId();
  const listId = useId();

  const update = (key: string, patch: Partial<Item>) => setItems((all) => all.map((i) => (i.key === key ? { ...i, ...patch } : i)));

  async function upload(key: string, file: File) {
    if (file.size > maxAttachmentBytes) {
      update(key, { status: 'failed', message: tooLargeMessage(file.size) });
      return;
    }
    update(key, { status: 'uploading', progress: 0, message: null });
    const result = await send(uploadUrl, file, (progress) => update(key, { progress }));
    if (result.ok) {
      update(key, { status: 'done', progress: 1 });
      onUploaded?.(result.data);
      if (refreshAfterUpload) router.refresh();
    } else {
      update(key, { status: 'failed', message: result.message });
    }
  }

  function add(files: File[]) {
    const added = files.map((file) => ({ key: `f${++counter.current}`, file, status: 'uploading' as const, progress: 0, message: null }));
    setItems((all) => [...added, ...all]);
    // One at a time: a tablet on a weak connection finishes each file rather than stalling all of them.
    void added.reduce((chain, item) => chain.then(() => upload(item.key, item.file)), Promise.resolve());
  }

  const { getRootProps, getInputProps, isDragActive, open } = useDropzone({
    onDrop: add,
    accept: acceptHint,
    noClick: true,
    noKeyboard: true,
    multiple: true,
  });

  return (
    <div className="flex flex-col gap-3">
      <div
        {...getRootProps({
          className: `flex flex-col items-center gap-3 rounded-lg border-2 border-dashed px-4 py-6 text-center ${isDragActive ? 'border-ink-900 bg-brass-50' : 'border-ink-300 bg-ink-50'}`,
        })}
      >
        <input {...getInputProps({ 'aria-label': 'Files to attach' })} />
        <p className="font-semibold text-ink-900">{isDragActive ? 'Drop the files to attach them' : 'Drop photos or documents here'}</p>
        {hint ? <p className="text-sm text-ink-600">{hint}</p> : null}
        <div className="flex flex-wrap justify-center gap-3">
          <label
            htmlFor={cameraId}
            className="inline-flex min-h-11 cursor-pointer items-center justify-center gap-2 rounded-md border border-ink-900 bg-ink-900 px-4 py-2 font-semibold text-white hover:bg-ink-700 has-[:focus-visible]:outline-3 has-[:focus-visible]:outline-focus"
          >
            Take a photo
            <input
              id={cameraId}
              type="file"
              accept="image/*"
              capture="environment"
              className="sr-only"
              onChange={(e) => {
                add(Array.from(e.target.files ?? []));
                e.target.value = '';
              }}
            />
          </label>
          <button
            type="button"
            onClick={open}
            className="inline-flex min-h-11 items-center justify-center rounded-md border border-ink-400 bg-white px-4 py-2 font-semibold text-ink-900 hover:bg-ink-100"
          >
            Choose files
          </button>
        </div>
        <p className="text-sm text-ink-600">Photos, PDF, Excel (.xlsx), CSV or text; up to {formatBytes(maxAttachmentBytes)} each.</p>
      </div>

      {items.length > 0 ? (
        <ul id={listId} aria-label="Files being attached" className="flex flex-col gap-2">
          {items.map((item) => (
            <li key={item.key} className="rounded-md border border-ink-200 bg-white px-3 py-2">
              <div className="flex flex-wrap items-center justify-between gap-2">
                <span className="min-w-0 break-all font-semibold">{item.file.name}</span>
                <span className="text-sm text-ink-600">{formatBytes(item.file.size)}</span>
              </div>
              {item.status === 'uploading' ? (
                <div className="mt-2 flex items-center gap-3">
                  <progress className="h-2 w-full" max={1} value={item.progress} aria-label={`Uploading ${item.file.name}`} />
                  <span className="w-12 shrink-0 text-right text-sm tabular-nums whitespace-nowrap text-ink-700" aria-hidden="true">
                    {Math.round(item.progress * 100)} %
                  </span>
                </div>
              ) : null}
              {item.status === 'done' ? (
                <p role="status" className="mt-1 text-sm font-semibold text-ok-700">
                  ✓ Attached
                </p>
              ) : null}
              {item.status === 'failed' ? (
                <div role="alert" className="mt-1 flex flex-wrap items-start justify-between gap-2">
                  <p className="text-sm font-semibold text-danger-700">✕ Not attached: {item.message}</p>
                  <button
                    type="button"
                    onClick={() => void upload(item.key, item.file)}
                    className="inline-flex min-h-11 items-center rounded-md border border-ink-400 bg-white px-3 text-sm font-semibold hover:bg-ink-100"
                  >
                    Try again
                  </button>
                </div>
              ) : null}
            </li>
          ))}
        </ul>
      ) : null}
    </div>
  );
}
