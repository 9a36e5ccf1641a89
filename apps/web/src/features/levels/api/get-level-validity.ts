import { queryOptions, useQuery } from '@tanstack/react-query';
import type { LevelValidityResponse } from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';

/** POST /api/courses/:id/level-validity — the verdict on every level of the course. */
export const getLevelValidity = (courseId: string) =>
  apiSend<LevelValidityResponse>(`/api/courses/${courseId}/level-validity`, 'POST', {});

export const levelValidityQueryOptions = (courseId: string) =>
  queryOptions({
    queryKey: ['level-validity', 'detail', courseId],
    queryFn: () => getLevelValidity(courseId),
  });

export const useLevelValidity = (courseId: string) => useQuery(levelValidityQueryOptions(courseId));
