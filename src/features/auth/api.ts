import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { meResponse, userSummary, type ChangePasswordBody, type SignInBody, type UserSummary } from '../../../shared/api';
import { apiGet, apiSend, isApiError, resetCsrfToken } from '../../lib/http';

export const authKeys = {
  all: ['auth'] as const,
  me: () => [...authKeys.all, 'me'] as const,
};

/** The signed-in person, or null when signed out (401). */
export function useMe() {
  return useQuery({
    queryKey: authKeys.me(),
    queryFn: async (): Promise<UserSummary | null> => {
      try {
        return (await apiGet('/api/auth/me', meResponse)).user;
      } catch (e) {
        if (isApiError(e, 401)) return null;
        throw e;
      }
    },
    staleTime: 60_000,
    retry: (count, e) => !isApiError(e) && count < 2,
  });
}

export function useSignIn() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async (body: SignInBody) => {
      const r = await apiSend('POST', '/api/auth/sign-in', body, meResponse);
      return r.user;
    },
    onSuccess: (user) => {
      resetCsrfToken();
      // A new person: nothing cached from before may show.
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== authKeys.all[0] });
      qc.setQueryData(authKeys.me(), user);
    },
  });
}

export function useSignOut() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => apiSend('POST', '/api/auth/sign-out', {}, null),
    onSettled: () => {
      resetCsrfToken();
      qc.setQueryData(authKeys.me(), null);
      // Forget everything the previous person could see (the me query keeps its observers).
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== authKeys.all[0] });
      qc.getMutationCache().clear();
    },
  });
}

export function useChangePassword() {
  return useMutation({
    mutationFn: (body: ChangePasswordBody) => apiSend('POST', '/api/auth/password', body, null),
  });
}

/** Allow a colleague to create courses (the caller must be allowed to teach). */
export function useGrantTeaching() {
  return useMutation({
    mutationFn: ({ userId, canTeach }: { userId: number; canTeach: boolean }) =>
      apiSend('POST', `/api/users/${userId}/can-teach`, { canTeach }, userSummary),
  });
}
