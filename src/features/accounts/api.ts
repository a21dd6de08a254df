import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { member, meResponse, type Member } from '../../../shared/api';
import {
  acceptedResponse,
  acceptInvitationResponse,
  auditListResponse,
  createInvitationsResponse,
  invitation,
  invitationListResponse,
  invitationLookup,
  outboxListResponse,
  outboxMessage,
  tokenStatus,
  type AcceptInvitationBody,
  type CreateInvitationsBody,
  type PasswordResetBody,
  type SignUpBody,
} from '../../../shared/accounts';
import type { Role } from '../../../shared/api';
import { apiGet, apiSend, resetCsrfToken } from '../../lib/http';
import { authKeys } from '../auth/api';
import { courseKeys } from '../courses/api';

export interface AuditFilters {
  action?: string;
  actor?: number;
  since?: string;
}

export const accountKeys = {
  all: ['accounts'] as const,
  token: (purpose: string, token: string) => [...accountKeys.all, 'token', purpose, token] as const,
  invitationLink: (token: string) => [...accountKeys.all, 'invitation-link', token] as const,
  invitations: (courseId: number) => [...courseKeys.detail(courseId), 'invitations'] as const,
  outbox: (courseId: number, state: string) => [...courseKeys.detail(courseId), 'outbox', state] as const,
  outboxAll: (courseId: number) => [...courseKeys.detail(courseId), 'outbox'] as const,
  audit: (courseId: number, f: AuditFilters) => [...courseKeys.detail(courseId), 'audit', f] as const,
};

/** After the server signed someone in (it sent a new session): forget the old token and cached data. */
function useSignedInAs() {
  const qc = useQueryClient();
  return (user: Parameters<typeof qc.setQueryData>[1]) => {
    resetCsrfToken();
    qc.removeQueries({ predicate: (q) => q.queryKey[0] !== authKeys.all[0] });
    qc.setQueryData(authKeys.me(), user);
  };
}

export function useSignUp() {
  return useMutation({ mutationFn: (body: SignUpBody) => apiSend('POST', '/api/auth/sign-up', body, acceptedResponse) });
}

export function useConfirmSignUp() {
  const signedInAs = useSignedInAs();
  return useMutation({
    mutationFn: async (token: string) => (await apiSend('POST', '/api/auth/sign-up/confirm', { token }, meResponse)).user,
    onSuccess: (user) => signedInAs(user),
  });
}

export function useRequestPasswordReset() {
  return useMutation({ mutationFn: (email: string) => apiSend('POST', '/api/auth/password-reset', { email }, acceptedResponse) });
}

export function useCompletePasswordReset() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: PasswordResetBody) => apiSend('POST', '/api/auth/password-reset/complete', body, null),
    onSuccess: () => {
      // Every session of the account ended, possibly this one.
      resetCsrfToken();
      return qc.invalidateQueries({ queryKey: authKeys.me() });
    },
  });
}

/** Whether a link from an e-mail is still good, before the person fills in a form. */
export function useTokenStatus(purpose: 'sign-up' | 'password-reset', token: string | null) {
  return useQuery({
    queryKey: accountKeys.token(purpose, token ?? ''),
    queryFn: () => apiSend('POST', '/api/auth/token-status', { token, purpose }, tokenStatus),
    enabled: !!token,
    retry: false,
    staleTime: Infinity,
  });
}

export function useInvitationLookup(token: string | null) {
  return useQuery({
    queryKey: accountKeys.invitationLink(token ?? ''),
    queryFn: () => apiSend('POST', '/api/invitations/lookup', { token }, invitationLookup),
    enabled: !!token,
    retry: false,
  });
}

