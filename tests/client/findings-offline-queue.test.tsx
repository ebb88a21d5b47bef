import { onlineManager } from '@tanstack/react-query';
import { persistQueryClientRestore, persistQueryClientSave } from '@tanstack/react-query-persist-client';
import { act, screen, waitFor } from '@testing-library/react';
import { OfflineBanner, waitingWords } from '@/components/shell/offline-banner';
import { makeQueryClient } from '@/hooks/api/query-client';
import { QUEUE_STORAGE_KEY, queuePersistOptions, registerQueuedMutations } from '@/hooks/offline/offline-query-provider';
import { sessionStore } from '@/hooks/api/session-store';
import { HELD_QUEUE_KEY, holdQueueAcrossSessions } from '@/hooks/offline/held-queue';
import { blobToDataUrl, dataUrlToBlob } from '@/hooks/offline/photo-data';
import { queueKeys } from '@/hooks/offline/queue-keys';
import { trackDeferredMutations } from '@/hooks/offline/use-offline-queue';
import { meKeys } from '@/hooks/queries/me';
import type { CommentDraft, FindingCapture } from '@/hooks/queries/findings';
import { ASSET_ID, ENGINEER, TECH, finding, me } from './support/findings';
import { jsonResponse, renderWithProviders } from './support/render';

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn() }) }));

const fetchMock = jest.fn();
beforeEach(() => {
  fetchMock.mockReset();
  global.fetch = fetchMock as unknown as typeof fetch;
});
afterEach(() => onlineManager.setOnline(true));

const FINDING_ID = '3e3e3e3e-0000-4000-8000-000000000001';
const draft = (n: number): CommentDraft => ({ key: `comment-key-${n}`, findingId: FINDING_ID, body: `Torqued again, try ${n}`, writtenAt: '2026-12-02T08:00:00.000Z' });

/** A page's storage in memory, as `localStorage` behaves. */
function memoryStorage(): Storage {
  const items = new Map<string, string>();
  return {
    get length() {
      return items.size;
    },
    clear: () => items.clear(),
    getItem: (key) => items.get(key) ?? null,
    key: (index) => [...items.keys()][index] ?? null,
    removeItem: (key) => void items.delete(key),
    setItem: (key, value) => void items.set(key, value),
  };
}

const sentHeaders = (call: unknown[]) => (call[1] as RequestInit).headers as Record<string, string>;

