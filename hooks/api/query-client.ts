import { QueryClient } from '@tanstack/react-query';
import { isApiError } from './api-client';

/** Retries only what may pass on a second try: the network and 5xx answers, never 4xx. */
function shouldRetry(failureCount: number, error: unknown): boolean {
  if (failureCount >= 2) return false;
  if (!isApiError(error)) return false;
  return error.status === 0 || error.status >= 500;
}

export function makeQueryClient({ retry = true }: { retry?: boolean } = {}): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: {
        staleTime: 30_000,
        retry: retry ? shouldRetry : false,
      },
      mutations: {
        retry: false,
      },
    },
  });
}
