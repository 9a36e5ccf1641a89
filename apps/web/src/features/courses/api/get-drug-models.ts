import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Drug, DrugModel, Page } from '@ebbtide/contracts';
import { apiFetch, toQueryString } from '../../../lib/api-client';

/** GET /api/drug-models — the library, latest version of each model. */
export const getDrugModels = (drug?: Drug) =>
  apiFetch<Page<DrugModel>>(`/api/drug-models${toQueryString({ drug, pageSize: 100 })}`);

export const drugModelsQueryOptions = (drug?: Drug) =>
  queryOptions({
    queryKey: ['drug-models', 'list', drug ? { drug } : {}],
    queryFn: () => getDrugModels(drug),
    staleTime: 5 * 60_000,
  });

export const useDrugModels = (drug?: Drug) => useQuery(drugModelsQueryOptions(drug));
