import {
  infiniteQueryOptions,
  mutationOptions,
  queryOptions,
  useInfiniteQuery,
  useMutation,
  useMutationState,
  useQuery,
  useQueryClient,
  type QueryClient,
} from '@tanstack/react-query';
import { apiRequest, isApiError } from '@/hooks/api/api-client';
import { uploadWithProgress } from '@/hooks/api/upload';
import { isNetworkError, queuedRetry, queuedRetryDelay } from '@/hooks/offline/network';
import { photoFormData, type QueuedPhoto } from '@/hooks/offline/photo-data';
import { queueKeys } from '@/hooks/offline/queue-keys';
import { reportProgress } from '@/hooks/offline/send-progress';
import { invalidateAsset } from '@/hooks/queries/assets';
import { useProgramWorkersQuery } from '@/hooks/queries/members';
import { uploadErrorMessage } from '@/hooks/use-photo-upload';
import { FINDING_API } from '@/shared/api/finding-paths';
import { IDEMPOTENCY_HEADER, PhotoSchema, type Photo, type System } from '@/shared/schemas/assets';
import {
  CommentListSchema,
  CommentSchema,
  EmailPrefsSchema,
  FindingHistorySchema,
  FindingListSchema,
  FindingSchema,
  type Comment,
  type CreateFinding,
  type EmailPrefs,
  type Finding,
  type FindingSeverity,
  type FindingStatusFilterSchema,
  type UpdateFinding,
} from '@/shared/schemas/findings';
import type { z } from 'zod';

export type FindingSort = 'due' | 'age' | 'updated';
export type FindingMine = 'owner' | 'watching' | 'created';
export type FindingStatusFilter = z.infer<typeof FindingStatusFilterSchema>;

export type FindingFilters = {
  programId: string;
  assetId?: string;
  mine?: FindingMine;
  severity?: FindingSeverity;
  /** Undefined lists every status; `active` all but verified and rejected. */
  status?: FindingStatusFilter;
  system?: System;
  /** A user id, or `none` for findings nobody owns. */
  ownerId?: string;
  overdue?: boolean;
  sort: FindingSort;
  dir: 'asc' | 'desc';
};

export const FINDING_PAGE_SIZE = 30;

export const findingKeys = {
  all: ['findings'] as const,
  lists: () => [...findingKeys.all, 'list'] as const,
  list: (filters: FindingFilters) => [...findingKeys.lists(), filters] as const,
  details: () => [...findingKeys.all, 'detail'] as const,
  detail: (id: string) => [...findingKeys.details(), id] as const,
  comments: (id: string) => [...findingKeys.all, 'comments', id] as const,
  history: (id: string) => [...findingKeys.all, 'history', id] as const,
  people: (programId: string) => [...findingKeys.all, 'people', programId] as const,
  emailPrefs: () => [...findingKeys.all, 'email-prefs'] as const,
};

export function findingQueryString(filters: FindingFilters, extra: Record<string, string | number | undefined> = {}): string {
  const params = new URLSearchParams();
  const entries: Record<string, string | number | boolean | undefined> = { ...filters, ...extra };
  for (const [key, value] of Object.entries(entries)) {
    if (value === undefined || value === '') continue;
    params.set(key, String(value));
  }
  return params.toString();
}

export const findingListQueryOptions = (filters: FindingFilters) =>
  infiniteQueryOptions({
    queryKey: findingKeys.list(filters),
    initialPageParam: null as string | null,
    queryFn: ({ pageParam, signal }) =>
      apiRequest(`${FINDING_API.findings}?${findingQueryString(filters, { cursor: pageParam ?? undefined, limit: FINDING_PAGE_SIZE })}`, {
        schema: FindingListSchema,
        signal,
      }),
    getNextPageParam: (last) => last.nextCursor,
  });

/** Keyset pages of findings; the first page's `counts` are the open findings per severity for the other filters. */
export function useFindingListQuery(filters: FindingFilters | null) {
  const fallback: FindingFilters = { programId: '', sort: 'due', dir: 'asc' };
  return useInfiniteQuery({ ...findingListQueryOptions(filters ?? fallback), enabled: Boolean(filters?.programId) });
}

export const findingQueryOptions = (id: string) =>
  queryOptions({
    queryKey: findingKeys.detail(id),
    queryFn: ({ signal }) => apiRequest(FINDING_API.finding(id), { schema: FindingSchema, signal }),
  });

export function useFindingQuery(id: string | null) {
  return useQuery({ ...findingQueryOptions(id ?? ''), enabled: Boolean(id) });
}

export function useFindingCommentsQuery(id: string | null) {
  return useQuery({
    queryKey: findingKeys.comments(id ?? ''),
    queryFn: async ({ signal }) => (await apiRequest(FINDING_API.findingComments(id ?? ''), { schema: CommentListSchema, signal })).items,
    enabled: Boolean(id),
  });
}

