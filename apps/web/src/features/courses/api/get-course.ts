import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Course } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/courses/:id */
export const getCourse = (id: string) => apiFetch<Course>(`/api/courses/${id}`);

export const courseQueryOptions = (id: string) =>
  queryOptions({ queryKey: ['courses', 'detail', id], queryFn: () => getCourse(id) });

export const useCourse = (id: string) => useQuery(courseQueryOptions(id));
