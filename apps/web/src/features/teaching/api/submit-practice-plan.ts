import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { PracticePlan, practicePlanCreateSchema } from '@ebbtide/contracts';
import type { z } from 'zod';
import { apiSend } from '../../../lib/api-client';
import { practicePlansQueryOptions } from './get-practice-plans';
import { teachingCasesQueryOptions } from './get-teaching-cases';

export type PracticePlanInput = z.input<typeof practicePlanCreateSchema>;

/** POST /api/teaching/cases/:id/practice-plans — scored at once; never enters the sign-off queue. */
export const submitPracticePlan = (caseId: string, input: PracticePlanInput) =>
  apiSend<PracticePlan>(`/api/teaching/cases/${caseId}/practice-plans`, 'POST', input);

export const useSubmitPracticePlan = (caseId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: PracticePlanInput) => submitPracticePlan(caseId, input),
    onSuccess: () => {
      void queryClient.invalidateQueries({ queryKey: practicePlansQueryOptions(caseId).queryKey });
      void queryClient.invalidateQueries({ queryKey: teachingCasesQueryOptions().queryKey });
    },
  });
};
