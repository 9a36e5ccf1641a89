import { queryOptions, useQuery } from '@tanstack/react-query';
import type { PlanList } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/courses/:courseId/plans — the course's plan versions, newest first. */
export const getCoursePlans = (courseId: string) =>
  apiFetch<PlanList>(`/api/courses/${courseId}/plans`);

export const coursePlansQueryOptions = (courseId: string) =>
  queryOptions({
    queryKey: ['plans', 'list', { courseId }],
    queryFn: () => getCoursePlans(courseId),
  });

export const useCoursePlans = (courseId: string) => useQuery(coursePlansQueryOptions(courseId));
