import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Role } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

export interface Me {
  id: string;
  subject: string;
  displayName: string;
  email: string | null;
  role: Role;
}

/**
 * Who is signed in, or null. Asks GET /api/session (public), which answers `{ user: null }` when
 * signed out, so the check itself never shows up as an error; GET /api/me is the 401 variant.
 */
export const getMe = async (): Promise<Me | null> =>
  (await apiFetch<{ user: Me | null }>('/api/session')).user;

export const meQueryOptions = () =>
  queryOptions({
    queryKey: ['session', 'me'],
    queryFn: getMe,
    staleTime: 60_000,
  });

export const useMe = () => useQuery(meQueryOptions());
