import { QueryClientProvider } from '@tanstack/react-query';
import { render } from '@testing-library/react';
import type { ReactElement } from 'react';
import { SafeAreaProvider } from 'react-native-safe-area-context';
import { makeQueryClient } from '@/hooks/api/query-client';
import { SessionProvider } from '@/hooks/use-session';

const metrics = {
  frame: { x: 0, y: 0, width: 390, height: 844 },
  insets: { top: 0, left: 0, right: 0, bottom: 0 },
};

/** Renders a screen with the app's providers and a fresh query client that never retries. */
export function renderWithProviders(ui: ReactElement) {
  const queryClient = makeQueryClient({ retry: false });
  const result = render(
    <SafeAreaProvider initialMetrics={metrics}>
      <QueryClientProvider client={queryClient}>
        <SessionProvider>{ui}</SessionProvider>
      </QueryClientProvider>
    </SafeAreaProvider>,
  );
  return { ...result, queryClient };
}

/** jsdom has no fetch `Response`; the API client only reads these members. */
export function jsonResponse(status: number, body: unknown): Response {
  const text = JSON.stringify(body);
  return { ok: status >= 200 && status < 300, status, text: async () => text } as Response;
}
