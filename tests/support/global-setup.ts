import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { TestProject } from 'vitest/node';
import { startServer, type RunningServer } from '@ebbtide/api/server';

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
  }
}

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
let server: RunningServer | undefined;

/** Starts the real API, serving the built client, against the run's database. */
export async function setup(project: TestProject): Promise<void> {
  server = await startServer({
    port: 0,
    logLevel: 'warn',
    nodeEnv: 'test',
    webDist: path.join(root, 'apps/web/dist'),
  });
  project.provide('baseUrl', server.url);
}

export async function teardown(): Promise<void> {
  await server?.stop();
}
