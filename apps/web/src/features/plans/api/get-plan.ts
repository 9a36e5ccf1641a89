import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Plan } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/plans/:id */
export const getPlan = (planId: string) => apiFetch<Plan>(`/api/plans/${planId}`);

export const planQueryOptions = (planId: string) =>
  queryOptions({ queryKey: ['plans', 'detail', planId], queryFn: () => getPlan(planId) });

export const usePlan = (planId: string) => useQuery(planQueryOptions(planId));
