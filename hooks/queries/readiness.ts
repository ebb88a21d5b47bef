import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/hooks/api/api-client';
import {
  AssetReadinessSchema,
  GateActionListSchema,
  GateActionSchema,
  GateReviewListSchema,
  GateReviewSchema,
  ProgramReadinessSchema,
  StageTrendSchema,
  TargetDateResultSchema,
  type CreateGateReview,
  type GateAction,
  type GateDecision,
  type UpdateGateAction,
  type UpdateGateReview,
} from '@/shared/schemas/readiness';

/** The readiness and gate-review endpoints (server/routes/readiness.ts). */
export const READINESS_API = {
  assetReadiness: (assetId: string) => `/api/assets/${assetId}/readiness`,
  programReadiness: (programId: string) => `/api/programs/${programId}/readiness`,
  stageTrend: (stageId: string) => `/api/stages/${stageId}/trend`,
  stageTargetDate: (stageId: string) => `/api/stages/${stageId}/target-date`,
  gateReviews: '/api/gate-reviews',
  gateReview: (id: string) => `/api/gate-reviews/${id}`,
  gateDecision: (id: string) => `/api/gate-reviews/${id}/decision`,
  gateActions: '/api/gate-actions',
  gateAction: (id: string) => `/api/gate-actions/${id}`,
} as const;

export const readinessKeys = {
  all: ['readiness'] as const,
  asset: (assetId: string) => [...readinessKeys.all, 'asset', assetId] as const,
  program: (programId: string) => [...readinessKeys.all, 'program', programId] as const,
  trend: (stageId: string) => [...readinessKeys.all, 'trend', stageId] as const,
};

export const gateKeys = {
  all: ['gate-reviews'] as const,
  lists: () => [...gateKeys.all, 'list'] as const,
  list: (programId: string, stageId?: string) => [...gateKeys.lists(), programId, stageId ?? 'all'] as const,
  detail: (id: string) => [...gateKeys.all, 'detail', id] as const,
  /** The signed-in user's gate actions in a program. */
  myActions: (programId: string) => [...gateKeys.all, 'my-actions', programId] as const,
};

export const assetReadinessQueryOptions = (assetId: string) =>
  queryOptions({
    queryKey: readinessKeys.asset(assetId),
    queryFn: ({ signal }) => apiRequest(READINESS_API.assetReadiness(assetId), { schema: AssetReadinessSchema, signal }),
  });

export function useAssetReadinessQuery(assetId: string | null) {
  return useQuery({ ...assetReadinessQueryOptions(assetId ?? ''), enabled: Boolean(assetId) });
}

export const programReadinessQueryOptions = (programId: string) =>
  queryOptions({
    queryKey: readinessKeys.program(programId),
    queryFn: ({ signal }) => apiRequest(READINESS_API.programReadiness(programId), { schema: ProgramReadinessSchema, signal }),
  });

export function useProgramReadinessQuery(programId: string | null) {
  return useQuery({ ...programReadinessQueryOptions(programId ?? ''), enabled: Boolean(programId) });
}

export const stageTrendQueryOptions = (stageId: string) =>
  queryOptions({
    queryKey: readinessKeys.trend(stageId),
    queryFn: ({ signal }) => apiRequest(READINESS_API.stageTrend(stageId), { schema: StageTrendSchema, signal }),
  });

export function useStageTrendQuery(stageId: string | null) {
  return useQuery({ ...stageTrendQueryOptions(stageId ?? ''), enabled: Boolean(stageId) });
}

/** A lead sets or clears the gate's target date; the roll-up and the trend show the new comparison. */
export function useSetTargetDateMutation(stageId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (date: string | null) =>
      apiRequest(READINESS_API.stageTargetDate(stageId), { method: 'PUT', body: { date }, schema: TargetDateResultSchema }),
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: readinessKeys.trend(stageId) }),
        queryClient.invalidateQueries({ queryKey: [...readinessKeys.all, 'program'] }),
      ]),
  });
}

