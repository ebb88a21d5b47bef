import { infiniteQueryOptions, queryOptions, useInfiniteQuery, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { apiRequest, isApiError } from '@/hooks/api/api-client';
import { randomId } from '@/hooks/api/ids';
import { uploadWithProgress } from '@/hooks/api/upload';
import { SOFTWARE_API } from '@/shared/api/software-paths';
import {
  AssetSoftwareSchema,
  BaselineDiffSchema,
  BaselineListSchema,
  BaselineSchema,
  EcuListSchema,
  EcuSchema,
  IMPORT_FILE_FIELD,
  ImportPreviewSchema,
  ImportResultSchema,
  ImportRowSchema,
  ReflashListSchema,
  SoftwareMatrixSchema,
  type AssetSoftware,
  type Baseline,
  type ConformanceStatus,
  type CreateBaseline,
  type CreateEcu,
  type Ecu,
  type ImportRow,
  type RecordFlash,
  type ReflashDone,
  type UpdateBaseline,
  type UpdateEcu,
} from '@/shared/schemas/software';
import { z } from 'zod';

export type MatrixFilters = {
  programId: string;
  stageId?: string;
  status?: ConformanceStatus;
  ecuId?: string;
};

export type ReflashFilters = {
  programId: string;
  stageId?: string;
  ecuId?: string;
  /** YYYY-MM-DD: only assets with a planned use starting by the end of that day. */
  before?: string;
  /** Only assets allocated to this validation test. */
  testId?: string;
};

export const MATRIX_PAGE_SIZE = 50;

export const softwareKeys = {
  all: ['software'] as const,
  matrices: () => [...softwareKeys.all, 'matrix'] as const,
  matrix: (filters: MatrixFilters) => [...softwareKeys.matrices(), filters] as const,
  reflashes: () => [...softwareKeys.all, 'reflash'] as const,
  reflash: (filters: ReflashFilters) => [...softwareKeys.reflashes(), filters] as const,
  assets: () => [...softwareKeys.all, 'asset'] as const,
  asset: (assetId: string) => [...softwareKeys.assets(), assetId] as const,
  ecus: (programId: string) => [...softwareKeys.all, 'ecus', programId] as const,
  baselineLists: () => [...softwareKeys.all, 'baselines'] as const,
  baselineList: (programId: string) => [...softwareKeys.baselineLists(), programId] as const,
  baselines: () => [...softwareKeys.all, 'baseline'] as const,
  baseline: (id: string) => [...softwareKeys.baselines(), id] as const,
  diff: (fromId: string, toId: string) => [...softwareKeys.all, 'diff', fromId, toId] as const,
};

/** A query string without empty values. */
export function softwareQueryString(values: Record<string, string | number | undefined | null>): string {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(values)) {
    if (value === undefined || value === null || value === '') continue;
    params.set(key, String(value));
  }
  return params.toString();
}

/** Anything installed changed: the matrix, the reflash list and the asset's tab all move. */
export function invalidateSoftware(queryClient: QueryClient) {
  return Promise.all([
    queryClient.invalidateQueries({ queryKey: softwareKeys.matrices() }),
    queryClient.invalidateQueries({ queryKey: softwareKeys.reflashes() }),
    queryClient.invalidateQueries({ queryKey: softwareKeys.assets() }),
  ]);
}

// ---- Matrix and reflash list

export const matrixQueryOptions = (filters: MatrixFilters) =>
  infiniteQueryOptions({
    queryKey: softwareKeys.matrix(filters),
    initialPageParam: null as string | null,
    queryFn: ({ pageParam, signal }) =>
      apiRequest(`${SOFTWARE_API.matrix}?${softwareQueryString({ ...filters, cursor: pageParam, limit: MATRIX_PAGE_SIZE })}`, {
        schema: SoftwareMatrixSchema,
        signal,
      }),
    getNextPageParam: (last) => last.nextCursor,
  });

export function useSoftwareMatrixQuery(filters: MatrixFilters | null) {
  return useInfiniteQuery({ ...matrixQueryOptions(filters ?? { programId: '' }), enabled: Boolean(filters?.programId) });
}

export const reflashQueryOptions = (filters: ReflashFilters) =>
  queryOptions({
    queryKey: softwareKeys.reflash(filters),
    queryFn: ({ signal }) => apiRequest(`${SOFTWARE_API.reflash}?${softwareQueryString(filters)}`, { schema: ReflashListSchema, signal }),
  });

export function useReflashQuery(filters: ReflashFilters | null) {
  return useQuery({ ...reflashQueryOptions(filters ?? { programId: '' }), enabled: Boolean(filters?.programId) });
}

export function reflashCsvPath(filters: ReflashFilters): string {
  return `${SOFTWARE_API.reflashCsv}?${softwareQueryString(filters)}`;
}

