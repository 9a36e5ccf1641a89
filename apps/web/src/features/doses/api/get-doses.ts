import { queryOptions, useQuery } from '@tanstack/react-query';
import type { DosePage } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/courses/:id/doses — in time order. */
export const getDoses = (courseId: string) =>
  apiFetch<DosePage>(`/api/courses/${courseId}/doses?pageSize=100`);

export const dosesQueryOptions = (courseId?: string) =>
  queryOptions({
    queryKey: ['doses', 'list', courseId ? { courseId } : {}],
    queryFn: () => getDoses(courseId as string),
    enabled: !!courseId,
  });

export const useDoses = (courseId: string) => useQuery(dosesQueryOptions(courseId));
