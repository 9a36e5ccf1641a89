import { queryOptions, useQuery } from '@tanstack/react-query';
import type { TeachingCase } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/teaching/cases/:id — relative times only, never the hidden true patient. */
export const getTeachingCase = (id: string) => apiFetch<TeachingCase>(`/api/teaching/cases/${id}`);

export const teachingCaseQueryOptions = (id: string) =>
  queryOptions({ queryKey: ['teaching-cases', 'detail', id], queryFn: () => getTeachingCase(id) });

export const useTeachingCase = (id: string) => useQuery(teachingCaseQueryOptions(id));
