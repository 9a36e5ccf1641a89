import { useMutation, useQueryClient } from '@tanstack/react-query';
import { planCreateSchema, type Plan, type PlanCreate } from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';
import { caseloadQueryOptions } from '../../caseload/api/get-caseload';

export const createPlanInputSchema = planCreateSchema;
export type CreatePlanInput = PlanCreate;

/** POST /api/courses/:courseId/plans — "Use this regimen" starts a draft plan. */
export const createPlan = (courseId: string, input: CreatePlanInput) =>
  apiSend<Plan>(`/api/courses/${courseId}/plans`, 'POST', input);

export const useCreatePlan = (courseId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreatePlanInput) =>
      createPlan(courseId, createPlanInputSchema.parse(input)),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: caseloadQueryOptions().queryKey }),
  });
};
