import type { z } from 'zod';
import { ErrorBodySchema, ERROR_SENTENCES } from '@/shared/api/errors';
import { API_BASE_URL, ApiError } from './api-client';
import { sessionStore } from './session-store';

export type UploadOptions<T> = {
  body: FormData;
  schema: z.ZodType<T>;
  headers?: Record<string, string>;
  /** Fraction sent, 0 to 1. */
  onProgress?: (fraction: number) => void;
  signal?: AbortSignal;
};

/**
 * POSTs a multipart body with upload progress. `fetch` reports no upload progress, so this uses
 * XMLHttpRequest (on the web and in React Native alike) and maps failures like `apiRequest`.
 */
export function uploadWithProgress<T>(path: string, { body, schema, headers = {}, onProgress, signal }: UploadOptions<T>): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', `${API_BASE_URL}${path}`);
    xhr.setRequestHeader('Accept', 'application/json');
    const token = sessionStore.getToken();
    if (token) xhr.setRequestHeader('Authorization', `Bearer ${token}`);
    for (const [name, value] of Object.entries(headers)) xhr.setRequestHeader(name, value);

    xhr.upload.onprogress = (event) => {
      if (event.lengthComputable && event.total > 0) onProgress?.(event.loaded / event.total);
    };
    xhr.onerror = () => reject(new ApiError(0, 'network/offline', ERROR_SENTENCES['network/offline']));
    xhr.ontimeout = xhr.onerror;
    xhr.onabort = () => {
      const error = new Error('Upload cancelled.');
      error.name = 'AbortError';
      reject(error);
    };
    xhr.onload = () => {
      let payload: unknown;
      try {
        payload = xhr.responseText ? JSON.parse(xhr.responseText) : undefined;
      } catch {
        payload = undefined;
      }
      if (xhr.status < 200 || xhr.status >= 300) {
        const parsed = ErrorBodySchema.safeParse(payload);
        if (xhr.status === 401 && token) sessionStore.clear();
        reject(
          parsed.success
            ? new ApiError(xhr.status, parsed.data.error.code, parsed.data.error.message, parsed.data.error.details)
            : new ApiError(xhr.status, codeForUploadStatus(xhr.status), ''),
        );
        return;
      }
      const result = schema.safeParse(payload);
      if (!result.success) {
        reject(new ApiError(xhr.status, 'response/invalid', ''));
        return;
      }
      onProgress?.(1);
      resolve(result.data);
    };
    signal?.addEventListener('abort', () => xhr.abort());
    xhr.send(body);
  });
}

function codeForUploadStatus(status: number): string {
  if (status === 413) return 'upload/too-large';
  if (status === 415) return 'upload/unsupported-type';
  if (status === 401) return 'auth/unauthenticated';
  if (status === 403) return 'auth/forbidden';
  if (status === 404) return 'request/not-found';
  if (status >= 500) return 'server/internal';
  return 'request/invalid';
}
