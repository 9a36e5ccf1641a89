import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiSend } from '../../../lib/api-client';
import { invalidateAfterDoseChange } from './invalidate';

/** DELETE /api/doses/:id?version= */
export const deleteDose = (id: string, version: number) =>
  apiSend<void>(`/api/doses/${id}?version=${version}`, 'DELETE');

export const useDeleteDose = (courseId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, version }: { id: string; version: number }) => deleteDose(id, version),
    onSettled: () => invalidateAfterDoseChange(queryClient, courseId),
  });
};
