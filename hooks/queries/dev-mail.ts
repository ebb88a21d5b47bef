import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest, isApiError } from '@/hooks/api/api-client';
import { API } from '@/shared/api/paths';
import { MailListSchema, type MailMessage } from '@/shared/schemas/admin';

export const devMailKeys = {
  all: ['dev-mail'] as const,
  list: () => [...devMailKeys.all, 'list'] as const,
};

function newestFirst(messages: MailMessage[]): MailMessage[] {
  return [...messages].sort((a, b) => Date.parse(b.date) - Date.parse(a.date));
}

export const devMailQueryOptions = () =>
  queryOptions({
    queryKey: devMailKeys.list(),
    queryFn: async ({ signal }) => {
      const { messages } = await apiRequest(API.devMail, { schema: MailListSchema, auth: false, signal });
      return newestFirst(messages);
    },
  });

/** Polls every few seconds so a just-sent invitation shows up without a reload. */
export function useDevMailQuery() {
  return useQuery({
    ...devMailQueryOptions(),
    refetchInterval: (query) => (isApiError(query.state.error) && query.state.error.status === 404 ? false : 4000),
  });
}
