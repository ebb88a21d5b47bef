import {
  infiniteQueryOptions,
  queryOptions,
  useInfiniteQuery,
  useMutation,
  useQuery,
  useQueryClient,
  type QueryClient,
} from '@tanstack/react-query';
import { apiRequest, isApiError } from '@/hooks/api/api-client';
import { queueKeys } from '@/hooks/offline/queue-keys';
import { stageKeys } from '@/hooks/queries/stages';
import { API } from '@/shared/api/paths';
import { checklistProgress } from '@/shared/domain/checklist';
import {
  AssetDetailSchema,
  AssetHistorySchema,
  AssetListSchema,
  ChecklistItemSchema,
  ChecklistSchema,
  type AssetDetail,
  type AssetKind,
  type AssetStatus,
  type Checklist,
  type ChecklistItem,
  type CreateAsset,
  type Photo,
  type UpdateAsset,
  type UpdateChecklistItem,
} from '@/shared/schemas/assets';

export type AssetSort = 'tag' | 'updated' | 'stage' | 'status' | 'location';

export type AssetFilters = {
  programId: string;
  stage?: string;
  status?: AssetStatus;
  kind?: AssetKind;
  location?: string;
  q?: string;
  sort: AssetSort;
  dir: 'asc' | 'desc';
};

export const ASSET_PAGE_SIZE = 50;

export const assetKeys = {
  all: ['assets'] as const,
  lists: () => [...assetKeys.all, 'list'] as const,
  list: (filters: AssetFilters) => [...assetKeys.lists(), filters] as const,
  details: () => [...assetKeys.all, 'detail'] as const,
  detail: (id: string) => [...assetKeys.details(), id] as const,
  checklists: () => [...assetKeys.all, 'checklist'] as const,
  checklist: (assetId: string, visitId?: string) => [...assetKeys.checklists(), assetId, visitId ?? 'current'] as const,
  history: (id: string) => [...assetKeys.all, 'history', id] as const,
};

/** The list's filters as a query string, without empty values; the CSV export takes the same. */
export function assetQueryString(filters: AssetFilters, extra: Record<string, string | number | undefined> = {}): string {
  const params = new URLSearchParams();
  const entries: Record<string, string | number | undefined> = { ...filters, ...extra };
  for (const [key, value] of Object.entries(entries)) {
    if (value === undefined || value === '') continue;
    params.set(key, String(value).trim());
  }
  return params.toString();
}

export const assetListQueryOptions = (filters: AssetFilters) =>
  infiniteQueryOptions({
    queryKey: assetKeys.list(filters),
    initialPageParam: null as string | null,
    queryFn: ({ pageParam, signal }) =>
      apiRequest(`${API.assets}?${assetQueryString(filters, { cursor: pageParam ?? undefined, limit: ASSET_PAGE_SIZE })}`, {
        schema: AssetListSchema,
        signal,
      }),
    getNextPageParam: (last) => last.nextCursor,
  });

/** Keyset pages of the program's assets; `fetchNextPage` when the list's end comes into view. */
export function useAssetListQuery(filters: AssetFilters | null) {
  const fallback: AssetFilters = { programId: '', sort: 'tag', dir: 'asc' };
  return useInfiniteQuery({ ...assetListQueryOptions(filters ?? fallback), enabled: Boolean(filters?.programId) });
}

export const assetQueryOptions = (id: string) =>
  queryOptions({
    queryKey: assetKeys.detail(id),
    queryFn: ({ signal }) => apiRequest(API.asset(id), { schema: AssetDetailSchema, signal }),
  });

export function useAssetQuery(id: string | null) {
  return useQuery({ ...assetQueryOptions(id ?? ''), enabled: Boolean(id) });
}

export const checklistQueryOptions = (assetId: string, visitId?: string) =>
  queryOptions({
    queryKey: assetKeys.checklist(assetId, visitId),
    queryFn: ({ signal }) =>
      apiRequest(`${API.assetChecklist(assetId)}${visitId ? `?visitId=${encodeURIComponent(visitId)}` : ''}`, {
        schema: ChecklistSchema,
        signal,
      }),
  });