export function useReflashDoneMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: ReflashDone) =>
      apiRequest(SOFTWARE_API.reflashDone, { method: 'POST', body, schema: AssetSoftwareSchema, headers: { 'Idempotency-Key': randomId() } }),
    onSuccess: (software) => {
      queryClient.setQueryData(softwareKeys.asset(software.assetId), software);
      return invalidateSoftware(queryClient);
    },
    onError: (error) => {
      // Someone recorded a flash first: the list and the asset move to what is recorded now.
      if (softwareConflictCurrent(error)) void invalidateSoftware(queryClient);
    },
  });
}

// ---- One asset

export const assetSoftwareQueryOptions = (assetId: string) =>
  queryOptions({
    queryKey: softwareKeys.asset(assetId),
    queryFn: ({ signal }) => apiRequest(SOFTWARE_API.assetSoftware(assetId), { schema: AssetSoftwareSchema, signal }),
  });

export function useAssetSoftwareQuery(assetId: string | null) {
  return useQuery({ ...assetSoftwareQueryOptions(assetId ?? ''), enabled: Boolean(assetId) });
}

/** The server's copy of the asset's software when a flash lost the race (409 `details.current`), else null. */
export function softwareConflictCurrent(error: unknown): AssetSoftware | null {
  if (!isApiError(error) || error.status !== 409 || !error.details || typeof error.details !== 'object') return null;
  const parsed = AssetSoftwareSchema.safeParse((error.details as { current?: unknown }).current);
  return parsed.success ? parsed.data : null;
}

export function useRecordFlashMutation(assetId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ ecuId, ...body }: RecordFlash & { ecuId: string }) =>
      apiRequest(SOFTWARE_API.assetSoftwareEcu(assetId, ecuId), { method: 'PUT', body, schema: AssetSoftwareSchema }),
    onSuccess: (software) => {
      queryClient.setQueryData(softwareKeys.asset(assetId), software);
      return invalidateSoftware(queryClient);
    },
    onError: (error) => {
      const current = softwareConflictCurrent(error);
      if (current) queryClient.setQueryData(softwareKeys.asset(assetId), current);
    },
  });
}

// ---- Import of a read-out

/** A picked file (web: the browser's File) or text pasted into the screen. */
export type ReadoutInput = { kind: 'file'; name: string; blob: Blob } | { kind: 'rows'; rows: unknown[] };

export type ImportRequest = { programId: string; readout: ReadoutInput; skipInvalid: boolean };

function sendReadout<T>(path: string, { programId, readout, skipInvalid }: ImportRequest, schema: z.ZodType<T>, headers: Record<string, string> = {}) {
  if (readout.kind === 'rows') {
    return apiRequest(path, { method: 'POST', body: { programId, rows: readout.rows, skipInvalid }, schema, headers });
  }
  const form = new FormData();
  form.append('programId', programId);
  form.append('skipInvalid', skipInvalid ? 'true' : 'false');
  form.append(IMPORT_FILE_FIELD, readout.blob, readout.name);
  return uploadWithProgress(path, { body: form, schema, headers });
}

export function useImportPreviewMutation() {
  return useMutation({
    mutationFn: (input: ImportRequest) => sendReadout(SOFTWARE_API.importPreview, input, ImportPreviewSchema),
  });
}

export function useImportApplyMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: ImportRequest) =>
      sendReadout(SOFTWARE_API.importApply, input, ImportResultSchema, { 'Idempotency-Key': randomId() }),
    onSuccess: () => invalidateSoftware(queryClient),
  });
}

/** The rows a 400 `import/invalid-rows` names, else an empty list. */
export function refusedImportRows(error: unknown): ImportRow[] {
  if (!isApiError(error) || error.code !== 'import/invalid-rows' || !error.details || typeof error.details !== 'object') return [];
  const parsed = z.array(ImportRowSchema).safeParse((error.details as { rows?: unknown }).rows);
  return parsed.success ? parsed.data : [];
}

// ---- Catalogue and baselines

export function useEcusQuery(programId: string | null) {
  return useQuery({
    queryKey: softwareKeys.ecus(programId ?? ''),
    queryFn: async ({ signal }) =>
      (await apiRequest(`${SOFTWARE_API.ecus}?${softwareQueryString({ programId })}`, { schema: EcuListSchema, signal })).items,
    enabled: Boolean(programId),
  });
}

/** The server's copy of an ECU when someone saved it first (409 `details.current`), else null. */
export function ecuConflictCurrent(error: unknown): Ecu | null {
  if (!isApiError(error) || error.status !== 409 || !error.details || typeof error.details !== 'object') return null;
  const parsed = EcuSchema.safeParse((error.details as { current?: unknown }).current);
  return parsed.success ? parsed.data : null;
}