export function useAcceptInvitation() {
  const qc = useQueryClient();
  const signedInAs = useSignedInAs();
  return useMutation({
    mutationFn: (body: AcceptInvitationBody) => apiSend('POST', '/api/invitations/accept', body, acceptInvitationResponse),
    onSuccess: async (r) => {
      if (r.accountCreated) {
        // The server signed the new account in; ask who that is.
        signedInAs(undefined);
        await qc.invalidateQueries({ queryKey: authKeys.me() });
      } else {
        await qc.invalidateQueries({ queryKey: courseKeys.all });
      }
    },
  });
}

// --- Instructor tools

export function useInvitations(courseId: number, enabled = true) {
  return useQuery({
    queryKey: accountKeys.invitations(courseId),
    queryFn: async () => (await apiGet(`/api/courses/${courseId}/invitations`, invitationListResponse)).invitations,
    enabled,
    // Invitation mail goes out through a job: look again while some is on its way.
    refetchInterval: (q) => (q.state.data?.some((i) => i.mail && (i.mail.state === 'queued' || i.mail.state === 'sending')) ? 2000 : false),
  });
}

export function useCreateInvitations(courseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateInvitationsBody) => apiSend('POST', `/api/courses/${courseId}/invitations`, body, createInvitationsResponse),
    onSuccess: () =>
      Promise.all([
        qc.invalidateQueries({ queryKey: accountKeys.invitations(courseId) }),
        qc.invalidateQueries({ queryKey: accountKeys.outboxAll(courseId) }),
      ]),
  });
}

export function useRevokeInvitation(courseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => apiSend('POST', `/api/courses/${courseId}/invitations/${id}/revoke`, {}, invitation),
    onSuccess: () => qc.invalidateQueries({ queryKey: accountKeys.invitations(courseId) }),
  });
}

/**
 * Instructor: change a member's role. Afterwards, whether it worked or was refused (a refusal may
 * mean the caller's own role changed meanwhile), everything about the course is fetched again: the
 * members, the caller's role and member count, the course list, and the staff views (gradebook,
 * dashboard) whose students depend on roles.
 */
export function useChangeRole(courseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, role }: { userId: number; role: Role }) => apiSend('POST', `/api/courses/${courseId}/members/${userId}/role`, { role }, member),
    onSuccess: (m) =>
      qc.setQueryData(courseKeys.members(courseId), (list: Member[] | undefined) => list?.map((x) => (x.userId === m.userId ? m : x))),
    onSettled: () =>
      Promise.all([
        qc.invalidateQueries({ queryKey: courseKeys.list() }),
        qc.invalidateQueries({ queryKey: courseKeys.detail(courseId) }),
        qc.invalidateQueries({ queryKey: ['courses', courseId] }),
      ]),
  });
}

export function useOutbox(courseId: number, state: 'unsent' | 'failed' | 'all', enabled = true) {
  return useQuery({
    queryKey: accountKeys.outbox(courseId, state),
    queryFn: () => apiGet(`/api/courses/${courseId}/outbox?state=${state}`, outboxListResponse),
    enabled,
    refetchInterval: (q) => ((q.state.data?.counts.queued ?? 0) + (q.state.data?.counts.sending ?? 0) > 0 ? 2000 : 60_000),
  });
}

export function useRetryMail(courseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => apiSend('POST', `/api/courses/${courseId}/outbox/${id}/retry`, {}, outboxMessage),
    onSuccess: () =>
      Promise.all([
        qc.invalidateQueries({ queryKey: accountKeys.outboxAll(courseId) }),
        qc.invalidateQueries({ queryKey: accountKeys.invitations(courseId) }),
      ]),
  });
}

export function useAudit(courseId: number, f: AuditFilters) {
  return useQuery({
    queryKey: accountKeys.audit(courseId, f),
    queryFn: () => {
      const q = new URLSearchParams();
      if (f.action) q.set('action', f.action);
      if (f.actor) q.set('actor', String(f.actor));
      if (f.since) q.set('since', f.since);
      q.set('limit', '200');
      return apiGet(`/api/courses/${courseId}/audit?${q.toString()}`, auditListResponse);
    },
    placeholderData: keepPreviousData,
  });
}
