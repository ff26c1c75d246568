// Sending a file to the object store with the presigned POST form an upload start answered with (plates, prop
// pictures): the store checks the form's policy (key, type, 1…declared bytes); the API checks the file on completion.

/** The presigned form an upload start answers with (S3 POST policy: key, type and size bound). */
export type UploadForm = { url: string; fields: Record<string, string> };

/**
 * Sends the file with the presigned form (its fields first, the file last, as the store requires) and reports
 * progress (0–1); resolves when the store answers 2xx. A file larger than declared is refused by the store.
 */
export function postWithProgress(upload: UploadForm, file: Blob, onProgress: (fraction: number) => void): Promise<void> {
  return new Promise((resolve, reject) => {
    const form = new FormData();
    for (const [k, v] of Object.entries(upload.fields)) form.append(k, v);
    form.append('file', file);
    const xhr = new XMLHttpRequest();
    xhr.open('POST', upload.url);
    xhr.upload.onprogress = (e) => e.lengthComputable && onProgress(e.loaded / e.total);
    xhr.onload = () => (xhr.status >= 200 && xhr.status < 300 ? resolve() : reject(new Error(`The file store refused the upload (${xhr.status}). Please try again.`)));
    xhr.onerror = () => reject(new Error('The upload was interrupted. Check your connection and try again.'));
    xhr.send(form);
  });
}
