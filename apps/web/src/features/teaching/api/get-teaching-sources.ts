import { queryOptions, useQuery } from '@tanstack/react-query';
import type { TeachingSourceList } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/teaching/sources (admin) — real courses that can be copied, without identifiers. */
export const getTeachingSources = () => apiFetch<TeachingSourceList>('/api/teaching/sources');

export const teachingSourcesQueryOptions = () =>
  queryOptions({ queryKey: ['teaching-sources', 'list', {}], queryFn: getTeachingSources });

export const useTeachingSources = (enabled: boolean) =>
  useQuery({ ...teachingSourcesQueryOptions(), enabled });
