import type { QueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/hooks/api/api-client';
import { assetKeys, invalidateAsset, type ChecklistItemChange } from '@/hooks/queries/assets';
import { API } from '@/shared/api/paths';
import { ChecklistItemSchema } from '@/shared/schemas/assets';
import { queuedRetry, queuedRetryDelay } from './network';

/**
 * Defaults of a checklist tick (`queueKeys.checklistItem()`): the screen's own mutation runs
 * while it is open; these send a tick restored after a reload, with the version it was made on
 * (a stale one answers 409, so a tick is never applied twice over someone else's).
 */
export function checklistItemQueueDefaults(queryClient: QueryClient) {
  return {
    mutationFn: ({ itemId, assetId: _assetId, version, ...body }: ChecklistItemChange) =>
      apiRequest(API.checklistItem(itemId), { method: 'PATCH', body: { ...body, version }, schema: ChecklistItemSchema }),
    retry: queuedRetry,
    retryDelay: queuedRetryDelay,
    onSettled: (_item: unknown, _error: unknown, change: ChecklistItemChange | undefined) =>
      change
        ? Promise.all([
            queryClient.invalidateQueries({ queryKey: assetKeys.checklist(change.assetId) }),
            invalidateAsset(queryClient, change.assetId),
          ])
        : undefined,
  };
}
