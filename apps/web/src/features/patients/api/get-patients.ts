import { queryOptions, useQuery } from '@tanstack/react-query';
import type { PatientPage } from '@ebbtide/contracts';
import { apiFetch, toQueryString } from '../../../lib/api-client';

export interface PatientFilters {
  q?: string;
  ward?: string;
  isTeaching?: 'true' | 'false';
  page?: number;
}

/** GET /api/patients */
export const getPatients = (filters: PatientFilters) =>
  apiFetch<PatientPage>(`/api/patients${toQueryString({ pageSize: 50, ...filters })}`);

export const patientsQueryOptions = (filters: PatientFilters = {}) =>
  queryOptions({
    queryKey: ['patients', 'list', filters],
    queryFn: () => getPatients(filters),
  });

export const usePatients = (filters: PatientFilters) => useQuery(patientsQueryOptions(filters));
