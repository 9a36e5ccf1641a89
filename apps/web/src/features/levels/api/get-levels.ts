import { queryOptions, useQuery } from '@tanstack/react-query';
import type { LevelPage } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/courses/:id/levels — in time order. */
export const getLevels = (courseId: string) =>
  apiFetch<LevelPage>(`/api/courses/${courseId}/levels?pageSize=100`);

export const levelsQueryOptions = (courseId?: string) =>
  queryOptions({
    queryKey: ['levels', 'list', courseId ? { courseId } : {}],
    queryFn: () => getLevels(courseId as string),
    enabled: !!courseId,
  });

export const useLevels = (courseId: string) => useQuery(levelsQueryOptions(courseId));
