import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { TestProject } from 'vitest/node';
import { startMailCatcher, type RunningMailCatcher } from '@ebbtide/mailcatcher';
import { startServer, type RunningServer } from '@ebbtide/api/server';
// The local identity provider is a development/test stand-in; the journeys sign in through it.
import { startIdp, type RunningIdp } from '../../apps/idp/src/server';

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
    /** The in-process mail catcher's page and JSON API (GET/DELETE /messages). */
    mailCatcherUrl: string;
    issuer: string;
  }
}

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
let server: RunningServer | undefined;
let mailCatcher: RunningMailCatcher | undefined;
let idp: RunningIdp | undefined;

/**
 * Starts the local identity provider and the real API (serving the built client) against the
 * run's database, both on loopback port 0: the provider's socket listens first so the API knows
 * the issuer, then the provider is configured with the API's callback and sign-out URLs.
 */
export async function setup(project: TestProject): Promise<void> {
  // The mail catcher first, so the API's mail worker delivers to it.
  mailCatcher = await startMailCatcher({ smtpPort: 0, httpPort: 0, nodeEnv: 'test' });
  project.provide('mailCatcherUrl', mailCatcher.httpUrl);
  const idpSocket = createServer();
  await new Promise<void>((resolve) => idpSocket.listen(0, '127.0.0.1', () => resolve()));
  const issuer = `http://127.0.0.1:${(idpSocket.address() as AddressInfo).port}`;
  server = await startServer({
    port: 0,
    smtpHost: '127.0.0.1',
    smtpPort: mailCatcher.smtpPort,
    logLevel: 'warn',
    nodeEnv: 'test',
    oidcIssuer: issuer,
    webDist: path.join(root, 'apps/web/dist'),
  });
  idp = await startIdp(
    {
      nodeEnv: 'test',
      logLevel: 'warn',
      redirectUris: [`${server.url}/auth/callback`],
      postLogoutRedirectUris: [`${server.url}/signed-out`],
      eventsUrl: `${server.url}/api/internal/identity-provider-events`,
    },
    { server: idpSocket },
  );
  project.provide('baseUrl', server.url);
  project.provide('issuer', idp.issuer);
}

export async function teardown(): Promise<void> {
  await server?.stop();
  await mailCatcher?.stop();
  await idp?.stop();
}
