// Stores a finished export: ask the API for a presigned POST form (bound to the key, the type and the size declared),
// upload straight to the object store (with upload progress), then ask the API to check and list it. Browser only.
import { CancelledError } from './cancel';
import type { ExportFormat } from './layout';

export interface StoredExport {
  id: number;
  format: ExportFormat;
  byteSize: number;
  fileName: string;
  createdAt: string;
  createdBy: string | null;
  downloadUrl: string;
  width: number | null;
  height: number | null;
}

async function call<T>(path: string, body?: unknown): Promise<T> {
  const res = await fetch(path, {
    method: body === undefined ? 'GET' : 'POST',
    headers: { accept: 'application/json', ...(body === undefined ? {} : { 'content-type': 'application/json' }) },
    body: body === undefined ? undefined : JSON.stringify(body),
    credentials: 'same-origin',
  });
  const data = await res.json().catch(() => null);
  if (!res.ok) throw new Error(data?.error?.message ?? `The server answered ${res.status}`);
  return data as T;
}

/** The presigned form an export start answers with (S3 POST policy: key, type and 1…declared bytes). */
interface UploadForm {
  url: string;
  fields: Record<string, string>;
}

/**
 * Sends the bytes with the presigned form (its fields first, the file last, as the store requires) using
 * XMLHttpRequest (fetch has no upload progress); rejects with CancelledError on abort.
 */
function post(upload: UploadForm, bytes: Uint8Array, contentType: string, onProgress: (f: number) => void, signal: AbortSignal): Promise<void> {
  return new Promise((resolve, reject) => {
    const form = new FormData();
    for (const [k, v] of Object.entries(upload.fields)) form.append(k, v);
    form.append('file', new Blob([bytes as BlobPart], { type: contentType }), 'export');
    const xhr = new XMLHttpRequest();
    xhr.open('POST', upload.url);
    xhr.upload.onprogress = (e) => e.lengthComputable && onProgress(e.loaded / e.total);
    xhr.onload = () => (xhr.status >= 200 && xhr.status < 300 ? resolve() : reject(new Error(`The object store refused the upload (HTTP ${xhr.status})`)));
    xhr.onerror = () => reject(new Error('Could not reach the object store to upload the export'));
    xhr.onabort = () => reject(new CancelledError());
    signal.addEventListener('abort', () => xhr.abort(), { once: true });
    xhr.send(form);
  });
}

/** Uploads and lists the export on the version; resolves to the stored export. */
export async function storeExport(
  versionId: number,
  file: { format: ExportFormat; bytes: Uint8Array; fileName: string; sameName?: 'number' | 'replace'; options: Record<string, unknown> },
  onProgress: (f: number) => void,
  signal: AbortSignal,
): Promise<StoredExport> {
  const started = await call<{ assetId: number; upload: UploadForm }>(`/api/versions/${versionId}/exports`, {
    format: file.format,
    byteSize: file.bytes.byteLength,
    fileName: file.fileName,
    ...(file.sameName ? { sameName: file.sameName } : {}),
    options: file.options,
  });
  await post(started.upload, file.bytes, started.upload.fields['Content-Type'] ?? 'application/octet-stream', onProgress, signal);
  const done = await call<{ export: StoredExport }>(`/api/versions/${versionId}/exports/${started.assetId}/complete`, {});
  return done.export;
}

/** The version's stored exports, newest first. */
export async function listExports(versionId: number): Promise<StoredExport[]> {
  return (await call<{ exports: StoredExport[] }>(`/api/versions/${versionId}/exports`)).exports;
}

/** The event ExportPanel fires on window when an export is stored (SharePanel listens to offer it). */
export const EXPORT_STORED_EVENT = 'tidemark:export-stored';
