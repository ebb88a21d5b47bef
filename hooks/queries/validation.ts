import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { Platform } from 'react-native';
import { apiRequest, isApiError } from '@/hooks/api/api-client';
import { randomId } from '@/hooks/api/ids';
import { uploadWithProgress } from '@/hooks/api/upload';
import { findingKeys } from '@/hooks/queries/findings';
import { VALIDATION_API } from '@/shared/api/validation-paths';
import { IDEMPOTENCY_HEADER } from '@/shared/schemas/assets';
import {
  AllocationSchema,
  CampaignListSchema,
  CampaignSchema,
  REPORT_FIELD,
  ValidationTestListSchema,
  ValidationTestSchema,
  type Allocation,
  type Campaign,
  type CampaignProgressInput,
  type CreateCampaign,
  type CreateValidationTest,
  type UpdateAllocation,
  type UpdateCampaign,
  type UpdateValidationTest,
  type ValidationTest,
} from '@/shared/schemas/validation';

export const validationKeys = {
  all: ['validation'] as const,
  testLists: () => [...validationKeys.all, 'tests'] as const,
  testList: (programId: string, stageId?: string) => [...validationKeys.testLists(), programId, stageId ?? 'all'] as const,
  tests: () => [...validationKeys.all, 'test'] as const,
  test: (id: string) => [...validationKeys.tests(), id] as const,
  campaignLists: () => [...validationKeys.all, 'campaigns'] as const,
  programCampaigns: (programId: string, stageId?: string) => [...validationKeys.campaignLists(), 'program', programId, stageId ?? 'all'] as const,
  assetCampaigns: (assetId: string) => [...validationKeys.campaignLists(), 'asset', assetId] as const,
  campaigns: () => [...validationKeys.all, 'campaign'] as const,
  campaign: (id: string) => [...validationKeys.campaigns(), id] as const,
};

const query = (params: Record<string, string | undefined>) => {
  const search = new URLSearchParams();
  for (const [key, value] of Object.entries(params)) if (value) search.set(key, value);
  return search.toString();
};

// ---- Validation plan ----------------------------------------------------------------------

export const validationTestsQueryOptions = (programId: string, stageId?: string) =>
  queryOptions({
    queryKey: validationKeys.testList(programId, stageId),
    queryFn: async ({ signal }) =>
      (await apiRequest(`${VALIDATION_API.tests}?${query({ programId, stageId })}`, { schema: ValidationTestListSchema, signal })).tests,
  });

export function useValidationTestsQuery(programId: string | null, stageId?: string) {
  return useQuery({ ...validationTestsQueryOptions(programId ?? '', stageId), enabled: Boolean(programId) });
}

export const validationTestQueryOptions = (id: string) =>
  queryOptions({
    queryKey: validationKeys.test(id),
    queryFn: ({ signal }) => apiRequest(VALIDATION_API.test(id), { schema: ValidationTestSchema, signal }),
  });

export function useValidationTestQuery(id: string | null) {
  return useQuery({ ...validationTestQueryOptions(id ?? ''), enabled: Boolean(id) });
}

/** A test's answer replaces its cached copy; the plan lists reload (counts and status move with it). */
function testChanged(queryClient: QueryClient, test: ValidationTest) {
  queryClient.setQueryData(validationKeys.test(test.id), test);
  return queryClient.invalidateQueries({ queryKey: validationKeys.testLists() });
}

/** The server's copy when a save lost the race (409 `details.current`), else null. */
export function conflictCurrentTest(error: unknown): ValidationTest | null {
  if (!isApiError(error) || error.status !== 409 || !error.details || typeof error.details !== 'object') return null;
  const parsed = ValidationTestSchema.safeParse((error.details as { current?: unknown }).current);
  return parsed.success ? parsed.data : null;
}

export function useCreateValidationTestMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateValidationTest) => apiRequest(VALIDATION_API.tests, { method: 'POST', body, schema: ValidationTestSchema }),
    onSuccess: (test) => testChanged(queryClient, test),
  });
}

export function useUpdateValidationTestMutation(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: UpdateValidationTest) => apiRequest(VALIDATION_API.test(id), { method: 'PATCH', body, schema: ValidationTestSchema }),
    onSuccess: (test) => testChanged(queryClient, test),
    onError: (error) => {
      const current = conflictCurrentTest(error);
      if (current) return testChanged(queryClient, current);
    },
  });
}

export function useAllocateAssetMutation(testId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { assetId: string }) =>
      apiRequest(VALIDATION_API.testAllocations(testId), { method: 'POST', body, schema: ValidationTestSchema }),
    onSuccess: (test) => testChanged(queryClient, test),
  });
}

/** Puts one allocation's new copy into its test, then reloads the test (status and passed count follow it). */
function allocationChanged(queryClient: QueryClient, allocation: Allocation) {
  queryClient.setQueryData<ValidationTest>(validationKeys.test(allocation.testId), (test) =>
    test ? { ...test, allocations: test.allocations.map((a) => (a.id === allocation.id ? allocation : a)) } : test,
  );
  return Promise.all([
    queryClient.invalidateQueries({ queryKey: validationKeys.test(allocation.testId) }),
    queryClient.invalidateQueries({ queryKey: validationKeys.testLists() }),
  ]);
}

export function useUpdateAllocationMutation(testId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...body }: UpdateAllocation & { id: string }) =>
      apiRequest(VALIDATION_API.allocation(id), { method: 'PATCH', body, schema: AllocationSchema }),
    onSuccess: (allocation) => {
      // A failure files a finding: the findings lists show it too.
      if (allocation.findingId) void queryClient.invalidateQueries({ queryKey: findingKeys.all });
      return allocationChanged(queryClient, allocation);
    },
    onError: (error) => {
      if (isApiError(error) && error.status === 409) return queryClient.invalidateQueries({ queryKey: validationKeys.test(testId) });
    },
  });
}