export function useChecklistQuery(assetId: string | null, visitId?: string) {
  return useQuery({ ...checklistQueryOptions(assetId ?? '', visitId), enabled: Boolean(assetId) });
}

export const assetHistoryQueryOptions = (id: string) =>
  queryOptions({
    queryKey: assetKeys.history(id),
    queryFn: async ({ signal }) => (await apiRequest(API.assetHistory(id), { schema: AssetHistorySchema, signal })).entries,
  });

export function useAssetHistoryQuery(id: string | null) {
  return useQuery({ ...assetHistoryQueryOptions(id ?? ''), enabled: Boolean(id) });
}

/** An asset change shows in its page, its checklist, its history, the lists and the stage counts. */
export function invalidateAsset(queryClient: QueryClient, id: string) {
  return Promise.all([
    queryClient.invalidateQueries({ queryKey: assetKeys.detail(id) }),
    queryClient.invalidateQueries({ queryKey: [...assetKeys.checklists(), id] }),
    queryClient.invalidateQueries({ queryKey: assetKeys.history(id) }),
    queryClient.invalidateQueries({ queryKey: assetKeys.lists() }),
  ]);
}

export function useCreateAssetMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateAsset) => apiRequest(API.assets, { method: 'POST', body, schema: AssetDetailSchema }),
    onSuccess: (asset) => {
      queryClient.setQueryData(assetKeys.detail(asset.id), asset);
      return Promise.all([
        queryClient.invalidateQueries({ queryKey: assetKeys.lists() }),
        queryClient.invalidateQueries({ queryKey: stageKeys.lists() }),
      ]);
    },
  });
}

/** The server's copy when a save lost the race (409 `details.current`), else null. */
export function conflictCurrent(error: unknown): AssetDetail | null {
  if (!isApiError(error) || error.status !== 409 || !error.details || typeof error.details !== 'object') return null;
  const parsed = AssetDetailSchema.safeParse((error.details as { current?: unknown }).current);
  return parsed.success ? parsed.data : null;
}

export function useUpdateAssetMutation(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: UpdateAsset) => apiRequest(API.asset(id), { method: 'PATCH', body, schema: AssetDetailSchema }),
    onSuccess: (asset) => {
      queryClient.setQueryData(assetKeys.detail(id), asset);
      return invalidateAsset(queryClient, id);
    },
    // On a 409 the page shows the server's copy; the form keeps the user's draft and offers to re-apply it.
    onError: (error) => {
      const current = conflictCurrent(error);
      if (current) queryClient.setQueryData(assetKeys.detail(id), current);
    },
  });
}

export function useMoveAssetStageMutation(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { stageId: string; version: number }) =>
      apiRequest(API.assetStage(id), { method: 'POST', body, schema: AssetDetailSchema }),
    onSuccess: (asset) => {
      queryClient.setQueryData(assetKeys.detail(id), asset);
      return Promise.all([invalidateAsset(queryClient, id), queryClient.invalidateQueries({ queryKey: stageKeys.lists() })]);
    },
    onError: (error) => {
      const current = conflictCurrent(error);
      if (current) queryClient.setQueryData(assetKeys.detail(id), current);
    },
  });
}

// ---- Checklist items ------------------------------------------------------------------------

export type ChecklistItemChange = Omit<UpdateChecklistItem, 'version'> & { itemId: string; assetId: string; version: number };

function replaceItem(checklist: Checklist, itemId: string, patch: (item: ChecklistItem) => ChecklistItem): Checklist {
  const groups = checklist.groups.map((group) => {
    if (!group.items.some((item) => item.id === itemId)) return group;
    const items = group.items.map((item) => (item.id === itemId ? patch(item) : item));
    return { ...group, items, progress: checklistProgress(items) };
  });
  return { ...checklist, groups, progress: checklistProgress(groups.flatMap((group) => group.items)) };
}