export function useFindingHistoryQuery(id: string | null) {
  return useQuery({
    queryKey: findingKeys.history(id ?? ''),
    queryFn: async ({ signal }) => (await apiRequest(FINDING_API.findingHistory(id ?? ''), { schema: FindingHistorySchema, signal })).entries,
    enabled: Boolean(id),
  });
}

/**
 * People to offer as owner or watcher: the program's members who work in it (GET
 * /api/programs/:id/members, administrators left out: they own no findings), by name.
 */
export function useProgramPeopleQuery(programId: string | null) {
  return useProgramWorkersQuery(programId);
}

/** A finding change shows in its page, its history, every list, and on its asset (which may be cleared or not). */
export function invalidateFinding(queryClient: QueryClient, finding: Pick<Finding, 'id' | 'assetId'>) {
  return Promise.all([
    queryClient.invalidateQueries({ queryKey: findingKeys.lists() }),
    queryClient.invalidateQueries({ queryKey: findingKeys.history(finding.id) }),
    finding.assetId ? invalidateAsset(queryClient, finding.assetId) : null,
  ]);
}

// ---- Capture (queued while offline) ---------------------------------------------------------

/** A finding as captured: everything needed to send it later, as JSON that survives a reload. */
export type FindingCapture = {
  /** The finding's Idempotency-Key, made once per capture: a resend never files it twice. */
  key: string;
  body: CreateFinding;
  photos: QueuedPhoto[];
  /** For the waiting list on screen. */
  assetTag?: string | null;
};

export type FindingCaptureResult = { finding: Finding; photoErrors: string[] };

/** Photos already stored, by their key, so a resend after a lost connection skips them. */
const storedPhotos = new Map<string, Photo>();

const retryable = (error: unknown) =>
  isNetworkError(error) || (isApiError(error) && (error.status >= 500 || error.status === 429 || error.code === 'request/in-progress'));

/**
 * Files the finding, then sends its photos one by one, each with its own key. A photo the server
 * refuses (too large, not an image) does not undo the finding: it is reported beside it.
 */
export async function sendFindingCapture(capture: FindingCapture): Promise<FindingCaptureResult> {
  const steps = 1 + capture.photos.length;
  reportProgress(capture.key, { step: 0, steps, fraction: 0 });
  try {
    const finding = await apiRequest(FINDING_API.findings, {
      method: 'POST',
      body: capture.body,
      schema: FindingSchema,
      headers: { [IDEMPOTENCY_HEADER]: capture.key },
    });
    const photos: Photo[] = [];
    const photoErrors: string[] = [];
    for (const [index, photo] of capture.photos.entries()) {
      const stored = storedPhotos.get(photo.key);
      if (stored) {
        photos.push(stored);
        continue;
      }
      if (!photo.dataUrl && !photo.uri) {
        photoErrors.push(`Photo ${index + 1}: the device had no room to keep it while offline. Add it again on the finding’s page.`);
        continue;
      }
      reportProgress(capture.key, { step: index + 1, steps, fraction: 0 });
      try {
        const saved = await uploadWithProgress(FINDING_API.findingPhotos(finding.id), {
          body: photoFormData(photo),
          schema: PhotoSchema,
          headers: { [IDEMPOTENCY_HEADER]: photo.key },
          onProgress: (fraction) => reportProgress(capture.key, { step: index + 1, steps, fraction }),
        });
        storedPhotos.set(photo.key, saved);
        photos.push(saved);
      } catch (error) {
        if (retryable(error)) throw error;
        photoErrors.push(`Photo ${index + 1}: ${uploadErrorMessage(error)}`);
      }
    }
    for (const photo of capture.photos) storedPhotos.delete(photo.key);
    const known = new Set(finding.photos.map((photo) => photo.id));
    return { finding: { ...finding, photos: [...finding.photos, ...photos.filter((photo) => !known.has(photo.id))] }, photoErrors };
  } finally {
    reportProgress(capture.key, null);
  }
}

/** Shared by `useCreateFindingMutation` and the query client's defaults (which resume it after a reload). */
export function findingCaptureMutationOptions(queryClient: QueryClient) {
  return mutationOptions({
    mutationKey: queueKeys.findingCreate(),
    mutationFn: sendFindingCapture,
    retry: queuedRetry,
    retryDelay: queuedRetryDelay,
    onSuccess: ({ finding }: FindingCaptureResult) => {
      queryClient.setQueryData(findingKeys.detail(finding.id), finding);
      void invalidateFinding(queryClient, finding);
    },
  });
}

export function useCreateFindingMutation() {
  const queryClient = useQueryClient();
  return useMutation(findingCaptureMutationOptions(queryClient));
}

// ---- Comments (queued while offline) ---------------------------------------------------------

export type CommentDraft = {
  /** The comment's Idempotency-Key. */
  key: string;
  findingId: string;
  body: string;
  /** When it was written on the device (ISO time). */
  writtenAt: string;
};

