import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { planUpdateSchema, Plan } from '@ebbtide/contracts';
import type { z } from 'zod';
import { apiSend } from '../../../lib/api-client';
import { coursePlansQueryOptions } from './get-course-plans';
import { planQueryOptions } from './get-plan';

export type UpdatePlanInput = z.input<typeof planUpdateSchema>;

/** PATCH /api/plans/:id */
export const updatePlan = (planId: string, input: UpdatePlanInput) =>
  apiSend<Plan>(`/api/plans/${planId}`, 'PATCH', input);

export const useUpdatePlan = (planId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdatePlanInput) => updatePlan(planId, input),
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
