import { useMutation } from '@tanstack/react-query';
import { paths } from '../../../config/paths';
import { apiFetch } from '../../../lib/api-client';

/**
 * Ends the Ebbtide session (POST /auth/logout), then sends the browser to the identity
 * provider's end-session page it names (RP-initiated logout), which returns to /signed-out.
 */
export const signOut = () =>
  apiFetch<{ redirectTo: string }>(paths.authLogout.getHref(), { method: 'POST' });

export const useSignOut = () =>
  useMutation({
    mutationFn: signOut,
    onSuccess: ({ redirectTo }) => window.location.assign(redirectTo),
    onError: () => window.location.assign(paths.signedOut.getHref()),
  });