/** The catalogue changed: its list, and everything computed from which ECUs an asset carries. */
function invalidateCatalogue(queryClient: QueryClient, programId: string) {
  return Promise.all([
    queryClient.invalidateQueries({ queryKey: softwareKeys.ecus(programId) }),
    queryClient.invalidateQueries({ queryKey: softwareKeys.baselineLists() }),
    queryClient.invalidateQueries({ queryKey: softwareKeys.baselines() }),
    invalidateSoftware(queryClient),
  ]);
}

export function useCreateEcuMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateEcu) => apiRequest(SOFTWARE_API.ecus, { method: 'POST', body, schema: EcuSchema }),
    onSuccess: (ecu) => invalidateCatalogue(queryClient, ecu.programId),
  });
}

export function useUpdateEcuMutation(programId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...body }: UpdateEcu & { id: string }) => apiRequest(SOFTWARE_API.ecu(id), { method: 'PATCH', body, schema: EcuSchema }),
    onSuccess: () => invalidateCatalogue(queryClient, programId),
    onError: (error) => {
      // Someone saved first: show their copy in the list.
      if (ecuConflictCurrent(error)) void queryClient.invalidateQueries({ queryKey: softwareKeys.ecus(programId) });
    },
  });
}

export function useBaselinesQuery(programId: string | null) {
  return useQuery({
    queryKey: softwareKeys.baselineList(programId ?? ''),
    queryFn: async ({ signal }) =>
      (await apiRequest(`${SOFTWARE_API.baselines}?${softwareQueryString({ programId })}`, { schema: BaselineListSchema, signal })).items,
    enabled: Boolean(programId),
  });
}

export function useBaselineQuery(id: string | null) {
  return useQuery({
    queryKey: softwareKeys.baseline(id ?? ''),
    queryFn: ({ signal }) => apiRequest(SOFTWARE_API.baseline(id ?? ''), { schema: BaselineSchema, signal }),
    enabled: Boolean(id),
  });
}

export function useBaselineDiffQuery(fromId: string | null, toId: string | null) {
  return useQuery({
    queryKey: softwareKeys.diff(fromId ?? '', toId ?? ''),
    queryFn: ({ signal }) => apiRequest(SOFTWARE_API.baselineDiff(fromId ?? '', toId ?? ''), { schema: BaselineDiffSchema, signal }),
    enabled: Boolean(fromId && toId && fromId !== toId),
  });
}

function invalidateBaselines(queryClient: QueryClient) {
  return Promise.all([
    queryClient.invalidateQueries({ queryKey: softwareKeys.baselineLists() }),
    queryClient.invalidateQueries({ queryKey: softwareKeys.baselines() }),
    invalidateSoftware(queryClient),
  ]);
}

export function useUpdateBaselineMutation(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: UpdateBaseline) => apiRequest(SOFTWARE_API.baseline(id), { method: 'PATCH', body, schema: BaselineSchema }),
    onSuccess: (baseline) => {
      queryClient.setQueryData(softwareKeys.baseline(id), baseline);
      return invalidateBaselines(queryClient);
    },
    onError: (error) => {
      const current = baselineConflictCurrent(error);
      if (current) queryClient.setQueryData(softwareKeys.baseline(id), current);
    },
  });
}

export function useReleaseBaselineMutation(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (version: number) => apiRequest(SOFTWARE_API.baselineRelease(id), { method: 'POST', body: { version }, schema: BaselineSchema }),
    onSuccess: (baseline) => {
      queryClient.setQueryData(softwareKeys.baseline(id), baseline);
      return invalidateBaselines(queryClient);
    },
    onError: (error) => {
      const current = baselineConflictCurrent(error);
      if (current) queryClient.setQueryData(softwareKeys.baseline(id), current);
    },
  });
}

export function useCreateBaselineMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateBaseline) => apiRequest(SOFTWARE_API.baselines, { method: 'POST', body, schema: BaselineSchema }),
    onSuccess: (baseline) => {
      queryClient.setQueryData(softwareKeys.baseline(baseline.id), baseline);
      return invalidateBaselines(queryClient);
    },
  });
}

export function useDeleteBaselineMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => apiRequest(SOFTWARE_API.baseline(id), { method: 'DELETE' }),
    onSuccess: (_answer, id) => {
      queryClient.removeQueries({ queryKey: softwareKeys.baseline(id) });
      return invalidateBaselines(queryClient);
    },
  });
}

/** The server's copy of a baseline when someone saved it first (409 `details.current`), else null. */
export function baselineConflictCurrent(error: unknown): Baseline | null {
  if (!isApiError(error) || error.status !== 409 || !error.details || typeof error.details !== 'object') return null;
  const parsed = BaselineSchema.safeParse((error.details as { current?: unknown }).current);
  return parsed.success ? parsed.data : null;
}
