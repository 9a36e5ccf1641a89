import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiSend } from '../../../lib/api-client';
import { invalidateAfterLevelChange } from './invalidate';

/** DELETE /api/levels/:id?version= */
export const deleteLevel = (id: string, version: number) =>
  apiSend<void>(`/api/levels/${id}?version=${version}`, 'DELETE');

export const useDeleteLevel = (courseId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, version }: { id: string; version: number }) => deleteLevel(id, version),
    onSettled: () => invalidateAfterLevelChange(queryClient, courseId),
  });
};