/** A report picked for upload: a Blob on the web, a file URI on a phone. */
export type ReportFile = { name: string; type: string; size: number | null; uri: string; blob?: Blob };

export type UploadReportVariables = {
  allocationId: string;
  file: ReportFile;
  /** One key per picked file, kept across retries, so a retry never stores it twice. */
  idempotencyKey: string;
  onProgress?: (fraction: number) => void;
};

function reportForm(file: ReportFile): FormData {
  const form = new FormData();
  if (Platform.OS === 'web' && file.blob) form.append(REPORT_FIELD, file.blob, file.name);
  // React Native's FormData takes a { uri, name, type } part for a file on the device.
  else form.append(REPORT_FIELD, { uri: file.uri, name: file.name, type: file.type } as unknown as Blob);
  return form;
}

export function useUploadReportMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ allocationId, file, idempotencyKey, onProgress }: UploadReportVariables) =>
      uploadWithProgress(VALIDATION_API.allocationReport(allocationId), {
        body: reportForm(file),
        schema: AllocationSchema,
        headers: { [IDEMPOTENCY_HEADER]: idempotencyKey },
        onProgress,
      }),
    onSuccess: (allocation) => allocationChanged(queryClient, allocation),
  });
}

// ---- Test campaigns -----------------------------------------------------------------------

export const programCampaignsQueryOptions = (programId: string, stageId?: string) =>
  queryOptions({
    queryKey: validationKeys.programCampaigns(programId, stageId),
    queryFn: async ({ signal }) =>
      (await apiRequest(`${VALIDATION_API.programCampaigns}?${query({ programId, stageId })}`, { schema: CampaignListSchema, signal })).campaigns,
  });

export function useProgramCampaignsQuery(programId: string | null, stageId?: string) {
  return useQuery({ ...programCampaignsQueryOptions(programId ?? '', stageId), enabled: Boolean(programId) });
}

export const assetCampaignsQueryOptions = (assetId: string) =>
  queryOptions({
    queryKey: validationKeys.assetCampaigns(assetId),
    queryFn: async ({ signal }) => (await apiRequest(VALIDATION_API.assetCampaigns(assetId), { schema: CampaignListSchema, signal })).campaigns,
  });

export function useAssetCampaignsQuery(assetId: string | null) {
  return useQuery({ ...assetCampaignsQueryOptions(assetId ?? ''), enabled: Boolean(assetId) });
}

/** A campaign's answer replaces its copy in the asset's list; the program's list reloads. */
function campaignChanged(queryClient: QueryClient, campaign: Campaign) {
  queryClient.setQueryData(validationKeys.campaign(campaign.id), campaign);
  queryClient.setQueryData<Campaign[]>(validationKeys.assetCampaigns(campaign.assetId), (list) => {
    if (!list) return list;
    return list.some((c) => c.id === campaign.id) ? list.map((c) => (c.id === campaign.id ? campaign : c)) : [...list, campaign];
  });
  return queryClient.invalidateQueries({ queryKey: validationKeys.campaignLists() });
}

export function conflictCurrentCampaign(error: unknown): Campaign | null {
  if (!isApiError(error) || error.status !== 409 || !error.details || typeof error.details !== 'object') return null;
  const parsed = CampaignSchema.safeParse((error.details as { current?: unknown }).current);
  return parsed.success ? parsed.data : null;
}

export function useCreateCampaignMutation(assetId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateCampaign) =>
      apiRequest(VALIDATION_API.assetCampaigns(assetId), { method: 'POST', body, schema: CampaignSchema }),
    onSuccess: (campaign) => campaignChanged(queryClient, campaign),
  });
}

export function useUpdateCampaignMutation(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: UpdateCampaign) => apiRequest(VALIDATION_API.campaign(id), { method: 'PATCH', body, schema: CampaignSchema }),
    onSuccess: (campaign) => campaignChanged(queryClient, campaign),
    onError: (error) => {
      const current = conflictCurrentCampaign(error);
      if (current) return campaignChanged(queryClient, current);
    },
  });
}

/** Totals, not increments: sending the same hours twice is harmless, so no version is sent. */
export function useRecordCampaignProgressMutation(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CampaignProgressInput) =>
      apiRequest(VALIDATION_API.campaignProgress(id), { method: 'POST', body, schema: CampaignSchema }),
    onSuccess: (campaign) => campaignChanged(queryClient, campaign),
  });
}

/** A log adds to the totals, so each text goes with one Idempotency-Key, kept when it is sent again. */
export function useImportCampaignLogMutation(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ csv, idempotencyKey = randomId() }: { csv: string; idempotencyKey?: string }) =>
      apiRequest(VALIDATION_API.campaignLog(id), {
        method: 'POST',
        body: { csv },
        schema: CampaignSchema,
        headers: { [IDEMPOTENCY_HEADER]: idempotencyKey },
      }),
    onSuccess: (campaign) => campaignChanged(queryClient, campaign),
  });
}

export type CampaignLogError = { line: number; message: string };

/** The bad lines of a refused log (400 `campaign/log-invalid`, `details.lines`). */
export function campaignLogErrors(error: unknown): CampaignLogError[] {
  if (!isApiError(error) || !error.details || typeof error.details !== 'object') return [];
  const lines = (error.details as { lines?: unknown }).lines;
  if (!Array.isArray(lines)) return [];
  return lines.filter(
    (l): l is CampaignLogError => Boolean(l) && typeof l.line === 'number' && typeof l.message === 'string',
  );
}
