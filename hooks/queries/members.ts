import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/hooks/api/api-client';
import { API } from '@/shared/api/paths';
import { ProgramMemberListSchema, type ProgramMember } from '@/shared/schemas/admin';
import type { Person } from '@/shared/schemas/findings';

/** GET /api/programs/:id/members: the active members of a program, for any of its members. */
export const memberKeys = {
  all: ['program-members'] as const,
  program: (programId: string) => [...memberKeys.all, programId] as const,
};

export const programMembersQueryOptions = (programId: string) =>
  queryOptions({
    queryKey: memberKeys.program(programId),
    queryFn: async ({ signal }) => (await apiRequest(API.programMembers(programId), { schema: ProgramMemberListSchema, signal })).items,
    staleTime: 60_000,
  });

/** Every active member of the program (administrators too: they may attend a gate review). */
export function useProgramMembersQuery(programId: string | null) {
  return useQuery({ ...programMembersQueryOptions(programId ?? ''), enabled: Boolean(programId) });
}

/** The members who work in the program: the people who can own findings and gate actions (administrators own none). */
export const workingMembers = (members: readonly ProgramMember[]): Person[] =>
  members.filter((m) => m.role !== 'admin').map((m) => ({ id: m.id, name: m.name }));

/** The people who work in the program, as owner and watcher choices. */
export function useProgramWorkersQuery(programId: string | null) {
  return useQuery({ ...programMembersQueryOptions(programId ?? ''), enabled: Boolean(programId), select: workingMembers });
}
