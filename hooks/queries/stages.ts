import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { apiRequest, isApiError } from '@/hooks/api/api-client';
import { API } from '@/shared/api/paths';
import {
  StageListSchema,
  StageSchema,
  TemplateItemSchema,
  TemplateSchema,
  type GateSettings,
  type Stage,
  type System,
} from '@/shared/schemas/assets';

export const stageKeys = {
  all: ['stages'] as const,
  lists: () => [...stageKeys.all, 'list'] as const,
  list: (programId: string) => [...stageKeys.lists(), programId] as const,
  templates: () => [...stageKeys.all, 'template'] as const,
  template: (stageId: string) => [...stageKeys.templates(), stageId] as const,
};

export const stagesQueryOptions = (programId: string) =>
  queryOptions({
    queryKey: stageKeys.list(programId),
    queryFn: async ({ signal }) =>
      (await apiRequest(`${API.stages}?programId=${encodeURIComponent(programId)}`, { schema: StageListSchema, signal }))
        .stages.slice()
        .sort((a, b) => a.position - b.position),
  });

export function useStagesQuery(programId: string | null) {
  return useQuery({ ...stagesQueryOptions(programId ?? ''), enabled: Boolean(programId) });
}

export const stageTemplateQueryOptions = (stageId: string) =>
  queryOptions({
    queryKey: stageKeys.template(stageId),
    queryFn: ({ signal }) => apiRequest(API.stageTemplate(stageId), { schema: TemplateSchema, signal }),
  });

export function useStageTemplateQuery(stageId: string | null) {
  return useQuery({ ...stageTemplateQueryOptions(stageId ?? ''), enabled: Boolean(stageId) });
}

/** Stage names, order and counts show on the stages screen, the asset filters and the asset pages. */
function invalidateStages(queryClient: QueryClient) {
  return queryClient.invalidateQueries({ queryKey: stageKeys.lists() });
}

/** A 409 means someone saved first: reload so the next try carries the new version. */
function reloadOnConflict(queryClient: QueryClient, error: unknown) {
  if (isApiError(error) && error.status === 409) return invalidateStages(queryClient);
}

export function useCreateStageMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { programId: string; name: string }) =>
      apiRequest(API.stages, { method: 'POST', body, schema: StageSchema }),
    onSuccess: () => invalidateStages(queryClient),
  });
}

export type StageChange = {
  id: string;
  version: number;
  name?: string;
  retired?: boolean;
  gate?: GateSettings;
  minDriverLevel?: number;
};

export function useUpdateStageMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...body }: StageChange) => apiRequest(API.stage(id), { method: 'PATCH', body, schema: StageSchema }),
    onSuccess: (stage) => {
      queryClient.setQueryData<Stage[]>(stageKeys.list(stage.programId), (stages) =>
        stages?.map((item) => (item.id === stage.id ? stage : item)),
      );
      return invalidateStages(queryClient);
    },
    onError: (error) => reloadOnConflict(queryClient, error),
  });
}

export function useReorderStagesMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { programId: string; stageIds: string[] }) =>
      apiRequest(API.stagesReorder, { method: 'POST', body, schema: StageListSchema }),
    onMutate: async ({ programId, stageIds }) => {
      const key = stageKeys.list(programId);
      await queryClient.cancelQueries({ queryKey: key });
      const previous = queryClient.getQueryData<Stage[]>(key);
      if (previous) {
        const byId = new Map(previous.map((stage) => [stage.id, stage]));
        const next = stageIds.flatMap((id, position) => {
          const stage = byId.get(id);
          return stage ? [{ ...stage, position }] : [];
        });
        queryClient.setQueryData<Stage[]>(key, next);
      }
      return { previous, key };
    },
    onSuccess: ({ stages }, { programId }) => {
      queryClient.setQueryData<Stage[]>(stageKeys.list(programId), stages.slice().sort((a, b) => a.position - b.position));
    },
    onError: (_error, _body, context) => {
      if (context?.previous) queryClient.setQueryData(context.key, context.previous);
    },
    onSettled: () => invalidateStages(queryClient),
  });
}

export function useDeleteStageMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id }: { id: string }) => apiRequest(API.stage(id), { method: 'DELETE' }),
    onSuccess: () => invalidateStages(queryClient),
  });
}

export type TemplateItemDraft = {
  system: System;
  title: string;
  instructions: string;
  expectedPartNumber: string;
  expectedRevision: string;
  requiredForGate: boolean;
  hvQualified: boolean;
};

export function useAddTemplateItemMutation(stageId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: TemplateItemDraft) =>
      apiRequest(API.stageTemplateItems(stageId), { method: 'POST', body, schema: TemplateItemSchema }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: stageKeys.template(stageId) }),
  });
}

export function useUpdateTemplateItemMutation(stageId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...body }: Partial<TemplateItemDraft> & { id: string; version: number; retired?: boolean }) =>
      apiRequest(API.templateItem(id), { method: 'PATCH', body, schema: TemplateItemSchema }),
    onSettled: () => queryClient.invalidateQueries({ queryKey: stageKeys.template(stageId) }),
  });
}
