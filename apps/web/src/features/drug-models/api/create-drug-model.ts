import { useMutation, useQueryClient } from '@tanstack/react-query';
import { drugModelCreateSchema, type DrugModel, type DrugModelCreate } from '@ebbtide/contracts';
import { apiSend } from '../../../lib/api-client';
import { libraryModelQueryOptions } from './get-drug-model';
import { libraryModelsQueryOptions } from './get-drug-models';

export const createDrugModelInputSchema = drugModelCreateSchema;
export type CreateDrugModelInput = DrugModelCreate;

/** POST /api/drug-models (admin) — a new model, or a new version of an existing id. */
export const createDrugModel = (input: CreateDrugModelInput) =>
  apiSend<DrugModel>('/api/drug-models', 'POST', input);

export const useCreateDrugModel = () => {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createDrugModel,
    onSuccess: (created) => {
      // ['drug-models', 'list'] and ['drug-models', 'detail', id] prefixes, through the factories.
      const list = libraryModelsQueryOptions().queryKey.slice(0, 2);
      const detail = libraryModelQueryOptions(created.id).queryKey.slice(0, 3);
      void queryClient.invalidateQueries({ queryKey: list });
      void queryClient.invalidateQueries({ queryKey: detail });
    },
  });
};
