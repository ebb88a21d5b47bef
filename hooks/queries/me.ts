import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/hooks/api/api-client';
import { API } from '@/shared/api/paths';
import { MeSchema } from '@/shared/schemas/auth';

export const meKeys = {
  all: ['me'] as const,
  detail: () => [...meKeys.all, 'detail'] as const,
};

export const meQueryOptions = () =>
  queryOptions({
    queryKey: meKeys.detail(),
    queryFn: ({ signal }) => apiRequest(API.me, { schema: MeSchema, signal }),
  });

export function useMeQuery({ enabled = true }: { enabled?: boolean } = {}) {
  return useQuery({ ...meQueryOptions(), enabled });
}
