import { useMutation, useQueries, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import {
  copyEvidence,
  createdSubmission,
  dashboardResponse,
  gradebookResponse,
  mySubmissionsResponse,
  regradeProgress,
  releaseResponse,
  reviewQueueResponse,
  staffSubmissionsResponse,
  type DecisionBody,
  type MySubmissionsResponse,
  type RegradeProgress,
} from '../../../shared/submission';
import { apiGet, apiSend, apiSendForm } from '../../lib/http';

/**
 * One key factory for submissions, reviews, regrades, the gradebook and the
 * dashboard (TanStack Query's pattern). Every decision moves scores, so each
 * mutation invalidates the whole feature of the course: the lists are small.
 */
export const submissionKeys = {
  all: (courseId: number) => ['courses', courseId, 'submissions'] as const,
  mine: (courseId: number, assignmentId: number) => [...submissionKeys.all(courseId), 'mine', assignmentId] as const,
  staff: (courseId: number, assignmentId: number, studentId?: number) => [...submissionKeys.all(courseId), 'staff', assignmentId, studentId ?? 'all'] as const,
  evidence: (courseId: number, assignmentId: number, submissionId: number, flagId: number) =>
    [...submissionKeys.all(courseId), 'evidence', assignmentId, submissionId, flagId] as const,
  reviews: (courseId: number) => [...submissionKeys.all(courseId), 'reviews'] as const,
  regrade: (courseId: number, regradeId: number) => [...submissionKeys.all(courseId), 'regrade', regradeId] as const,
  gradebook: (courseId: number) => [...submissionKeys.all(courseId), 'gradebook'] as const,
  dashboard: (courseId: number) => [...submissionKeys.all(courseId), 'dashboard'] as const,
};

const base = (courseId: number) => `/api/courses/${courseId}`;
const onAssignment = (courseId: number, assignmentId: number) => `${base(courseId)}/assignments/${assignmentId}`;

const waiting = (s: { status: string }) => s.status === 'received' || s.status === 'grading';

/** The student's own attempts; polled every 1.5 s while one is still waiting for or being scored. */
export function useMySubmissions(courseId: number, assignmentId: number) {
  return useQuery({
    queryKey: submissionKeys.mine(courseId, assignmentId),
    queryFn: () => apiGet(`${onAssignment(courseId, assignmentId)}/submissions/mine`, mySubmissionsResponse),
    refetchInterval: (q) => (q.state.data?.submissions.some(waiting) && !q.state.error ? 1500 : false),
  });
}

export type HandInInput = { file: File } | { text: string };

/** Hand in a file (multipart, field `file`) or pasted text (JSON). A reader error comes back as an ApiError naming `file` or `text`. */
export function useHandIn(courseId: number, assignmentId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: HandInInput) => {
      const path = `${onAssignment(courseId, assignmentId)}/submissions`;
      if ('file' in input) {
        const form = new FormData();
        form.set('file', input.file);
        return apiSendForm(path, form, createdSubmission);
      }
      return apiSend('POST', path, { text: input.text }, createdSubmission);
    },
    onSuccess: () => qc.invalidateQueries({ queryKey: submissionKeys.all(courseId) }),
  });
}

export function useAskSecondLook(courseId: number, assignmentId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ submissionId, comment }: { submissionId: number; comment: string }) =>
      apiSend('POST', `${onAssignment(courseId, assignmentId)}/submissions/${submissionId}/second-look`, { comment }, z.unknown()),
    onSuccess: () => qc.invalidateQueries({ queryKey: submissionKeys.mine(courseId, assignmentId) }),
  });
}

/** Staff: every attempt on an assignment (or one student's), with points, report, flags, score history and reviews. Polled while any is being scored. */
export function useStaffSubmissions(courseId: number, assignmentId: number, studentId?: number, enabled = true) {
  return useQuery({
    queryKey: submissionKeys.staff(courseId, assignmentId, studentId),
    queryFn: async () =>
      (await apiGet(`${onAssignment(courseId, assignmentId)}/submissions${studentId ? `?student=${studentId}` : ''}`, staffSubmissionsResponse)).submissions,
    enabled: enabled && Number.isInteger(assignmentId) && assignmentId > 0,
    refetchInterval: (q) => (q.state.data?.some(waiting) && !q.state.error ? 2000 : false),
  });
}