function cachedItem(checklist: Checklist | undefined, itemId: string): ChecklistItem | undefined {
  return checklist?.groups.flatMap((group) => group.items).find((item) => item.id === itemId);
}

/** The server's copy of an item when a change lost the race (409 `details.current`), else null. */
export function itemConflictCurrent(error: unknown): ChecklistItem | null {
  if (!isApiError(error) || error.status !== 409 || !error.details || typeof error.details !== 'object') return null;
  const parsed = ChecklistItemSchema.safeParse((error.details as { current?: unknown }).current);
  return parsed.success ? parsed.data : null;
}

/**
 * Marks an item at once on screen and rolls back if the server refuses. Changes to one item run
 * one after another (the mutation scope), each sending the version the previous answer left, so
 * quick taps do not trip over each other's versions.
 */
export function useUpdateChecklistItemMutation(assetId: string) {
  const queryClient = useQueryClient();
  const key = assetKeys.checklist(assetId);
  return useMutation({
    // Queued offline: kept on the device and resumed after a reload (defaults in hooks/offline).
    mutationKey: queueKeys.checklistItem(),
    mutationFn: ({ itemId, assetId: _assetId, version, ...body }: ChecklistItemChange) => {
      const latest = cachedItem(queryClient.getQueryData<Checklist>(key), itemId)?.version ?? version;
      return apiRequest(API.checklistItem(itemId), {
        method: 'PATCH',
        body: { ...body, version: Math.max(latest, version) },
        schema: ChecklistItemSchema,
      });
    },
    scope: { id: `checklist-${assetId}` },
    onMutate: async (change) => {
      await queryClient.cancelQueries({ queryKey: key });
      const previous = queryClient.getQueryData<Checklist>(key);
      if (previous) {
        queryClient.setQueryData<Checklist>(
          key,
          replaceItem(previous, change.itemId, (item) => ({
            ...item,
            state: change.state,
            fittedPartNumber: change.fittedPartNumber ?? item.fittedPartNumber,
            fittedRevision: change.fittedRevision ?? item.fittedRevision,
            notes: change.notes ?? item.notes,
            naReason: change.state === 'not-applicable' ? (change.naReason ?? item.naReason) : '',
          })),
        );
      }
      return { previous };
    },
    onError: (error, change, context) => {
      const current = itemConflictCurrent(error);
      const base = context?.previous ?? queryClient.getQueryData<Checklist>(key);
      if (!base) return;
      const original = cachedItem(base, change.itemId);
      queryClient.setQueryData<Checklist>(
        key,
        replaceItem(base, change.itemId, (item) => current ?? original ?? item),
      );
    },
    onSuccess: (item) => {
      const now = queryClient.getQueryData<Checklist>(key);
      if (now) queryClient.setQueryData<Checklist>(key, replaceItem(now, item.id, () => item));
    },
    onSettled: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: assetKeys.detail(assetId) }),
        queryClient.invalidateQueries({ queryKey: assetKeys.history(assetId) }),
        queryClient.invalidateQueries({ queryKey: assetKeys.lists() }),
      ]),
  });
}

/** After an upload: the asset page and checklist show the new photo. */
export function usePhotoAdded() {
  const queryClient = useQueryClient();
  return (photo: Photo) => {
    queryClient.setQueryData<AssetDetail>(assetKeys.detail(photo.assetId), (asset) =>
      asset && !asset.photos.some((item) => item.id === photo.id) ? { ...asset, photos: [...asset.photos, photo] } : asset,
    );
    if (photo.checklistItemId) {
      const itemId = photo.checklistItemId;
      const key = assetKeys.checklist(photo.assetId);
      const checklist = queryClient.getQueryData<Checklist>(key);
      if (checklist && cachedItem(checklist, itemId)) {
        queryClient.setQueryData<Checklist>(
          key,
          replaceItem(checklist, itemId, (item) =>
            item.photos.some((p) => p.id === photo.id) ? item : { ...item, photos: [...item.photos, photo] },
          ),
        );
      }
    }
    return invalidateAsset(queryClient, photo.assetId);
  };
}
