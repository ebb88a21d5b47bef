import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest, isApiError } from '@/hooks/api/api-client';
import { meKeys } from '@/hooks/queries/me';
import { API } from '@/shared/api/paths';
import {
  AdminUserListSchema,
  AdminUserSchema,
  ProgramDetailSchema,
  ProgramListSchema,
  type AdminUser,
  type CreateProgram,
  type InviteUser,
  type ProgramDetail,
  type UpdateUser,
} from '@/shared/schemas/admin';
import { ProgramSchema } from '@/shared/schemas/auth';

export const adminKeys = {
  all: ['admin'] as const,
  users: () => [...adminKeys.all, 'users'] as const,
  programs: () => [...adminKeys.all, 'programs'] as const,
  program: (id: string) => [...adminKeys.programs(), id] as const,
};

export type AdminProgramSummary = z.infer<typeof ProgramListSchema>['programs'][number];

export const adminUsersQueryOptions = () =>
  queryOptions({
    queryKey: adminKeys.users(),
    queryFn: async ({ signal }) => (await apiRequest(API.adminUsers, { schema: AdminUserListSchema, signal })).users,
  });

export const adminProgramsQueryOptions = () =>
  queryOptions({
    queryKey: adminKeys.programs(),
    queryFn: async ({ signal }) => (await apiRequest(API.adminPrograms, { schema: ProgramListSchema, signal })).programs,
  });

export const adminProgramQueryOptions = (id: string) =>
  queryOptions({
    queryKey: adminKeys.program(id),
    queryFn: ({ signal }) => apiRequest(API.adminProgram(id), { schema: ProgramDetailSchema, signal }),
  });

export function useAdminUsersQuery({ enabled = true }: { enabled?: boolean } = {}) {
  return useQuery({ ...adminUsersQueryOptions(), enabled });
}

export function useAdminProgramsQuery({ enabled = true }: { enabled?: boolean } = {}) {
  return useQuery({ ...adminProgramsQueryOptions(), enabled });
}

export function useAdminProgramQuery(id: string | null) {
  return useQuery({ ...adminProgramQueryOptions(id ?? ''), enabled: Boolean(id) });
}

/** Membership shows in three places: the user list, the program list's counts and /api/me. */
function invalidateMembership(queryClient: QueryClient) {
  return Promise.all([
    queryClient.invalidateQueries({ queryKey: adminKeys.all }),
    queryClient.invalidateQueries({ queryKey: meKeys.all }),
  ]);
}

export function useInviteUserMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: InviteUser) =>
      apiRequest(API.adminUsers, { method: 'POST', body, schema: AdminUserSchema }),
    onSuccess: (user) => {
      queryClient.setQueryData<AdminUser[]>(adminKeys.users(), (users) => (users ? [...users, user] : users));
      return invalidateMembership(queryClient);
    },
  });
}

export function useUpdateUserMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...body }: UpdateUser & { id: string }) =>
      apiRequest(API.adminUser(id), { method: 'PATCH', body, schema: AdminUserSchema }),
    onSuccess: (user) => {
      queryClient.setQueryData<AdminUser[]>(adminKeys.users(), (users) =>
        users?.map((item) => (item.id === user.id ? user : item)),
      );
      return invalidateMembership(queryClient);
    },
    onError: (error) => {
      // 409: someone saved first; reload the list so the next try carries the new version.
      if (isApiError(error) && error.status === 409) {
        return queryClient.invalidateQueries({ queryKey: adminKeys.users() });
      }
    },
  });
}

export function useCreateProgramMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateProgram) =>
      apiRequest(API.adminPrograms, { method: 'POST', body, schema: ProgramSchema }),
    onSuccess: () => invalidateMembership(queryClient),
  });
}

export function useSetProgramMembersMutation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ programId, userIds }: { programId: string; userIds: string[] }) =>
      apiRequest(API.adminProgramMembers(programId), {
        method: 'PUT',
        body: { userIds },
        schema: ProgramDetailSchema,
      }),
    onSuccess: (detail: ProgramDetail) => {
      queryClient.setQueryData(adminKeys.program(detail.id), detail);
      return invalidateMembership(queryClient);
    },
  });
}
