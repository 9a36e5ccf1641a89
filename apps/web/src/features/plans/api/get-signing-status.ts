import { queryOptions, useQuery } from '@tanstack/react-query';
import type { SigningStatus } from '@ebbtide/contracts';
import { apiFetch } from '../../../lib/api-client';

/** GET /api/signing/status — may the caller sign now without re-entering credentials? */
export const getSigningStatus = () => apiFetch<SigningStatus>('/api/signing/status');

export const signingStatusQueryOptions = () =>
  queryOptions({
    queryKey: ['signing', 'detail', 'status'],
    queryFn: getSigningStatus,
    refetchInterval: 30_000,
  });

export const useSigningStatus = () => useQuery(signingStatusQueryOptions());

/** Where the browser goes to re-enter credentials, then back to this page. */
export const reauthenticateHref = (status: SigningStatus | undefined, returnTo: string) =>
  `${status?.reauthenticateUrl ?? '/api/signing/reauthenticate'}?returnTo=${encodeURIComponent(returnTo)}`;
