import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiFetch } from '../../../lib/api-client';

export interface HealthReport {
  status: 'ok' | 'degraded';
  version: string;
  database: { reachable: boolean };
  time: string;
}

export const getHealth = () => apiFetch<HealthReport>('/api/health');

export const healthQueryOptions = () =>
  queryOptions({
    queryKey: ['health'],
    queryFn: getHealth,
    refetchInterval: 30_000,
  });

export const useHealth = () => useQuery(healthQueryOptions());
