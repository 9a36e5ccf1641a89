import { queryOptions, useQuery } from '@tanstack/react-query';
import type { CaseloadPage } from '@ebbtide/contracts';
import { apiFetch, toQueryString } from '../../../lib/api-client';

export interface CaseloadFilters {
  scope?: 'mine' | 'all';
  ward?: string;
  sort?: 'due' | 'patient' | 'ward' | 'drug';
  order?: 'asc' | 'desc';
  page?: number;
}

/** GET /api/caseload — the signed-in pharmacist's active courses and what is due. */
export const getCaseload = (filters: CaseloadFilters) =>
  apiFetch<CaseloadPage>(`/api/caseload${toQueryString({ pageSize: 100, ...filters })}`);

export const caseloadQueryOptions = (filters: CaseloadFilters = {}) =>
  queryOptions({
    queryKey: ['caseload', 'list', filters],
    queryFn: () => getCaseload(filters),
  });

export const useCaseload = (filters: CaseloadFilters) => useQuery(caseloadQueryOptions(filters));
