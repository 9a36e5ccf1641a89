import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { returnPlanSchema, Plan } from '@ebbtide/contracts';
import type { z } from 'zod';
import { apiSend } from '../../../lib/api-client';
import { coursePlansQueryOptions } from './get-course-plans';
import { planQueryOptions } from './get-plan';

export type ReturnPlanInput = z.input<typeof returnPlanSchema>;

/** POST /api/plans/:id/return */
export const returnPlan = (planId: string, input: ReturnPlanInput) =>
  apiSend<Plan>(`/api/plans/${planId}/return`, 'POST', input);

export const useReturnPlan = (planId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: ReturnPlanInput) => returnPlan(planId, input),
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
