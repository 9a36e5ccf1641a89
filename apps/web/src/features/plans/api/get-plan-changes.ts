import { queryOptions, useQuery } from '@tanstack/react-query';
import type { PlanChanges } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/plans/:id/changes — what changed since the course's last countersigned plan. */
export const getPlanChanges = (planId: string) =>
  apiFetch<PlanChanges>(`/api/plans/${planId}/changes`);

export const planChangesQueryOptions = (planId: string) =>
  queryOptions({
    queryKey: ['plans', 'changes', planId],
    queryFn: () => getPlanChanges(planId),
  });

export const usePlanChanges = (planId: string) => useQuery(planChangesQueryOptions(planId));