export function useGateReviewsQuery(programId: string | null, stageId?: string) {
  return useQuery({
    queryKey: gateKeys.list(programId ?? '', stageId),
    queryFn: ({ signal }) => {
      const params = new URLSearchParams({ programId: programId ?? '' });
      if (stageId) params.set('stageId', stageId);
      return apiRequest(`${READINESS_API.gateReviews}?${params.toString()}`, { schema: GateReviewListSchema, signal });
    },
    enabled: Boolean(programId),
  });
}

export function useGateReviewQuery(id: string | null) {
  return useQuery({
    queryKey: gateKeys.detail(id ?? ''),
    queryFn: ({ signal }) => apiRequest(READINESS_API.gateReview(id ?? ''), { schema: GateReviewSchema, signal }),
    enabled: Boolean(id),
  });
}

export function useOpenGateReviewMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateGateReview) => apiRequest(READINESS_API.gateReviews, { method: 'POST', body, schema: GateReviewSchema }),
    onSuccess: (review) => {
      queryClient.setQueryData(gateKeys.detail(review.id), review);
      return queryClient.invalidateQueries({ queryKey: gateKeys.lists() });
    },
  });
}

export function useGateDecisionMutation(reviewId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: GateDecision) => apiRequest(READINESS_API.gateDecision(reviewId), { method: 'POST', body, schema: GateReviewSchema }),
    onSuccess: (review) => {
      queryClient.setQueryData(gateKeys.detail(review.id), review);
      return queryClient.invalidateQueries({ queryKey: gateKeys.lists() });
    },
    // A 409 means someone recorded the decision first: show their record.
    onError: () => queryClient.invalidateQueries({ queryKey: gateKeys.detail(reviewId) }),
  });
}

/** A lead changes the attendees or notes of a review until its decision is recorded (409 afterwards, or when someone changed it first). */
export function useUpdateGateReviewMutation(reviewId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: UpdateGateReview) => apiRequest(READINESS_API.gateReview(reviewId), { method: 'PATCH', body, schema: GateReviewSchema }),
    onSuccess: (review) => {
      queryClient.setQueryData(gateKeys.detail(review.id), review);
      return queryClient.invalidateQueries({ queryKey: gateKeys.lists() });
    },
    // A 409: the review was decided or changed meanwhile; show it as it is now.
    onError: () => queryClient.invalidateQueries({ queryKey: gateKeys.detail(reviewId) }),
  });
}

/** The actions of the program's gate reviews that the signed-in user owns: open ones first by due date, then the done ones. */
export function useMyGateActionsQuery(programId: string | null, opts: { enabled?: boolean } = {}) {
  return useQuery({
    queryKey: gateKeys.myActions(programId ?? ''),
    queryFn: async ({ signal }) => {
      const params = new URLSearchParams({ programId: programId ?? '', mine: 'true' });
      return (await apiRequest(`${READINESS_API.gateActions}?${params.toString()}`, { schema: GateActionListSchema, signal })).items;
    },
    enabled: Boolean(programId) && (opts.enabled ?? true),
  });
}

/** Moves an action (its owner or a lead), with an optional note; the review page and the owner's list follow. */
export function useUpdateGateActionMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, status, note, version }: UpdateGateAction & { id: string; reviewId: string }) =>
      apiRequest(READINESS_API.gateAction(id), { method: 'PATCH', body: { status, note, version }, schema: GateActionSchema }),
    onSuccess: (action: GateAction) => {
      queryClient.setQueryData<GateAction[]>(gateKeys.myActions(action.programId), (list) => list?.map((a) => (a.id === action.id ? action : a)));
    },
    onSettled: (_action, _error, variables) =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: [...gateKeys.all, 'my-actions'] }),
        queryClient.invalidateQueries({ queryKey: gateKeys.detail(variables.reviewId) }),
        queryClient.invalidateQueries({ queryKey: gateKeys.lists() }),
      ]),
  });
}
