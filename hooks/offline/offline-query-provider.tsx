import { createSyncStoragePersister } from '@tanstack/query-sync-storage-persister';
import type { QueryClient } from '@tanstack/react-query';
import { PersistQueryClientProvider, type PersistedClient, type PersistQueryClientOptions } from '@tanstack/react-query-persist-client';
import { useState, type ReactNode } from 'react';
import { commentMutationOptions, findingCaptureMutationOptions } from '@/hooks/queries/findings';
import { checklistItemQueueDefaults } from './checklist-queue';
import { holdQueueAcrossSessions } from './held-queue';
import { installOnlineManager } from './network';
import { isQueuedKey, queueKeys } from './queue-keys';
import { trackDeferredMutations } from './use-offline-queue';

export const QUEUE_STORAGE_KEY = 'proofyard.queue';
/** A change kept longer than this on a device is dropped at the next start (two weeks of site work without a connection). */
export const QUEUE_MAX_AGE_MS = 14 * 24 * 3600 * 1000;
/** Bump when the shape of a queued change changes, so an old queue is not sent in a form the server no longer takes. */
export const QUEUE_BUSTER = 'queue-v1';

/** Each queued key gets its mutationFn as a default: a mutation restored after a reload has no screen to bring one. */
export function registerQueuedMutations(queryClient: QueryClient) {
  const { mutationKey: _create, ...create } = findingCaptureMutationOptions(queryClient);
  const { mutationKey: _comment, ...comment } = commentMutationOptions(queryClient);
  queryClient.setMutationDefaults(queueKeys.findingCreate(), create);
  queryClient.setMutationDefaults(queueKeys.findingComment(), comment);
  queryClient.setMutationDefaults(queueKeys.checklistItem(), checklistItemQueueDefaults(queryClient));
}

function localStorageOrNull(): Storage | null {
  try {
    return typeof window !== 'undefined' && window.localStorage ? window.localStorage : null;
  } catch {
    return null;
  }
}

type DehydratedMutation = PersistedClient['clientState']['mutations'][number];

/** A change that was on its way when the page closed is sent again (its key makes the resend harmless). */
export function restoreAsPaused(text: string): PersistedClient {
  const persisted = JSON.parse(text) as PersistedClient;
  const mutations = persisted.clientState?.mutations ?? [];
  for (const mutation of mutations) mutation.state.isPaused = true;
  return persisted;
}

/** Storage full: keep every change but drop the photo bytes (the open page still sends them from memory). */
function withoutPhotoBytes(mutation: DehydratedMutation): DehydratedMutation {
  const variables = mutation.state.variables as { photos?: Array<Record<string, unknown>> } | undefined;
  if (!variables?.photos?.length) return mutation;
  const photos = variables.photos.map(({ dataUrl: _dataUrl, ...photo }) => photo);
  return { ...mutation, state: { ...mutation.state, variables: { ...variables, photos } } };
}

export function makeQueuePersister(storage: Storage | null = localStorageOrNull()) {
  return createSyncStoragePersister({
    storage,
    key: QUEUE_STORAGE_KEY,
    throttleTime: 300,
    deserialize: restoreAsPaused,
    retry: ({ persistedClient, errorCount }) =>
      errorCount > 1
        ? undefined
        : { ...persistedClient, clientState: { ...persistedClient.clientState, mutations: persistedClient.clientState.mutations.map(withoutPhotoBytes) } },
  });
}

export function queuePersistOptions(storage?: Storage | null): Omit<PersistQueryClientOptions, 'queryClient'> {
  return {
    persister: makeQueuePersister(storage),
    maxAge: QUEUE_MAX_AGE_MS,
    buster: QUEUE_BUSTER,
    dehydrateOptions: {
      // Only the waiting changes are kept: lists and pages are fetched fresh, and no one else's data stays on the device.
      shouldDehydrateQuery: () => false,
      shouldDehydrateMutation: (mutation) => isQueuedKey(mutation.options.mutationKey) && mutation.state.status === 'pending',
    },
  };
}

/**
 * The query client's provider with the offline queue: new findings, comments and checklist ticks
 * made without a connection are kept in the browser's storage, restored after a reload and sent
 * when the connection is back (PersistQueryClientProvider + paused mutations).
 */
export function OfflineQueryProvider({ client, children }: { client: QueryClient; children: ReactNode }) {
  const [options] = useState(() => {
    installOnlineManager();
    registerQueuedMutations(client);
    trackDeferredMutations(client);
    holdQueueAcrossSessions(client, QUEUE_MAX_AGE_MS);
    return queuePersistOptions();
  });
  return (
    <PersistQueryClientProvider client={client} persistOptions={options} onSuccess={() => void client.resumePausedMutations()}>
      {children}
    </PersistQueryClientProvider>
  );
}
