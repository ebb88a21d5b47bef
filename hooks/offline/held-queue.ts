import { dehydrate, hashKey, hydrate, type QueryClient } from '@tanstack/react-query';
import { sessionStore } from '@/hooks/api/session-store';
import { readItem, writeItem } from '@/hooks/api/storage';
import { meKeys } from '@/hooks/queries/me';
import type { Me } from '@/shared/schemas/auth';
import { isQueuedKey } from './queue-keys';

export const HELD_QUEUE_KEY = 'proofyard.queue.held';
/** Whose changes the persisted queue holds: known before /api/me answers after a reload (it may answer 401). */
export const QUEUE_USER_KEY = 'proofyard.queue.user';

type DehydratedMutations = ReturnType<typeof dehydrate>['mutations'];
/** Per user id: the changes that waited when that person's session ended. */
type Held = Record<string, { savedAt: number; mutations: DehydratedMutations }>;

function readHeld(): Held {
  try {
    const held = JSON.parse(readItem(HELD_QUEUE_KEY) ?? '{}') as unknown;
    return held && typeof held === 'object' && !Array.isArray(held) ? (held as Held) : {};
  } catch {
    return {};
  }
}

function writeHeld(held: Held) {
  writeItem(HELD_QUEUE_KEY, Object.keys(held).length ? JSON.stringify(held) : null);
}

/**
 * A session can end while changes wait (the token expires after a night offline, or the person
 * signs out): the session's end clears the query client, so the waiting changes are first set
 * aside for that person, and sent when the same person signs in again. Another person signing
 * in on the device never sends them.
 */
export function holdQueueAcrossSessions(queryClient: QueryClient, maxAgeMs: number): () => void {
  let userId: string | null = readItem(QUEUE_USER_KEY);
  let seen: string | null = null;

  const restore = () => {
    const held = readHeld();
    const mine = userId ? held[userId] : undefined;
    if (!userId || !mine) return;
    delete held[userId];
    writeHeld(held);
    if (Date.now() - mine.savedAt > maxAgeMs || !Array.isArray(mine.mutations)) return;
    for (const mutation of mine.mutations) mutation.state.isPaused = true;
    hydrate(queryClient, { mutations: mine.mutations, queries: [] });
    void queryClient.resumePausedMutations();
  };

  const unsubscribeCache = queryClient.getQueryCache().subscribe((event) => {
    if (event.type !== 'updated' || event.query.queryHash !== hashKey(meKeys.detail())) return;
    const me = event.query.state.data as Me | undefined;
    if (!me || me.user.id === seen) return;
    seen = userId = me.user.id;
    writeItem(QUEUE_USER_KEY, userId);
    restore();
  });

  // The store tells its listeners before the session provider clears the cache, so the changes are still there.
  const unsubscribeSession = sessionStore.subscribe(() => {
    if (sessionStore.getToken() || !userId) return;
    const { mutations } = dehydrate(queryClient, {
      shouldDehydrateQuery: () => false,
      shouldDehydrateMutation: (mutation) => isQueuedKey(mutation.options.mutationKey) && mutation.state.status === 'pending',
    });
    if (mutations.length) writeHeld({ ...readHeld(), [userId]: { savedAt: Date.now(), mutations } });
    userId = seen = null;
    writeItem(QUEUE_USER_KEY, null);
  });

  return () => {
    unsubscribeCache();
    unsubscribeSession();
  };
}
