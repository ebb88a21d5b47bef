import { Platform } from 'react-native';
import { ErrorBodySchema, ERROR_SENTENCES } from '@/shared/api/errors';
import { API_BASE_URL, ApiError } from './api-client';
import { sessionStore } from './session-store';

/** The file name from `Content-Disposition: attachment; filename="..."`, if any. */
export function filenameFrom(disposition: string | null, fallback: string): string {
  const match = disposition?.match(/filename\*?=(?:UTF-8'')?"?([^";]+)"?/i);
  return match ? decodeURIComponent(match[1]) : fallback;
}

/**
 * Downloads a file the API guards with the bearer token: a plain link cannot send the token, so
 * the file is fetched, then saved through a Blob and a temporary `<a download>` (web only).
 */
export async function downloadWithToken(path: string, fallbackName: string): Promise<string> {
  if (Platform.OS !== 'web' || typeof document === 'undefined') {
    throw new ApiError(0, 'download/web-only', 'Downloads work in a browser. Open Proofyard on a computer to export.');
  }
  const token = sessionStore.getToken();
  let response: Response;
  try {
    response = await fetch(`${API_BASE_URL}${path}`, { headers: token ? { Authorization: `Bearer ${token}` } : {} });
  } catch {
    throw new ApiError(0, 'network/offline', ERROR_SENTENCES['network/offline']);
  }
  if (!response.ok) {
    const text = await response.text().catch(() => '');
    let payload: unknown;
    try {
      payload = JSON.parse(text);
    } catch {
      payload = undefined;
    }
    const parsed = ErrorBodySchema.safeParse(payload);
    if (response.status === 401 && token) sessionStore.clear();
    throw parsed.success
      ? new ApiError(response.status, parsed.data.error.code, parsed.data.error.message, parsed.data.error.details)
      : new ApiError(response.status, response.status >= 500 ? 'server/internal' : 'request/invalid', '');
  }
  const blob = await response.blob();
  const name = filenameFrom(response.headers.get('Content-Disposition'), fallbackName);
  const url = URL.createObjectURL(blob);
  const link = document.createElement('a');
  link.href = url;
  link.download = name;
  link.rel = 'noopener';
  document.body.appendChild(link);
  link.click();
  link.remove();
  // Give the browser time to start the download before the URL goes away.
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
  return name;
}
