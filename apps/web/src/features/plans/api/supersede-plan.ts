import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { planTransitionSchema, Plan } from '@ebbtide/contracts';
import type { z } from 'zod';
import { apiSend } from '../../../lib/api-client';
import { coursePlansQueryOptions } from './get-course-plans';
import { planQueryOptions } from './get-plan';

export type SupersedePlanInput = z.input<typeof planTransitionSchema>;

/** POST /api/plans/:id/supersede */
export const supersedePlan = (planId: string, input: SupersedePlanInput) =>
  apiSend<Plan>(`/api/plans/${planId}/supersede`, 'POST', input);

export const useSupersedePlan = (planId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: SupersedePlanInput) => supersedePlan(planId, input),
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
