/**
 * Starts the real local identity provider and the real API against each other, both on loopback
 * port 0: the provider's socket listens first, so the API can be configured with the issuer, and
 * the provider is then configured with the API's callback URL.
 */
import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { startServer, type RunningServer } from '../../src/server';
// The provider is a development/test stand-in in apps/idp; tests start it in-process.
import { startIdp, type RunningIdp } from '../../../idp/src/server';
import type { IdpConfigInput } from '../../../idp/src/config';
export { DEMO_PASSWORD } from '../../../idp/src/demo';

export const DEMO_LOGINS = {
  pharmacist: 'maren.okafor',
  reviewer: 'tomasz.lindqvist',
  trainee: 'priya.ferreira-hale',
  admin: 'dov.achterberg',
} as const;

export interface ProviderAndApi {
  idp: RunningIdp;
  api: RunningServer;
  stop: () => Promise<void>;
}

export async function startProviderAndApi(
  options: { idp?: Partial<IdpConfigInput>; webDist?: string; logLevel?: 'silent' | 'warn' } = {},
): Promise<ProviderAndApi> {
  const idpSocket = createServer();
  await new Promise<void>((resolve) => idpSocket.listen(0, '127.0.0.1', () => resolve()));
  const issuer = `http://127.0.0.1:${(idpSocket.address() as AddressInfo).port}`;
  const api = await startServer({
    port: 0,
    nodeEnv: 'test',
    logLevel: options.logLevel ?? 'silent',
    oidcIssuer: issuer,
    ...(options.webDist ? { webDist: options.webDist } : {}),
  });
  const idp = await startIdp(
    {
      nodeEnv: 'test',
      logLevel: 'silent',
      redirectUris: [`${api.url}/auth/callback`],
      postLogoutRedirectUris: [`${api.url}/signed-out`],
      eventsUrl: `${api.url}/api/internal/identity-provider-events`,
      ...options.idp,
    },
    { server: idpSocket },
  );
  return {
    idp,
    api,
    stop: async () => {
      await api.stop();
      await idp.stop();
    },
  };
}
