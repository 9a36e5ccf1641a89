import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Drug, DrugModel, Page } from '@ebbtide/contracts';
import { apiFetch, toQueryString } from '../../../lib/api-client';

export interface DrugModelListFilters {
  drug?: Drug;
  /** Every stored version instead of the latest of each model. */
  allVersions?: boolean;
}

/** GET /api/drug-models — the library (latest version of each model unless `allVersions`). */
export const getLibraryModels = (filters: DrugModelListFilters = {}) =>
  apiFetch<Page<DrugModel>>(
    `/api/drug-models${toQueryString({
      drug: filters.drug,
      allVersions: filters.allVersions ? 'true' : undefined,
      sort: 'id',
      pageSize: 100,
    })}`,
  );

export const libraryModelsQueryOptions = (filters: DrugModelListFilters = {}) =>
  queryOptions({
    queryKey: [
      'drug-models',
      'list',
      {
        ...(filters.drug ? { drug: filters.drug } : {}),
        ...(filters.allVersions ? { allVersions: true } : {}),
        sort: 'id',
      },
    ],
    queryFn: () => getLibraryModels(filters),
  });

export const useLibraryModels = (filters: DrugModelListFilters = {}) =>
  useQuery(libraryModelsQueryOptions(filters));
