import type { QueryClient } from '@tanstack/react-query';
import { courseResultsQueryKeys } from '../../courses/api/course-results-keys';
import { levelsQueryOptions } from './get-levels';

/** A level change invalidates the level list and every computed result of the course. */
export const invalidateAfterLevelChange = (queryClient: QueryClient, courseId: string) =>
  Promise.all([
    queryClient.invalidateQueries({ queryKey: levelsQueryOptions(courseId).queryKey }),
    ...courseResultsQueryKeys(courseId).map((queryKey) =>
      queryClient.invalidateQueries({ queryKey }),
    ),
  ]);
