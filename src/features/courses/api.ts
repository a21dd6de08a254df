import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import {
  courseDetail,
  courseListResponse,
  enrollment,
  memberListResponse,
  type CreateCourseBody,
  type JoinCourseBody,
} from '../../../shared/api';
import { apiGet, apiSend } from '../../lib/http';

export const courseKeys = {
  all: ['courses'] as const,
  list: () => [...courseKeys.all, 'list'] as const,
  detail: (id: number) => [...courseKeys.all, 'detail', id] as const,
  members: (id: number) => [...courseKeys.detail(id), 'members'] as const,
  enrollment: (id: number) => [...courseKeys.detail(id), 'enrollment'] as const,
};

export function useCourses() {
  return useQuery({
    queryKey: courseKeys.list(),
    queryFn: async () => (await apiGet('/api/courses', courseListResponse)).courses,
  });
}

export function useCourse(id: number) {
  return useQuery({
    queryKey: courseKeys.detail(id),
    queryFn: () => apiGet(`/api/courses/${id}`, courseDetail),
    enabled: Number.isInteger(id) && id > 0,
  });
}

export function useMembers(id: number, enabled = true) {
  return useQuery({
    queryKey: courseKeys.members(id),
    queryFn: async () => (await apiGet(`/api/courses/${id}/members`, memberListResponse)).members,
    enabled,
  });
}

export function useEnrollment(id: number, enabled = true) {
  return useQuery({
    queryKey: courseKeys.enrollment(id),
    queryFn: () => apiGet(`/api/courses/${id}/enrollment`, enrollment),
    enabled,
  });
}

export function useCreateCourse() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateCourseBody) => apiSend('POST', '/api/courses', body, courseDetail),
    onSuccess: (course) => {
      qc.setQueryData(courseKeys.detail(course.id), course);
      return qc.invalidateQueries({ queryKey: courseKeys.list() });
    },
  });
}

export function useJoinCourse() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: JoinCourseBody) => apiSend('POST', '/api/courses/join', body, courseDetail),
    onSuccess: (course) => {
      qc.setQueryData(courseKeys.detail(course.id), course);
      return qc.invalidateQueries({ queryKey: courseKeys.list() });
    },
  });
}

/** Instructor: give the course a fresh join code, or turn joining off. */
export function useJoinCodeAction(courseId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (action: 'rotate' | 'disable') => apiSend('POST', `/api/courses/${courseId}/join-code`, { action }, courseDetail),
    onSuccess: (course) => {
      qc.setQueryData(courseKeys.detail(courseId), course);
    },
  });
}
