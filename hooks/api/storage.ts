/**
 * Small key-value persistence: `localStorage` on the web, memory elsewhere or when the browser
 * refuses storage (private windows, disabled cookies, server rendering).
 */
const memory = new Map<string, string>();

function browserStorage(): Storage | null {
  try {
    if (typeof window === 'undefined' || !window.localStorage) return null;
    return window.localStorage;
  } catch {
    return null;
  }
}

export function readItem(key: string): string | null {
  const storage = browserStorage();
  if (storage) {
    try {
      return storage.getItem(key);
    } catch {
      return memory.get(key) ?? null;
    }
  }
  return memory.get(key) ?? null;
}

export function writeItem(key: string, value: string | null): void {
  if (value === null) memory.delete(key);
  else memory.set(key, value);
  const storage = browserStorage();
  if (!storage) return;
  try {
    if (value === null) storage.removeItem(key);
    else storage.setItem(key, value);
  } catch {
    // Quota or privacy mode: the memory copy keeps the session for this tab.
  }
}