describe('offline queue', () => {
  it('when two comments are written offline, then the shell counts them and sends each once, with its own key, when the connection is back', async () => {
    onlineManager.setOnline(false);
    const view = renderWithProviders(<OfflineBanner />);
    const { queryClient } = view;
    registerQueuedMutations(queryClient);
    trackDeferredMutations(queryClient);

    expect((await screen.findByTestId('offline-queue')).textContent).toContain('Offline.');
    const cache = queryClient.getMutationCache();
    act(() => {
      for (const n of [1, 2]) void cache.build(queryClient, { mutationKey: queueKeys.findingComment() }).execute(draft(n)).catch(() => undefined);
    });
    await waitFor(() => expect(screen.getByTestId('offline-queue-count').textContent).toBe('2 changes waiting to send'));
    expect(fetchMock).not.toHaveBeenCalled();

    fetchMock.mockImplementation(async (_url: string, init: RequestInit) => {
      const body = JSON.parse(String(init.body)) as { body: string };
      const key = (init.headers as Record<string, string>)['Idempotency-Key'];
      return jsonResponse(201, { id: `c-${key}`, findingId: FINDING_ID, author: TECH, body: body.body, createdAt: '2026-12-02T09:00:00.000Z' });
    });
    act(() => onlineManager.setOnline(true));

    await waitFor(() => expect(screen.queryByTestId('offline-queue')).toBeNull());
    const posts = fetchMock.mock.calls.filter(([url, init]) => url === `/api/findings/${FINDING_ID}/comments` && init.method === 'POST');
    expect(posts).toHaveLength(2);
    expect(posts.map((call) => sentHeaders(call)['Idempotency-Key']).sort()).toEqual(['comment-key-1', 'comment-key-2']);
  });

  it('when the page is reloaded while a finding waits, then the new page restores it paused and sends it with the same Idempotency-Key', async () => {
    jest.useFakeTimers();
    try {
      const storage = memoryStorage();
      const options = queuePersistOptions(storage);
      onlineManager.setOnline(false);

      const before = makeQueryClient({ retry: false });
      registerQueuedMutations(before);
      const capture: FindingCapture = {
        key: 'capture-key-0001',
        body: { assetId: ASSET_ID, title: 'Trim clip missing', severity: 'minor' },
        photos: [],
        assetTag: 'FW3-EP-014',
      };
      void before.getMutationCache().build(before, { mutationKey: queueKeys.findingCreate() }).execute(capture).catch(() => undefined);
      await persistQueryClientSave({ queryClient: before, ...options });
      jest.advanceTimersByTime(1000);
      expect(storage.getItem(QUEUE_STORAGE_KEY)).toContain('capture-key-0001');

      const after = makeQueryClient({ retry: false });
      registerQueuedMutations(after);
      await persistQueryClientRestore({ queryClient: after, ...options });
      const restored = after.getMutationCache().getAll();
      expect(restored).toHaveLength(1);
      expect(restored[0].state.isPaused).toBe(true);
      expect(restored[0].state.variables).toEqual(capture);

      fetchMock.mockResolvedValue(jsonResponse(201, finding({ title: 'Trim clip missing', severity: 'minor' })));
      onlineManager.setOnline(true);
      await after.resumePausedMutations();
      expect(fetchMock).toHaveBeenCalledTimes(1);
      const [url, init] = fetchMock.mock.calls[0];
      expect(url).toBe('/api/findings');
      expect(sentHeaders(fetchMock.mock.calls[0])['Idempotency-Key']).toBe('capture-key-0001');
      expect(JSON.parse(init.body)).toEqual(capture.body);
      expect(after.getMutationCache().getAll()[0].state.status).toBe('success');
    } finally {
      jest.useRealTimers();
    }
  });

  it('when the session ends while a comment waits, then it is set aside and sent when the same person signs in again, never for another', async () => {
    const client = makeQueryClient({ retry: false });
    registerQueuedMutations(client);
    const stop = holdQueueAcrossSessions(client, 24 * 3600 * 1000);
    try {
      sessionStore.setToken('token-tech');
      client.setQueryData(meKeys.detail(), me(TECH, 'technician'));
      onlineManager.setOnline(false);
      void client.getMutationCache().build(client, { mutationKey: queueKeys.findingComment() }).execute(draft(7)).catch(() => undefined);

      sessionStore.clear();
      client.clear();
      expect(window.localStorage.getItem(HELD_QUEUE_KEY)).toContain('comment-key-7');
      expect(client.getMutationCache().getAll()).toHaveLength(0);

      sessionStore.setToken('token-engineer');
      client.setQueryData(meKeys.detail(), me(ENGINEER, 'engineer'));
      expect(client.getMutationCache().getAll()).toHaveLength(0);
      sessionStore.clear();
      client.clear();

      fetchMock.mockResolvedValue(jsonResponse(201, { id: 'c-7', findingId: FINDING_ID, author: TECH, body: draft(7).body, createdAt: '2026-12-02T09:00:00.000Z' }));
      onlineManager.setOnline(true);
      sessionStore.setToken('token-tech-again');
      client.setQueryData(meKeys.detail(), me(TECH, 'technician'));
      await waitFor(() => expect(fetchMock).toHaveBeenCalledTimes(1));
      expect(sentHeaders(fetchMock.mock.calls[0])['Idempotency-Key']).toBe('comment-key-7');
      expect(window.localStorage.getItem(HELD_QUEUE_KEY)).toBeNull();
    } finally {
      stop();
      sessionStore.clear();
      window.localStorage.clear();
    }
  });

  it('a photo survives the trip through storage byte for byte', async () => {
    const bytes = new Uint8Array([0xff, 0xd8, 0xff, 0xe0, 0, 16, 74, 70]);
    const url = await blobToDataUrl(new Blob([bytes], { type: 'image/jpeg' }));
    const back = dataUrlToBlob(url);
    expect(back.type).toBe('image/jpeg');
    expect(back.size).toBe(bytes.length);
    expect(await blobToDataUrl(back)).toBe(url);
  });

  it.each([
    [1, '1 change waiting to send'],
    [3, '3 changes waiting to send'],
  ])('%i waiting reads "%s"', (count, words) => {
    expect(waitingWords(count)).toBe(words);
  });
});
