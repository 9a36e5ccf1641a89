import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Patient } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/patients/:id */
export const getPatient = (id: string) => apiFetch<Patient>(`/api/patients/${id}`);

export const patientQueryOptions = (id: string) =>
  queryOptions({ queryKey: ['patients', 'detail', id], queryFn: () => getPatient(id) });

export const usePatient = (id: string) => useQuery(patientQueryOptions(id));
