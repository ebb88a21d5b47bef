import { Platform } from 'react-native';
import type { z } from 'zod';
import { ErrorBodySchema, ERROR_SENTENCES } from '@/shared/api/errors';
import { sessionStore } from './session-store';

/** Same origin on the web; a native build or a split dev set-up names the API with EXPO_PUBLIC_API_URL. */
export const API_BASE_URL: string =
  process.env.EXPO_PUBLIC_API_URL ?? (Platform.OS === 'web' ? '' : 'http://localhost:3000');

export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly details: unknown;

  constructor(status: number, code: string, message: string, details?: unknown) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.details = details;
  }
}

export function isApiError(error: unknown): error is ApiError {
  return error instanceof ApiError;
}

type Method = 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';

export type RequestOptions<T> = {
  method?: Method;
  body?: unknown;
  /** Parses the JSON answer; without one the answer is returned as `unknown` cast to T. */
  schema?: z.ZodType<T>;
  /** Send the session's bearer token (default). Auth endpoints pass false. */
  auth?: boolean;
  signal?: AbortSignal;
  /** Extra request headers, such as `Idempotency-Key`. */
  headers?: Record<string, string>;
};

export async function apiRequest<T = unknown>(path: string, options: RequestOptions<T> = {}): Promise<T> {
  const { method = 'GET', body, schema, auth = true, signal } = options;
  const headers: Record<string, string> = { Accept: 'application/json', ...options.headers };
  if (body !== undefined) headers['Content-Type'] = 'application/json';
  const token = auth ? sessionStore.getToken() : null;
  if (token) headers.Authorization = `Bearer ${token}`;

  let response: Response;
  try {
    response = await fetch(`${API_BASE_URL}${path}`, {
      method,
      headers,
      body: body === undefined ? undefined : JSON.stringify(body),
      signal,
    });
  } catch (cause) {
    if (cause instanceof Error && cause.name === 'AbortError') throw cause;
    throw new ApiError(0, 'network/offline', ERROR_SENTENCES['network/offline']);
  }

  const { payload, notJson } = await readJson(response);

  if (!response.ok) {
    const parsed = ErrorBodySchema.safeParse(payload);
    const error = parsed.success
      ? new ApiError(response.status, parsed.data.error.code, parsed.data.error.message, parsed.data.error.details)
      : new ApiError(response.status, codeForStatus(response.status), '');
    // A rejected token means the session is over: the auth gate sends the user to sign in.
    if (response.status === 401 && token) sessionStore.clear();
    throw error;
  }

  // An HTML page (a proxy error, or the web app's fallback page) is not an API answer.
  if (notJson) throw new ApiError(response.status, 'response/not-json', '');
  if (payload === undefined) return undefined as T;
  if (!schema) return payload as T;
  const result = schema.safeParse(payload);
  if (!result.success) {
    if (__DEV__) console.warn(`Unexpected answer from ${method} ${path}`, result.error.issues);
    throw new ApiError(response.status, 'response/invalid', '');
  }
  return result.data;
}

async function readJson(response: Response): Promise<{ payload: unknown; notJson: boolean }> {
  const text = await response.text().catch(() => '');
  if (!text) return { payload: undefined, notJson: false };
  try {
    return { payload: JSON.parse(text), notJson: false };
  } catch {
    return { payload: undefined, notJson: true };
  }
}

function codeForStatus(status: number): string {
  if (status === 401) return 'auth/unauthenticated';
  if (status === 403) return 'auth/forbidden';
  if (status === 404) return 'request/not-found';
  if (status === 409) return 'request/conflict';
  if (status === 429) return 'auth/too-many-attempts';
  if (status === 503) return 'service/unavailable';
  if (status >= 400 && status < 500) return 'request/invalid';
  return 'server/internal';
}

const CLIENT_SENTENCES: Record<string, string> = {
  'response/invalid': 'Proofyard got an answer it did not understand. Reload the page and try again.',
  'response/not-json': 'Proofyard got an answer it did not understand. Reload the page and try again.',
  'auth/link-invalid': 'This link has expired or was already used. Ask for a new one.',
};

/**
 * The sentence to show for a failure. The server's own message is used for 4xx answers (it is
 * written for people); 5xx, network and unknown failures use the client's sentences, so no code
 * or stack trace ever reaches the screen.
 */
export function errorMessage(error: unknown, overrides: Record<string, string> = {}): string {
  if (!isApiError(error)) return ERROR_SENTENCES['server/internal'];
  if (overrides[error.code]) return overrides[error.code];
  // A 400's message names raw field paths ("email: ..."); its per-field sentences read better.
  const fieldMessages = [...new Set(Object.values(fieldErrors(error)))];
  if (fieldMessages.length > 0) return fieldMessages.join(' ');
  const serverMessage = error.message.trim();
  if (error.status >= 400 && error.status < 500 && serverMessage && looksLikeSentence(serverMessage)) {
    return serverMessage;
  }
  return CLIENT_SENTENCES[error.code] ?? ERROR_SENTENCES[error.code] ?? ERROR_SENTENCES['server/internal'];
}

function looksLikeSentence(message: string): boolean {
  return message.length <= 300 && !/\n\s+at\s/.test(message) && !/^[a-z-]+\/[a-z-]+$/.test(message);
}

/** `details.fields` of a 400 'request/invalid' answer: `{ fieldName: message }`. */
export function fieldErrors(error: unknown): Record<string, string> {
  if (!isApiError(error) || !error.details || typeof error.details !== 'object') return {};
  const fields = (error.details as { fields?: unknown }).fields;
  if (!fields || typeof fields !== 'object') return {};
  const out: Record<string, string> = {};
  for (const [name, message] of Object.entries(fields as Record<string, unknown>)) {
    if (typeof message === 'string') out[name] = message;
    else if (Array.isArray(message) && typeof message[0] === 'string') out[name] = message[0];
  }
  return out;
}
