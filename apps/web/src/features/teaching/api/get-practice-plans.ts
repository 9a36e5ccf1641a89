import { queryOptions, useQuery } from '@tanstack/react-query';
import type { PracticePlanList } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/teaching/cases/:id/practice-plans — the caller's own attempts, newest first. */
export const getPracticePlans = (caseId: string) =>
  apiFetch<PracticePlanList>(`/api/teaching/cases/${caseId}/practice-plans`);

export const practicePlansQueryOptions = (caseId: string) =>
  queryOptions({
    queryKey: ['practice-plans', 'list', { caseId }],
    queryFn: () => getPracticePlans(caseId),
  });

export const usePracticePlans = (caseId: string) => useQuery(practicePlansQueryOptions(caseId));