/** Staff: one student's attempts on several assignments (the gradebook's per-student history). */
export function useStudentHistory(courseId: number, assignmentIds: number[], studentId: number | null) {
  return useQueries({
    queries: assignmentIds.map((aid) => ({
      queryKey: submissionKeys.staff(courseId, aid, studentId ?? undefined),
      queryFn: async () => (await apiGet(`${onAssignment(courseId, aid)}/submissions?student=${studentId}`, staffSubmissionsResponse)).submissions,
      enabled: studentId !== null,
    })),
  });
}

export function useCopyEvidence(courseId: number, assignmentId: number, submissionId: number, flagId: number | null) {
  return useQuery({
    queryKey: submissionKeys.evidence(courseId, assignmentId, submissionId, flagId ?? 0),
    queryFn: () => apiGet(`${onAssignment(courseId, assignmentId)}/submissions/${submissionId}/evidence?flag=${flagId}`, copyEvidence),
    enabled: flagId !== null,
    staleTime: 60_000,
  });
}

export function useDecision(courseId: number, assignmentId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ submissionId, body }: { submissionId: number; body: DecisionBody }) =>
      apiSend('POST', `${onAssignment(courseId, assignmentId)}/submissions/${submissionId}/decision`, body, z.unknown()),
    onSuccess: () => qc.invalidateQueries({ queryKey: submissionKeys.all(courseId) }),
  });
}

export function useReviewQueue(courseId: number, enabled = true) {
  return useQuery({
    queryKey: submissionKeys.reviews(courseId),
    queryFn: async () => (await apiGet(`${base(courseId)}/reviews`, reviewQueueResponse)).items,
    enabled,
  });
}

export function useAnswerSecondLook(courseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ reviewId, comment, points }: { reviewId: number; comment: string; points?: number }) =>
      apiSend('POST', `${base(courseId)}/reviews/${reviewId}/answer`, { comment, points }, z.unknown()),
    onSuccess: () => qc.invalidateQueries({ queryKey: submissionKeys.all(courseId) }),
  });
}

export function useGrantExtension(courseId: number, assignmentId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { userId: number; dueAt: string; comment: string }) => apiSend('POST', `${onAssignment(courseId, assignmentId)}/extensions`, body, z.unknown()),
    onSuccess: () => qc.invalidateQueries({ queryKey: submissionKeys.all(courseId) }),
  });
}

/** Start a regrade of one submission or the whole assignment; the answer carries the regrade's id for useRegradeProgress. */
export function useStartRegrade(courseId: number, assignmentId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { submissionId?: number; reason: string }) => apiSend('POST', `${onAssignment(courseId, assignmentId)}/regrade`, body, regradeProgress),
    onSuccess: (p) => qc.setQueryData(submissionKeys.regrade(courseId, p.id), p),
  });
}

/** A regrade's progress, polled every second while it runs; when it finishes the scores it moved are refetched. */
export function useRegradeProgress(courseId: number, assignmentId: number, regradeId: number | null) {
  const qc = useQueryClient();
  return useQuery({
    queryKey: submissionKeys.regrade(courseId, regradeId ?? 0),
    queryFn: async () => {
      const before = qc.getQueryData<RegradeProgress>(submissionKeys.regrade(courseId, regradeId ?? 0));
      const p = await apiGet(`${onAssignment(courseId, assignmentId)}/regrades/${regradeId}`, regradeProgress);
      if (p.state === 'finished' && before?.state !== 'finished') {
        void qc.invalidateQueries({ predicate: (q) => q.queryKey[2] === 'submissions' && q.queryKey[1] === courseId && q.queryKey[3] !== 'regrade' });
      }
      return p;
    },
    enabled: regradeId !== null,
    refetchInterval: (q) => (q.state.data?.state === 'running' && !q.state.error ? 1000 : false),
  });
}

export function useRelease(courseId: number, assignmentId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => apiSend('POST', `${onAssignment(courseId, assignmentId)}/release`, {}, releaseResponse),
    onSuccess: () => qc.invalidateQueries({ queryKey: submissionKeys.all(courseId) }),
  });
}

export function useGradebook(courseId: number) {
  return useQuery({
    queryKey: submissionKeys.gradebook(courseId),
    queryFn: () => apiGet(`${base(courseId)}/gradebook`, gradebookResponse),
  });
}

export const gradebookCsvUrl = (courseId: number) => `${base(courseId)}/gradebook.csv`;

export function useDashboard(courseId: number, enabled = true) {
  return useQuery({
    queryKey: submissionKeys.dashboard(courseId),
    queryFn: () => apiGet(`${base(courseId)}/dashboard`, dashboardResponse),
    enabled,
  });
}

export type { MySubmissionsResponse };
