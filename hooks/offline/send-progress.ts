import { useCallback, useSyncExternalStore } from 'react';

/** How far a queued change with photos has got: `step` 0 is the record itself, then one per photo. */
export type SendProgress = { step: number; steps: number; fraction: number };

const progress = new Map<string, SendProgress>();
const listeners = new Set<() => void>();

export function reportProgress(key: string, value: SendProgress | null) {
  if (value) progress.set(key, value);
  else progress.delete(key);
  for (const listener of listeners) listener();
}

function subscribe(listener: () => void) {
  listeners.add(listener);
  return () => listeners.delete(listener);
}

/** The progress of the change sent with `key` (its Idempotency-Key), or null when nothing is being sent. */
export function useSendProgress(key: string | null): SendProgress | null {
  const read = useCallback(() => (key ? (progress.get(key) ?? null) : null), [key]);
  return useSyncExternalStore(subscribe, read, read);
}