export const sendComment = (draft: CommentDraft) =>
  apiRequest(FINDING_API.findingComments(draft.findingId), {
    method: 'POST',
    body: { body: draft.body },
    schema: CommentSchema,
    headers: { [IDEMPOTENCY_HEADER]: draft.key },
  });

export function commentMutationOptions(queryClient: QueryClient) {
  return mutationOptions({
    mutationKey: queueKeys.findingComment(),
    mutationFn: sendComment,
    retry: queuedRetry,
    retryDelay: queuedRetryDelay,
    onSuccess: (comment: Comment, draft: CommentDraft) => {
      queryClient.setQueryData<Comment[]>(findingKeys.comments(draft.findingId), (list) =>
        list && !list.some((item) => item.id === comment.id) ? [...list, comment] : list,
      );
      void Promise.all([
        queryClient.invalidateQueries({ queryKey: findingKeys.comments(draft.findingId) }),
        queryClient.invalidateQueries({ queryKey: findingKeys.history(draft.findingId) }),
        queryClient.invalidateQueries({ queryKey: findingKeys.detail(draft.findingId) }),
      ]);
    },
  });
}

export function useAddCommentMutation() {
  const queryClient = useQueryClient();
  return useMutation(commentMutationOptions(queryClient));
}

/** Comments written on this device that have not reached the server yet. */
export function usePendingComments(findingId: string): CommentDraft[] {
  return useMutationState({
    filters: {
      mutationKey: queueKeys.findingComment(),
      status: 'pending',
      predicate: (mutation) => (mutation.state.variables as CommentDraft | undefined)?.findingId === findingId,
    },
    select: (mutation) => mutation.state.variables as CommentDraft,
  });
}

// ---- Changes that need a connection ---------------------------------------------------------

/** The server's copy when a change lost the race (409 `details.current`), else null. */
export function findingConflictCurrent(error: unknown): Finding | null {
  if (!isApiError(error) || error.status !== 409 || !error.details || typeof error.details !== 'object') return null;
  const parsed = FindingSchema.safeParse((error.details as { current?: unknown }).current);
  return parsed.success ? parsed.data : null;
}

/**
 * Status moves, detail edits and watching, each sent with the version the page showed. On a 409
 * the page takes the server's copy; the caller keeps the person's edit and offers to re-apply it.
 */
export function useUpdateFindingMutation(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: UpdateFinding) => apiRequest(FINDING_API.finding(id), { method: 'PATCH', body, schema: FindingSchema }),
    onSuccess: (finding) => {
      queryClient.setQueryData(findingKeys.detail(id), finding);
      void invalidateFinding(queryClient, finding);
    },
    onError: (error) => {
      const current = findingConflictCurrent(error);
      if (current) queryClient.setQueryData(findingKeys.detail(id), current);
    },
  });
}

/** A photo added on the finding's page (needs a connection; the capture's photos go with the queue). */
export function useAddFindingPhotoMutation(findingId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ photo, onProgress }: { photo: QueuedPhoto; onProgress?: (fraction: number) => void }) =>
      uploadWithProgress(FINDING_API.findingPhotos(findingId), {
        body: photoFormData(photo),
        schema: PhotoSchema,
        headers: { [IDEMPOTENCY_HEADER]: photo.key },
        onProgress,
      }),
    onSuccess: (photo) => {
      queryClient.setQueryData<Finding>(findingKeys.detail(findingId), (finding) =>
        finding && !finding.photos.some((item) => item.id === photo.id) ? { ...finding, photos: [...finding.photos, photo] } : finding,
      );
      void queryClient.invalidateQueries({ queryKey: findingKeys.history(findingId) });
    },
  });
}

// ---- E-mail preferences ---------------------------------------------------------------------

export function useEmailPrefsQuery() {
  return useQuery({
    queryKey: findingKeys.emailPrefs(),
    queryFn: ({ signal }) => apiRequest(FINDING_API.emailPrefs, { schema: EmailPrefsSchema, signal }),
  });
}

/** Shows the new setting at once and puts the old one back if the server refuses. */
export function useUpdateEmailPrefsMutation() {
  const queryClient = useQueryClient();
  const key = findingKeys.emailPrefs();
  return useMutation({
    mutationFn: (prefs: EmailPrefs) => apiRequest(FINDING_API.emailPrefs, { method: 'PUT', body: prefs, schema: EmailPrefsSchema }),
    onMutate: async (prefs) => {
      await queryClient.cancelQueries({ queryKey: key });
      const previous = queryClient.getQueryData<EmailPrefs>(key);
      queryClient.setQueryData(key, prefs);
      return { previous };
    },
    onError: (_error, _prefs, context) => {
      if (context?.previous) queryClient.setQueryData(key, context.previous);
    },
    onSuccess: (prefs) => queryClient.setQueryData(key, prefs),
  });
}
