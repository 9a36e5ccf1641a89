import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { AuditPage } from '@ebbtide/contracts';
import { apiFetch, toQueryString } from '../../../lib/api-client';

export interface AuditFilters {
  patientId?: string;
  courseId?: string;
  userId?: string;
  action?: string;
  from?: string;
  to?: string;
  page?: number;
}

/** GET /api/audit (admin) — the append-only audit trail, newest first. */
export const getAudit = (filters: AuditFilters) =>
  apiFetch<AuditPage>(`/api/audit${toQueryString({ pageSize: 50, ...filters })}`);

export const auditQueryOptions = (filters: AuditFilters = {}) =>
  queryOptions({
    queryKey: ['audit', 'list', filters],
    queryFn: () => getAudit(filters),
    placeholderData: keepPreviousData,
  });

export const useAudit = (filters: AuditFilters) => useQuery(auditQueryOptions(filters));
