import { AppError } from '../../lib/app-error';

/** What the domain knows about the signer's authentication: a plain value, never the session. */
export interface SigningAuthentication {
  /** When the signer last entered their credentials (the ID token's auth_time), if known. */
  authenticatedAt: Date | null;
  /**
   * How long after entering credentials at the identity provider a person may sign (21 CFR
   * 11.200); config SIGNING_REAUTH_MAX_AGE_MINUTES.
   */
  windowMinutes: number;
  /** Where the browser goes to re-enter credentials. */
  reauthenticateUrl: string;
}

export function freshUntil(auth: SigningAuthentication): Date | null {
  return auth.authenticatedAt
    ? new Date(auth.authenticatedAt.getTime() + auth.windowMinutes * 60_000)
    : null;
}

export function isFresh(auth: SigningAuthentication, now = new Date()): boolean {
  const until = freshUntil(auth);
  return until !== null && until.getTime() >= now.getTime() && auth.authenticatedAt! <= now;
}

/**
 * Signing (authoring, countersigning, returning) needs credentials entered within the window;
 * otherwise 401 `reauthentication-required` with the URL that re-asks for them.
 */
export function assertFreshAuthentication(auth: SigningAuthentication, now = new Date()): void {
  if (isFresh(auth, now)) return;
  throw new AppError(
    'reauthentication-required',
    `Signing needs your credentials again: you last entered them more than ${auth.windowMinutes} minutes ago`,
    401,
    { reauthenticateUrl: auth.reauthenticateUrl },
  );
}
