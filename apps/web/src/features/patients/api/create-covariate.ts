import { useMutation, useQueryClient } from '@tanstack/react-query';
import { covariateCreateSchema, type Covariate, type CovariateCreate } from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';
import { covariatesQueryOptions } from './get-covariates';
import { derivedValuesQueryOptions } from './get-derived-values';

export const createCovariateInputSchema = covariateCreateSchema;
export type CreateCovariateInput = CovariateCreate;

/** POST /api/patients/:id/covariates */
export const createCovariate = (patientId: string, input: CreateCovariateInput) =>
  apiSend<Covariate>(`/api/patients/${patientId}/covariates`, 'POST', input);

export const useCreateCovariate = (patientId: string) => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateCovariateInput) => createCovariate(patientId, input),
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: covariatesQueryOptions(patientId).queryKey }),
        queryClient.invalidateQueries({ queryKey: derivedValuesQueryOptions(patientId).queryKey }),
      ]),
  });
};
