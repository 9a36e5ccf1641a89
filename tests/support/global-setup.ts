import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { TestProject } from 'vitest/node';
import { startMailCatcher, type RunningMailCatcher } from '@ebbtide/mailcatcher';
import { startServer, type RunningServer } from '@ebbtide/api/server';

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
    /** The in-process mail catcher's page and JSON API (GET/DELETE /messages). */
    mailCatcherUrl: string;
  }
}

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
let server: RunningServer | undefined;
let mailCatcher: RunningMailCatcher | undefined;

/** Starts the real API, serving the built client, against the run's database. */
export async function setup(project: TestProject): Promise<void> {
  // The mail catcher first, so the API's mail worker delivers to it.
  mailCatcher = await startMailCatcher({ smtpPort: 0, httpPort: 0, nodeEnv: 'test' });
  project.provide('mailCatcherUrl', mailCatcher.httpUrl);
  server = await startServer({
    port: 0,
    smtpHost: '127.0.0.1',
    smtpPort: mailCatcher.smtpPort,
    logLevel: 'warn',
    nodeEnv: 'test',
    webDist: path.join(root, 'apps/web/dist'),
  });
  project.provide('baseUrl', server.url);
}

export async function teardown(): Promise<void> {
  await server?.stop();
  await mailCatcher?.stop();
}
