import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { anonymisedCopySchema, TeachingCaseSummary } from '@ebbtide/contracts';
import type { z } from 'zod';
import { apiSend } from '../../../lib/api-client';
import { teachingCasesQueryOptions } from './get-teaching-cases';

export type AnonymisedCopyInput = z.input<typeof anonymisedCopySchema>;

/** POST /api/teaching/cases (admin) — the anonymising copy of a real course. */
export const createAnonymisedCopy = (input: AnonymisedCopyInput) =>
  apiSend<TeachingCaseSummary>('/api/teaching/cases', 'POST', input);

export const useCreateAnonymisedCopy = () => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createAnonymisedCopy,
    onSuccess: () =>
      queryClient.invalidateQueries({ queryKey: teachingCasesQueryOptions().queryKey }),
  });
};
