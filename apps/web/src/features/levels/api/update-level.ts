import { useMutation, useQueryClient } from '@tanstack/react-query';
import { levelUpdateSchema, type Level, type LevelUpdate } from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';
import { invalidateAfterLevelChange } from './invalidate';

export const updateLevelInputSchema = levelUpdateSchema;
export type UpdateLevelInput = LevelUpdate;

/** PATCH /api/levels/:id — 409 with both versions when the row changed since it was read. */
export const updateLevel = (id: string, input: UpdateLevelInput) =>
  apiSend<Level>(`/api/levels/${id}`, 'PATCH', input);

export const useUpdateLevel = (courseId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, input }: { id: string; input: UpdateLevelInput }) => updateLevel(id, input),
    onSuccess: () => invalidateAfterLevelChange(queryClient, courseId),
  });
};
