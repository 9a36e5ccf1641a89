import { useMutation, useQueryClient } from '@tanstack/react-query';
import { doseUpdateSchema, type Dose, type DoseUpdate } from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';
import { invalidateAfterDoseChange } from './invalidate';

export const updateDoseInputSchema = doseUpdateSchema;
export type UpdateDoseInput = DoseUpdate;

/** PATCH /api/doses/:id — 409 with both versions when the row changed since it was read. */
export const updateDose = (id: string, input: UpdateDoseInput) =>
  apiSend<Dose>(`/api/doses/${id}`, 'PATCH', input);

export const useUpdateDose = (courseId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, input }: { id: string; input: UpdateDoseInput }) => updateDose(id, input),
    onSuccess: () => invalidateAfterDoseChange(queryClient, courseId),
  });
};
