import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest, isApiError } from '@/hooks/api/api-client';
import { assetKeys } from '@/hooks/queries/assets';
import { FLEET_API } from '@/shared/api/fleet-paths';
import { HistoryEntrySchema, IDEMPOTENCY_HEADER } from '@/shared/schemas/assets';
import {
  AcceptProposalResultSchema,
  AssignmentListSchema,
  AssignmentRefusalSchema,
  AssignmentSchema,
  DriverListSchema,
  DriverProfileSchema,
  ProposalSchema,
  UtilisationSchema,
  type AcceptProposal,
  type Assignment,
  type AssignmentPurpose,
  type AssignmentStatus,
  type CheckIn,
  type CheckOut,
  type CreateAssignment,
  type CreateProposal,
  type RefusalReason,
  type UpdateAssignment,
  type UpdateDriverProfile,
} from '@/shared/schemas/fleet';

export type AssignmentFilters = {
  programId: string;
  /** Instants with offset (ISO 8601). */
  from?: string;
  to?: string;
  assetId?: string;
  driverId?: string;
  stageId?: string;
  purpose?: AssignmentPurpose;
  status?: AssignmentStatus;
  mine?: boolean;
  overdue?: boolean;
};

export const fleetKeys = {
  all: ['fleet'] as const,
  drivers: () => [...fleetKeys.all, 'drivers'] as const,
  driverList: (programId: string, all: boolean) => [...fleetKeys.drivers(), programId, all ? 'all' : 'drivers'] as const,
  assignments: () => [...fleetKeys.all, 'assignments'] as const,
  assignmentList: (filters: AssignmentFilters) => [...fleetKeys.assignments(), 'list', filters] as const,
  assignment: (id: string) => [...fleetKeys.assignments(), 'detail', id] as const,
  history: (id: string) => [...fleetKeys.all, 'history', id] as const,
  utilisations: () => [...fleetKeys.all, 'utilisation'] as const,
  utilisation: (programId: string, from: string, to: string) => [...fleetKeys.utilisations(), programId, from, to] as const,
};

function queryString(values: Record<string, string | number | boolean | undefined>): string {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(values)) {
    if (value === undefined || value === '' || value === false) continue;
    params.set(key, String(value));
  }
  return params.toString();
}

// ---- Drivers --------------------------------------------------------------------------------

export const driversQueryOptions = (programId: string, all = false) =>
  queryOptions({
    queryKey: fleetKeys.driverList(programId, all),
    queryFn: async ({ signal }) =>
      (await apiRequest(`${FLEET_API.drivers}?${queryString({ programId, all })}`, { schema: DriverListSchema, signal })).items,
  });

/** The roster: people with the driver role or a driving profile; `all` adds every working member. */
export function useDriversQuery(programId: string | null, { all = false }: { all?: boolean } = {}) {
  return useQuery({ ...driversQueryOptions(programId ?? '', all), enabled: Boolean(programId) });
}

export type DriverChange = UpdateDriverProfile & { userId: string };

export function useUpdateDriverMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, ...body }: DriverChange) =>
      apiRequest(FLEET_API.driver(userId), { method: 'PUT', body, schema: DriverProfileSchema }),
    onSettled: () => queryClient.invalidateQueries({ queryKey: fleetKeys.drivers() }),
  });
}

/** The server's copy of a profile when a save lost the race (409 `details.current`), else null. */
export function driverConflictCurrent(error: unknown) {
  if (!isApiError(error) || error.status !== 409 || !error.details || typeof error.details !== 'object') return null;
  const parsed = DriverProfileSchema.safeParse((error.details as { current?: unknown }).current);
  return parsed.success ? parsed.data : null;
}

// ---- Assignments ----------------------------------------------------------------------------

export const assignmentListQueryOptions = (filters: AssignmentFilters) =>
  queryOptions({
    queryKey: fleetKeys.assignmentList(filters),
    queryFn: ({ signal }) =>
      apiRequest(`${FLEET_API.assignments}?${queryString(filters)}`, { schema: AssignmentListSchema, signal }),
  });

export function useAssignmentsQuery(filters: AssignmentFilters | null) {
  return useQuery({
    ...assignmentListQueryOptions(filters ?? { programId: '' }),
    enabled: Boolean(filters?.programId),
    placeholderData: (previous) => previous,
  });
}

export const assignmentQueryOptions = (id: string) =>
  queryOptions({
    queryKey: fleetKeys.assignment(id),
    queryFn: ({ signal }) => apiRequest(FLEET_API.assignment(id), { schema: AssignmentSchema, signal }),
  });

export function useAssignmentQuery(id: string | null) {
  return useQuery({ ...assignmentQueryOptions(id ?? ''), enabled: Boolean(id) });
}

const AssignmentHistorySchema = z.object({ entries: z.array(HistoryEntrySchema) });

export function useAssignmentHistoryQuery(id: string | null) {
  return useQuery({
    queryKey: fleetKeys.history(id ?? ''),
    queryFn: async ({ signal }) => (await apiRequest(FLEET_API.assignmentHistory(id ?? ''), { schema: AssignmentHistorySchema, signal })).entries,
    enabled: Boolean(id),
  });
}

/**
 * An assignment change shows in its page, every list, the utilisation, and the vehicle's own
 * page (its status and odometer move at check-out and check-in).
 */
