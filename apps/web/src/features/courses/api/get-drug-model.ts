import { queryOptions, useQuery } from '@tanstack/react-query';
import type { DrugModel } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/drug-models/:id?version= — one stored version of a library model. */
export const getDrugModel = (id: string, version: number) =>
  apiFetch<DrugModel>(`/api/drug-models/${encodeURIComponent(id)}?version=${version}`);

export const drugModelQueryOptions = (id: string, version: number) =>
  queryOptions({
    queryKey: ['drug-models', 'detail', id, { version }],
    queryFn: () => getDrugModel(id, version),
    staleTime: 10 * 60_000,
  });

export const useDrugModel = (id: string | undefined, version: number | undefined) =>
  useQuery({
    ...drugModelQueryOptions(id ?? '', version ?? 1),
    enabled: !!id && !!version,
  });
