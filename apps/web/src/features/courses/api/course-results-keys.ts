import type { QueryKey } from '@tanstack/react-query';
import { caseloadQueryOptions } from '../../caseload/api/get-caseload';
import { fitQueryOptions } from '../../fit/api/fit-course';
import { levelValidityQueryOptions } from '../../levels/api/get-level-validity';
import { regimenSearchQueryOptions } from '../../regimens/api/search-regimens';
import { simulationQueryOptions } from './simulate-course';

/** Every computed result that depends on a course's doses and levels (invalidated together). */
export const courseResultsQueryKeys = (courseId: string): QueryKey[] => [
  levelValidityQueryOptions(courseId).queryKey,
  fitQueryOptions(courseId).queryKey,
  simulationQueryOptions(courseId).queryKey,
  regimenSearchQueryOptions(courseId).queryKey,
  caseloadQueryOptions().queryKey,
];
