import { useQuery } from '@tanstack/react-query';
import { mailListResponse } from '../../../shared/api';
import { apiGet } from '../../lib/http';

export const devMailKeys = {
  all: ['dev-mail'] as const,
  list: () => [...devMailKeys.all, 'list'] as const,
};

/** Mail caught by the local catcher, newest first. */
export function useDevMail() {
  return useQuery({
    queryKey: devMailKeys.list(),
    queryFn: async () => {
      const { messages } = await apiGet('/api/dev/mail', mailListResponse);
      return [...messages].sort((a, b) => b.receivedAt.localeCompare(a.receivedAt) || Number(b.id) - Number(a.id));
    },
    refetchInterval: 10_000,
  });
}
