import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import {
  assignmentDetail,
  assignmentListResponse,
  datasetDetail,
  datasetListResponse,
  previewResponse,
  referenceProgress,
  referenceResponse,
  type AssignmentConfigInput,
  type ReferenceProgress,
  type ScenarioDatasetBody,
} from '../../../shared/assignment';
import { apiGet, apiSend, apiSendForm } from '../../lib/http';

/** One key factory for the feature (TanStack Query's pattern): invalidation sits next to each mutation. */
export const assignmentKeys = {
  all: (courseId: number) => ['courses', courseId, 'assignments'] as const,
  list: (courseId: number) => [...assignmentKeys.all(courseId), 'list'] as const,
  detail: (courseId: number, id: number) => [...assignmentKeys.all(courseId), 'detail', id] as const,
  progress: (courseId: number, id: number) => [...assignmentKeys.detail(courseId, id), 'progress'] as const,
  preview: (courseId: number, id: number) => [...assignmentKeys.detail(courseId, id), 'preview'] as const,
  variants: (courseId: number, id: number) => [...assignmentKeys.detail(courseId, id), 'variants'] as const,
  reference: (courseId: number, id: number, studentId: number) => [...assignmentKeys.detail(courseId, id), 'reference', studentId] as const,
  datasets: (courseId: number) => ['courses', courseId, 'datasets'] as const,
  dataset: (courseId: number, datasetId: number) => [...assignmentKeys.datasets(courseId), datasetId] as const,
};

const base = (courseId: number) => `/api/courses/${courseId}`;

export const variantRow = z.object({
  variantId: z.number().int(),
  student: z.object({ id: z.number().int(), displayName: z.string() }).nullable(),
  seed: z.number().int(),
  checksum: z.string().nullable(),
  referenceStatus: z.enum(['queued', 'running', 'ready', 'failed']).nullable(),
});
export type VariantRow = z.infer<typeof variantRow>;
const variantListResponse = z.object({ variants: z.array(variantRow) });

export function useAssignments(courseId: number, enabled = true) {
  return useQuery({
    queryKey: assignmentKeys.list(courseId),
    queryFn: async () => (await apiGet(`${base(courseId)}/assignments`, assignmentListResponse)).assignments,
    enabled,
  });
}

export function useAssignment(courseId: number, id: number) {
  return useQuery({
    queryKey: assignmentKeys.detail(courseId, id),
    queryFn: () => apiGet(`${base(courseId)}/assignments/${id}`, assignmentDetail),
    enabled: Number.isInteger(id) && id > 0,
  });
}

const unfinished = (p: ReferenceProgress | undefined) => !p || p.ready + p.failed < p.total;

/** Staff: references done of total; polled every second while some are still queued or running. */
export function useReferenceProgress(courseId: number, id: number, enabled = true) {
  const qc = useQueryClient();
  return useQuery({
    queryKey: assignmentKeys.progress(courseId, id),
    queryFn: async () => {
      const before = qc.getQueryData<ReferenceProgress>(assignmentKeys.progress(courseId, id));
      const p = await apiGet(`${base(courseId)}/assignments/${id}/progress`, referenceProgress);
      // When the last reference lands, what depends on references is stale: the preview, the variants, the list's progress.
      if (before && unfinished(before) && !unfinished(p)) {
        void qc.invalidateQueries({ queryKey: assignmentKeys.preview(courseId, id) });
        void qc.invalidateQueries({ queryKey: assignmentKeys.variants(courseId, id) });
        void qc.invalidateQueries({ queryKey: assignmentKeys.list(courseId) });
      }
      return p;
    },
    enabled,
    refetchInterval: (q) => (unfinished(q.state.data) && !q.state.error ? 1000 : false),
  });
}

export function usePreview(courseId: number, id: number, enabled = true) {
  return useQuery({
    queryKey: assignmentKeys.preview(courseId, id),
    queryFn: () => apiGet(`${base(courseId)}/assignments/${id}/preview`, previewResponse),
    enabled,
    staleTime: 60_000,
    // A draft has no progress panel to refresh it: poll while the preview reference is being computed.
    refetchInterval: (q) => {
      const status = q.state.data?.reference?.status;
      return !q.state.error && (status === 'queued' || status === 'running') ? 1000 : false;
    },
  });
}

export function useVariants(courseId: number, id: number, enabled = true) {
  return useQuery({
    queryKey: assignmentKeys.variants(courseId, id),
    queryFn: async () => (await apiGet(`${base(courseId)}/assignments/${id}/variants`, variantListResponse)).variants,
    enabled,
  });
}

