import { useMutation, useQueryClient } from '@tanstack/react-query';
import { doseCreateSchema, type Dose, type DoseCreate } from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';
import { invalidateAfterDoseChange } from './invalidate';

export const createDoseInputSchema = doseCreateSchema;
export type CreateDoseInput = DoseCreate;

/** POST /api/courses/:id/doses */
export const createDose = (courseId: string, input: CreateDoseInput) =>
  apiSend<Dose>(`/api/courses/${courseId}/doses`, 'POST', input);

export const useCreateDose = (courseId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateDoseInput) => createDose(courseId, input),
    onSuccess: () => invalidateAfterDoseChange(queryClient, courseId),
  });
};
