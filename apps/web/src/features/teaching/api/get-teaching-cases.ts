import { queryOptions, useQuery } from '@tanstack/react-query';
import type { TeachingCaseList } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/teaching/cases */
export const getTeachingCases = () => apiFetch<TeachingCaseList>('/api/teaching/cases');

export const teachingCasesQueryOptions = () =>
  queryOptions({ queryKey: ['teaching-cases', 'list', {}], queryFn: getTeachingCases });

export const useTeachingCases = () => useQuery(teachingCasesQueryOptions());
