import { queryOptions, useQuery } from '@tanstack/react-query';
import type { CovariatePage } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/patients/:id/covariates — newest first. */
export const getCovariates = (patientId: string) =>
  apiFetch<CovariatePage>(
    `/api/patients/${patientId}/covariates?pageSize=100&sort=observedAt&order=desc`,
  );

export const covariatesQueryOptions = (patientId: string) =>
  queryOptions({
    queryKey: ['covariates', 'list', { patientId }],
    queryFn: () => getCovariates(patientId),
  });

export const useCovariates = (patientId: string) => useQuery(covariatesQueryOptions(patientId));
