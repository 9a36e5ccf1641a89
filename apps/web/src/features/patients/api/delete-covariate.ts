import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiSend } from '../../../lib/api-client';
import { covariatesQueryOptions } from './get-covariates';
import { derivedValuesQueryOptions } from './get-derived-values';

/** DELETE /api/covariates/:id?version= */
export const deleteCovariate = (id: string, version: number) =>
  apiSend<void>(`/api/covariates/${id}?version=${version}`, 'DELETE');

export const useDeleteCovariate = (patientId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, version }: { id: string; version: number }) => deleteCovariate(id, version),
    onSettled: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: covariatesQueryOptions(patientId).queryKey }),
        queryClient.invalidateQueries({ queryKey: derivedValuesQueryOptions(patientId).queryKey }),
      ]),
  });
};
