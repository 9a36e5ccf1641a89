import { queryOptions, useQuery } from '@tanstack/react-query';
import type { DerivedValues } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/patients/:id/derived — CrCl, body weights, BSA, eGFR from the latest covariates. */
export const getDerivedValues = (patientId: string) =>
  apiFetch<DerivedValues>(`/api/patients/${patientId}/derived`);

export const derivedValuesQueryOptions = (patientId: string) =>
  queryOptions({
    queryKey: ['derived-values', 'detail', patientId],
    queryFn: () => getDerivedValues(patientId),
  });

export const useDerivedValues = (patientId: string) =>
  useQuery(derivedValuesQueryOptions(patientId));
