import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { countersignSchema, Plan } from '@ebbtide/contracts';
import type { z } from 'zod';
import { apiSend } from '../../../lib/api-client';
import { coursePlansQueryOptions } from './get-course-plans';
import { planQueryOptions } from './get-plan';

export type CountersignPlanInput = z.input<typeof countersignSchema>;

/** POST /api/plans/:id/countersign */
export const countersignPlan = (planId: string, input: CountersignPlanInput) =>
  apiSend<Plan>(`/api/plans/${planId}/countersign`, 'POST', input);

export const useCountersignPlan = (planId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CountersignPlanInput) => countersignPlan(planId, input),
    onSuccess: (plan) => {
      queryClient.setQueryData(planQueryOptions(plan.id).queryKey, plan);
      void queryClient.invalidateQueries({ queryKey: planQueryOptions(planId).queryKey });
      void queryClient.invalidateQueries({
        queryKey: coursePlansQueryOptions(plan.courseId).queryKey,
      });
      void queryClient.invalidateQueries({ queryKey: ['reviews'] });
    },
  });
};
