import type { QueryClient } from '@tanstack/react-query';
import { courseResultsQueryKeys } from '../../courses/api/course-results-keys';
import { dosesQueryOptions } from './get-doses';

/** A dose change invalidates the dose list and every computed result of the course. */
export const invalidateAfterDoseChange = (queryClient: QueryClient, courseId: string) =>
  Promise.all([
    queryClient.invalidateQueries({ queryKey: dosesQueryOptions(courseId).queryKey }),
    ...courseResultsQueryKeys(courseId).map((queryKey) =>
      queryClient.invalidateQueries({ queryKey }),
    ),
  ]);