export function useStudentReference(courseId: number, id: number, studentId: number) {
  return useQuery({
    queryKey: assignmentKeys.reference(courseId, id, studentId),
    queryFn: () => apiGet(`${base(courseId)}/assignments/${id}/reference?student=${studentId}`, referenceResponse),
    enabled: Number.isInteger(studentId) && studentId > 0,
    refetchInterval: (q) => (q.state.data && (q.state.data.status === 'queued' || q.state.data.status === 'running') ? 1000 : false),
  });
}

export function useDatasets(courseId: number, enabled = true) {
  return useQuery({
    queryKey: assignmentKeys.datasets(courseId),
    queryFn: () => apiGet(`${base(courseId)}/datasets`, datasetListResponse),
    enabled,
  });
}

export function useDataset(courseId: number, datasetId: number | undefined) {
  return useQuery({
    queryKey: assignmentKeys.dataset(courseId, datasetId ?? 0),
    queryFn: () => apiGet(`${base(courseId)}/datasets/${datasetId}`, datasetDetail),
    enabled: datasetId !== undefined && Number.isInteger(datasetId) && datasetId > 0,
    staleTime: Infinity,
  });
}

export interface UploadDatasetInput {
  name: string;
  layout: 'columns' | 'rows';
  dt?: number;
  file: File;
  fileY?: File | null;
}

export function useUploadDataset(courseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (u: UploadDatasetInput) => {
      const form = new FormData();
      form.set('name', u.name);
      form.set('layout', u.layout);
      if (u.dt !== undefined) form.set('dt', String(u.dt));
      form.set('file', u.file);
      if (u.fileY) form.set('fileY', u.fileY);
      return apiSendForm(`${base(courseId)}/datasets`, form, datasetDetail);
    },
    onSuccess: (d) => {
      qc.setQueryData(assignmentKeys.dataset(courseId, d.id), d);
      return qc.invalidateQueries({ queryKey: assignmentKeys.datasets(courseId), exact: true });
    },
  });
}

export function useScenarioDataset(courseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: ScenarioDatasetBody) => apiSend('POST', `${base(courseId)}/datasets/scenario`, body, datasetDetail),
    onSuccess: (d) => {
      qc.setQueryData(assignmentKeys.dataset(courseId, d.id), d);
      return qc.invalidateQueries({ queryKey: assignmentKeys.datasets(courseId), exact: true });
    },
  });
}

/** Create (no id) or save (id) an assignment's configuration. */
export function useSaveAssignment(courseId: number, id?: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: AssignmentConfigInput) =>
      id === undefined
        ? apiSend('POST', `${base(courseId)}/assignments`, body, assignmentDetail)
        : apiSend('PUT', `${base(courseId)}/assignments/${id}`, body, assignmentDetail),
    onSuccess: (a) => {
      qc.setQueryData(assignmentKeys.detail(courseId, a.id), a);
      void qc.invalidateQueries({ queryKey: assignmentKeys.detail(courseId, a.id), refetchType: 'none' });
      void qc.invalidateQueries({ queryKey: assignmentKeys.preview(courseId, a.id) });
      void qc.invalidateQueries({ queryKey: assignmentKeys.progress(courseId, a.id) });
      return qc.invalidateQueries({ queryKey: assignmentKeys.list(courseId) });
    },
  });
}

export function useAssignmentAction(courseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, action }: { id: number; action: 'publish' | 'close' }) => apiSend('POST', `${base(courseId)}/assignments/${id}/${action}`, {}, assignmentDetail),
    onSuccess: (a) => {
      const id = a.id;
      qc.setQueryData(assignmentKeys.detail(courseId, id), a);
      void qc.invalidateQueries({ queryKey: assignmentKeys.progress(courseId, id) });
      void qc.invalidateQueries({ queryKey: assignmentKeys.variants(courseId, id) });
      void qc.invalidateQueries({ queryKey: assignmentKeys.preview(courseId, id) });
      return qc.invalidateQueries({ queryKey: assignmentKeys.list(courseId) });
    },
  });
}

export function useRetryReferences(courseId: number, id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => apiSend('POST', `${base(courseId)}/assignments/${id}/references/retry`, {}, z.unknown()),
    onSuccess: () => qc.invalidateQueries({ queryKey: assignmentKeys.progress(courseId, id) }),
  });
}

/** Address of a variant download (the caller's own; staff name a student). */
export function datasetDownloadUrl(courseId: number, id: number, format: 'npy' | 'csv' | 'json', opts: { part?: 'x' | 'y'; student?: number } = {}): string {
  const q = new URLSearchParams({ format });
  if (opts.part === 'y') q.set('part', 'y');
  if (opts.student !== undefined) q.set('student', String(opts.student));
  return `${base(courseId)}/assignments/${id}/dataset?${q.toString()}`;
}
