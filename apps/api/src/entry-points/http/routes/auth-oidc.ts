import * as oidc from 'openid-client';
import type { AppConfig } from '../../../config';

const LOOPBACK = new Set(['127.0.0.1', 'localhost', '[::1]', '::1']);

/**
 * The API as a confidential OpenID Connect client (client_secret_basic). Discovery happens on
 * first use and is cached; a failed discovery is retried on the next sign-in. Plain http is
 * accepted for a loopback issuer only (the local development provider).
 */
export function createOidcClient(config: AppConfig) {
  let discovered: Promise<oidc.Configuration> | undefined;
  const issuer = new URL(config.oidcIssuer);
  const insecureLoopback = issuer.protocol === 'http:' && LOOPBACK.has(issuer.hostname);

  return {
    configuration(): Promise<oidc.Configuration> {
      discovered ??= oidc
        .discovery(
          issuer,
          config.oidcClientId,
          undefined,
          oidc.ClientSecretBasic(config.oidcClientSecret),
          insecureLoopback
            ? { execute: [oidc.allowInsecureRequests], timeout: 10 }
            : { timeout: 10 },
        )
        .catch((error: unknown) => {
          discovered = undefined;
          throw error;
        });
      return discovered;
    },
  };
}

export type OidcClient = ReturnType<typeof createOidcClient>;
export { oidc };
