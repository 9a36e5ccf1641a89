import { useMutation, useQueryClient } from '@tanstack/react-query';
import { levelCreateSchema, type Level, type LevelCreate } from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';
import { invalidateAfterLevelChange } from './invalidate';

export const createLevelInputSchema = levelCreateSchema;
export type CreateLevelInput = LevelCreate;

/** POST /api/courses/:id/levels */
export const createLevel = (courseId: string, input: CreateLevelInput) =>
  apiSend<Level>(`/api/courses/${courseId}/levels`, 'POST', input);

export const useCreateLevel = (courseId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateLevelInput) => createLevel(courseId, input),
    onSuccess: () => invalidateAfterLevelChange(queryClient, courseId),
  });
};
