import { onlineManager } from '@tanstack/react-query';
import { Platform } from 'react-native';
import { API_BASE_URL, isApiError } from '@/hooks/api/api-client';
import { API } from '@/shared/api/paths';

/** How soon, then how often, an unreachable server is asked whether it is back. */
export const FIRST_PROBE_MS = 3_000;
export const PROBE_INTERVAL_MS = 15_000;

let probeTimer: ReturnType<typeof setTimeout> | null = null;
let installed = false;

function browserSaysOnline(): boolean {
  return typeof navigator === 'undefined' || typeof navigator.onLine !== 'boolean' ? true : navigator.onLine;
}

function stopProbe() {
  if (probeTimer) clearTimeout(probeTimer);
  probeTimer = null;
}

async function probe() {
  probeTimer = null;
  try {
    const response = await fetch(`${API_BASE_URL}${API.health}`, { headers: { Accept: 'application/json' }, cache: 'no-store' });
    if (response.ok) {
      onlineManager.setOnline(true);
      return;
    }
  } catch {
    // Still unreachable.
  }
  if (!onlineManager.isOnline() && browserSaysOnline()) probeTimer = setTimeout(() => void probe(), PROBE_INTERVAL_MS);
}

/**
 * On the web, TanStack's onlineManager follows `navigator.onLine` and the window's online and
 * offline events (it would otherwise start "online" whatever the browser says). Mutations and
 * queries in the default `online` network mode pause while it reads offline.
 */
export function installOnlineManager() {
  if (installed || Platform.OS !== 'web' || typeof window === 'undefined' || typeof window.addEventListener !== 'function') return;
  installed = true;
  onlineManager.setEventListener((setOnline) => {
    const online = () => {
      stopProbe();
      setOnline(true);
    };
    const offline = () => setOnline(false);
    window.addEventListener('online', online);
    window.addEventListener('offline', offline);
    setOnline(browserSaysOnline());
    return () => {
      window.removeEventListener('online', online);
      window.removeEventListener('offline', offline);
    };
  });
}

/**
 * A send failed at the network while the browser still claims a connection (site Wi-Fi without
 * a route, a server restarting): read as offline, so queued changes pause and are kept, and ask
 * the server's health endpoint until it answers.
 */
export function markUnreachable() {
  if (onlineManager.isOnline()) onlineManager.setOnline(false);
  if (!probeTimer && browserSaysOnline()) probeTimer = setTimeout(() => void probe(), FIRST_PROBE_MS);
}

/** "Send now": ask the server at once instead of waiting for the next probe. */
export function checkConnectionNow() {
  stopProbe();
  if (browserSaysOnline()) void probe();
}

export const isNetworkError = (error: unknown) => isApiError(error) && error.status === 0;

/**
 * Retry rule of queued changes: a network failure waits for the connection (never gives up); a
 * first try still running on the server, a 429 or a 5xx is tried a few more times; a refusal
 * (4xx) is final and shows to the person.
 */
export function queuedRetry(failureCount: number, error: unknown): boolean {
  if (isNetworkError(error)) {
    markUnreachable();
    return true;
  }
  if (!isApiError(error)) return false;
  if (error.code === 'request/in-progress') return failureCount < 10;
  if (error.status === 429 || error.status >= 500) return failureCount < 2;
  return false;
}

export const queuedRetryDelay = (failureCount: number) => Math.min(1000 * 2 ** failureCount, 30_000);
