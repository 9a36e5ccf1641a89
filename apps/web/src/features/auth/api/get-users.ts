import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Role } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

export interface UserSummary {
  id: string;
  displayName: string;
  email: string | null;
  role: Role;
  roleSource: 'claim' | 'admin';
  lastSignInAt: string | null;
}

export const getUsers = async () => (await apiFetch<{ users: UserSummary[] }>('/api/users')).users;

export const usersQueryOptions = () =>
  queryOptions({ queryKey: ['users', 'list'], queryFn: getUsers });

export const useUsers = () => useQuery(usersQueryOptions());
