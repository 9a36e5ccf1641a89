import { queryOptions, useQuery } from '@tanstack/react-query';
import type { CoursePage } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/patients/:id/courses */
export const getPatientCourses = (patientId: string) =>
  apiFetch<CoursePage>(`/api/patients/${patientId}/courses?pageSize=100&sort=createdAt&order=desc`);

export const patientCoursesQueryOptions = (patientId?: string) =>
  queryOptions({
    queryKey: ['courses', 'list', patientId ? { patientId } : {}],
    queryFn: () => getPatientCourses(patientId as string),
    enabled: !!patientId,
  });

export const usePatientCourses = (patientId: string) =>
  useQuery(patientCoursesQueryOptions(patientId));
