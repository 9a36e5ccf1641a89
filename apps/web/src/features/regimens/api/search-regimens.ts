import { queryOptions, useQuery } from '@tanstack/react-query';
import type { RegimenSearchRequest, RegimenSearchResponse } from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';

export type RegimenSearchParams = Partial<RegimenSearchRequest>;

/** POST /api/courses/:id/regimens — candidate regimens ranked against the course target. */
export const searchRegimens = (courseId: string, params: RegimenSearchParams) =>
  apiSend<RegimenSearchResponse>(`/api/courses/${courseId}/regimens`, 'POST', params);

export const regimenSearchQueryOptions = (courseId: string, params: RegimenSearchParams = {}) =>
  queryOptions({
    queryKey: ['regimen-searches', 'detail', courseId, params],
    queryFn: () => searchRegimens(courseId, params),
  });

export const useRegimenSearch = (courseId: string, params: RegimenSearchParams) =>
  useQuery(regimenSearchQueryOptions(courseId, params));
