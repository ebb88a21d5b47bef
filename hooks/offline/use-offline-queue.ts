import { onlineManager, useMutationState, useQueryClient, type Mutation, type QueryClient } from '@tanstack/react-query';
import { useCallback, useSyncExternalStore } from 'react';
import { errorMessage } from '@/hooks/api/api-client';
import { ITEM_STATE_LABELS, type ItemState } from '@/shared/schemas/assets';
import { checkConnectionNow } from './network';
import { isQueuedKey, queueKeys } from './queue-keys';

/**
 * Queued mutations that had to wait at some point (paused offline, or restored after a reload).
 * Only these count as "waiting" and have their failures shown in the shell: a change sent at
 * once reports its own outcome on the screen that made it.
 */
const deferred = new Set<number>();

type AnyMutation = Mutation<unknown, Error, unknown, unknown>;

export function trackDeferredMutations(queryClient: QueryClient): () => void {
  const record = (mutation: AnyMutation | undefined) => {
    if (mutation && isQueuedKey(mutation.options.mutationKey) && mutation.state.isPaused) deferred.add(mutation.mutationId);
  };
  for (const mutation of queryClient.getMutationCache().getAll()) record(mutation);
  return queryClient.getMutationCache().subscribe((event) => {
    if (event.type === 'removed') deferred.delete(event.mutation.mutationId);
    else record(event.mutation);
  });
}

export type QueuedChange = {
  id: number;
  /** "Finding “Loose HV connector”", "Comment “Torqued again…”", "Checklist item: Passed". */
  label: string;
  paused: boolean;
  /** The sentence of a final refusal. */
  error: string | null;
};

function shorten(text: string, max = 48): string {
  const clean = text.trim().replace(/\s+/g, ' ');
  return clean.length > max ? `${clean.slice(0, max - 1)}…` : clean;
}

export function describeQueued(mutation: AnyMutation): QueuedChange {
  const key = mutation.options.mutationKey?.[1];
  const variables = (mutation.state.variables ?? {}) as Record<string, unknown>;
  let label = 'A change';
  if (key === queueKeys.findingCreate()[1]) {
    const body = (variables.body ?? {}) as { title?: string };
    label = `Finding “${shorten(body.title ?? '')}”${typeof variables.assetTag === 'string' ? ` on ${variables.assetTag}` : ''}`;
  } else if (key === queueKeys.findingComment()[1]) {
    label = `Comment “${shorten(String(variables.body ?? ''))}”`;
  } else if (key === queueKeys.checklistItem()[1]) {
    const state = variables.state as ItemState | undefined;
    label = `Checklist item: ${state ? (ITEM_STATE_LABELS[state] ?? state) : 'change'}`;
  }
  return {
    id: mutation.mutationId,
    label,
    paused: mutation.state.isPaused,
    error: mutation.state.status === 'error' ? errorMessage(mutation.state.error) : null,
  };
}

const subscribeOnline = (listener: () => void) => onlineManager.subscribe(listener);
const readOnline = () => onlineManager.isOnline();
const serverOnline = () => true;

export function useIsOnline(): boolean {
  return useSyncExternalStore(subscribeOnline, readOnline, serverOnline);
}

/** What waits on this device, what could not be sent, and the actions on them. */
export function useOfflineQueue() {
  const queryClient = useQueryClient();
  const online = useIsOnline();
  const waiting = useMutationState({
    filters: {
      mutationKey: queueKeys.all,
      status: 'pending',
      predicate: (mutation) => mutation.state.isPaused || deferred.has(mutation.mutationId),
    },
    select: describeQueued,
  });
  const failed = useMutationState({
    filters: { mutationKey: queueKeys.all, status: 'error', predicate: (mutation) => deferred.has(mutation.mutationId) },
    select: describeQueued,
  });

  const find = useCallback((id: number) => queryClient.getMutationCache().getAll().find((mutation) => mutation.mutationId === id), [queryClient]);

  const dismiss = useCallback(
    (id: number) => {
      const mutation = find(id);
      if (mutation) queryClient.getMutationCache().remove(mutation);
    },
    [find, queryClient],
  );

  /** Sends a refused change again as a new mutation with the same variables (and so the same Idempotency-Key). */
  const retry = useCallback(
    (id: number) => {
      const mutation = find(id);
      if (!mutation) return;
      const cache = queryClient.getMutationCache();
      const again = cache.build(queryClient, { mutationKey: mutation.options.mutationKey, scope: mutation.options.scope });
      deferred.add(again.mutationId);
      cache.remove(mutation);
      void again.execute(mutation.state.variables).catch(() => undefined);
    },
    [find, queryClient],
  );

  const sendNow = useCallback(() => {
    checkConnectionNow();
    void queryClient.resumePausedMutations();
  }, [queryClient]);

  return { online, waiting, failed, dismiss, retry, sendNow };
}
