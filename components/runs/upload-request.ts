'use client';

/** The answer to one raw-body upload: the JSON payload on success, the server's message otherwise. */
export type UploadResult<T> = { ok: true; data: T } | { ok: false; status: number; message: string };

/**
 * Sends one file as the raw request body with XMLHttpRequest, so the browser reports upload
 * progress (fetch cannot). `onProgress` gets 0..1. Resolves (never rejects) with the outcome.
 */
export function sendFile<T>(
  method: 'POST' | 'PUT',
  url: string,
  file: Blob,
  onProgress?: (fraction: number) => void,
  signal?: AbortSignal,
): Promise<UploadResult<T>> {
  return new Promise((resolve) => {
    const xhr = new XMLHttpRequest();
    xhr.open(method, url);
    xhr.setRequestHeader('Content-Type', 'application/octet-stream');
    xhr.responseType = 'json';
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress?.(e.loaded / e.total);
    };
    xhr.onload = () => {
      const payload = xhr.response as { error?: { message?: string } } | null;
      if (xhr.status >= 200 && xhr.status < 300) resolve({ ok: true, data: payload as T });
      else resolve({ ok: false, status: xhr.status, message: payload?.error?.message ?? `The server answered ${xhr.status}.` });
    };
    xhr.onerror = () => resolve({ ok: false, status: 0, message: 'The upload failed: the connection to the server was lost. Try again.' });
    xhr.onabort = () => resolve({ ok: false, status: 0, message: 'The upload was cancelled.' });
    signal?.addEventListener('abort', () => xhr.abort());
    xhr.send(file);
  });
}
