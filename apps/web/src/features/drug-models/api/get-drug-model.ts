import { queryOptions, useQuery } from '@tanstack/react-query';
import type { DrugModel } from '@ebbtide/contracts';
import { apiFetch, toQueryString } from '../../../lib/api-client';

/** GET /api/drug-models/:id?version= — one stored version (the latest when `version` is absent). */
export const getLibraryModel = (id: string, version?: number) =>
  apiFetch<DrugModel>(`/api/drug-models/${encodeURIComponent(id)}${toQueryString({ version })}`);

export const libraryModelQueryOptions = (id: string, version?: number) =>
  queryOptions({
    queryKey: ['drug-models', 'detail', id, version ? { version } : { latest: true }],
    queryFn: () => getLibraryModel(id, version),
  });

export const useLibraryModel = (id: string, version?: number) =>
  useQuery(libraryModelQueryOptions(id, version));
