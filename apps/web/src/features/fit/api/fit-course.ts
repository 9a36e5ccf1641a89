import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { FitResponse, EstimationMethod } from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';

export interface FitParams {
  method?: EstimationMethod;
  excludeLevelIds?: string[];
}

/** POST /api/courses/:id/fit — the server fits from what is saved (a computation, not a write). */
export const fitCourse = (courseId: string, params: FitParams) =>
  apiSend<FitResponse>(`/api/courses/${courseId}/fit`, 'POST', {
    method: params.method ?? 'map',
    excludeLevelIds: params.excludeLevelIds ?? [],
  });

export const fitQueryOptions = (courseId: string, params: FitParams = {}) =>
  queryOptions({
    queryKey: ['fits', 'detail', courseId, params],
    queryFn: () => fitCourse(courseId, params),
  });

export const useFit = (courseId: string, params: FitParams, enabled = true) =>
  useQuery({ ...fitQueryOptions(courseId, params), enabled, placeholderData: keepPreviousData });
