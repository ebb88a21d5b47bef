import { readItem, writeItem } from './storage';

export const TOKEN_KEY = 'proofyard.token';
export const PROGRAM_KEY = 'proofyard.program';

type Listener = () => void;
const listeners = new Set<Listener>();
let token: string | null | undefined;

function emit() {
  for (const listener of listeners) listener();
}

/**
 * The bearer token lives outside React so the API client can read it and drop it on a 401
 * without a hook; SessionProvider subscribes to changes.
 */
export const sessionStore = {
  getToken(): string | null {
    if (token === undefined) token = readItem(TOKEN_KEY);
    return token;
  },
  setToken(next: string | null) {
    if (next === sessionStore.getToken()) return;
    token = next;
    writeItem(TOKEN_KEY, next);
    emit();
  },
  clear() {
    sessionStore.setToken(null);
  },
  subscribe(listener: Listener): () => void {
    listeners.add(listener);
    return () => listeners.delete(listener);
  },
  /** Another tab signed in or out: re-read the stored token. */
  reload() {
    const stored = readItem(TOKEN_KEY);
    if (stored === token) return;
    token = stored;
    emit();
  },
};