function afterAssignmentChange(queryClient: QueryClient, assignment: Assignment) {
  queryClient.setQueryData(fleetKeys.assignment(assignment.id), assignment);
  return Promise.all([
    queryClient.invalidateQueries({ queryKey: fleetKeys.assignments() }),
    queryClient.invalidateQueries({ queryKey: fleetKeys.history(assignment.id) }),
    queryClient.invalidateQueries({ queryKey: fleetKeys.utilisations() }),
    queryClient.invalidateQueries({ queryKey: assetKeys.detail(assignment.assetId) }),
    queryClient.invalidateQueries({ queryKey: assetKeys.lists() }),
  ]);
}

/** Every reason of a 422 'assignment/refused' answer, or null for any other failure. */
export function refusalReasons(error: unknown): RefusalReason[] | null {
  if (!isApiError(error) || error.code !== 'assignment/refused') return null;
  const parsed = AssignmentRefusalSchema.safeParse({ error: { code: error.code, message: error.message, details: error.details } });
  return parsed.success ? parsed.data.error.details.reasons : [];
}

/** The server's copy of an assignment when a change lost the race (409 `details.current`), else null. */
export function assignmentConflictCurrent(error: unknown): Assignment | null {
  if (!isApiError(error) || error.status !== 409 || !error.details || typeof error.details !== 'object') return null;
  const parsed = AssignmentSchema.safeParse((error.details as { current?: unknown }).current);
  return parsed.success ? parsed.data : null;
}

/** Sent with an Idempotency-Key, made once per attempt by the caller, so a retried request books once. */
export type WithKey<T> = T & { idempotencyKey: string };

export function useCreateAssignmentMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ idempotencyKey, ...body }: WithKey<CreateAssignment>) =>
      apiRequest(FLEET_API.assignments, { method: 'POST', body, schema: AssignmentSchema, headers: { [IDEMPOTENCY_HEADER]: idempotencyKey } }),
    onSuccess: (assignment) => afterAssignmentChange(queryClient, assignment),
  });
}

export function useUpdateAssignmentMutation(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: UpdateAssignment) => apiRequest(FLEET_API.assignment(id), { method: 'PATCH', body, schema: AssignmentSchema }),
    onSuccess: (assignment) => afterAssignmentChange(queryClient, assignment),
    // The page shows the server's copy; the form keeps the draft and offers to apply it again.
    onError: (error) => {
      const current = assignmentConflictCurrent(error);
      if (current) queryClient.setQueryData(fleetKeys.assignment(id), current);
    },
  });
}

export function useCancelAssignmentMutation(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { version: number; reason?: string }) =>
      apiRequest(FLEET_API.assignmentCancel(id), { method: 'POST', body, schema: AssignmentSchema }),
    onSuccess: (assignment) => afterAssignmentChange(queryClient, assignment),
    onError: (error) => {
      const current = assignmentConflictCurrent(error);
      if (current) queryClient.setQueryData(fleetKeys.assignment(id), current);
      else if (isApiError(error) && error.status === 409) void queryClient.invalidateQueries({ queryKey: fleetKeys.assignment(id) });
    },
  });
}

function reloadOn409(queryClient: QueryClient, id: string, error: unknown) {
  if (isApiError(error) && error.status === 409) return queryClient.invalidateQueries({ queryKey: fleetKeys.assignment(id) });
}

export function useCheckOutMutation(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ idempotencyKey, ...body }: WithKey<CheckOut>) =>
      apiRequest(FLEET_API.assignmentCheckOut(id), { method: 'POST', body, schema: AssignmentSchema, headers: { [IDEMPOTENCY_HEADER]: idempotencyKey } }),
    onSuccess: (assignment) => afterAssignmentChange(queryClient, assignment),
    onError: (error) => reloadOn409(queryClient, id, error),
  });
}

export function useCheckInMutation(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ idempotencyKey, ...body }: WithKey<CheckIn>) =>
      apiRequest(FLEET_API.assignmentCheckIn(id), { method: 'POST', body, schema: AssignmentSchema, headers: { [IDEMPOTENCY_HEADER]: idempotencyKey } }),
    onSuccess: (assignment) => afterAssignmentChange(queryClient, assignment),
    onError: (error) => reloadOn409(queryClient, id, error),
  });
}

// ---- Utilisation and proposals --------------------------------------------------------------

export const utilisationQueryOptions = (programId: string, from: string, to: string) =>
  queryOptions({
    queryKey: fleetKeys.utilisation(programId, from, to),
    queryFn: ({ signal }) => apiRequest(`${FLEET_API.utilisation}?${queryString({ programId, from, to })}`, { schema: UtilisationSchema, signal }),
  });

export function useUtilisationQuery(programId: string | null, from: string, to: string) {
  return useQuery({
    ...utilisationQueryOptions(programId ?? '', from, to),
    enabled: Boolean(programId && from && to),
    placeholderData: (previous) => previous,
  });
}

export function useProposalMutation() {
  return useMutation({
    mutationFn: (body: CreateProposal) => apiRequest(FLEET_API.proposals, { method: 'POST', body, schema: ProposalSchema }),
  });
}

export function useAcceptProposalMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: AcceptProposal) =>
      apiRequest(FLEET_API.proposalsAccept, { method: 'POST', body, schema: AcceptProposalResultSchema }),
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: fleetKeys.assignments() }),
        queryClient.invalidateQueries({ queryKey: fleetKeys.utilisations() }),
      ]),
  });
}
