import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { createApp } from './app';
import { loadConfig, type AppConfigInput } from './config';
import { drugModelLibrary } from '@ebbtide/kinetics';
import { createDb } from './data-access/db';
import { ensureEngineLibrary } from './domain/drug-models/library-at-startup';
import { stopPtaQueues } from './jobs/pta-queue';
import { createJobQueue } from './jobs/queue';
import { createLogger } from './lib/logger';
import { ensureMailQueue } from './mail/mail-worker';
import { startWorkers, type RunningWorkers } from './worker';

export interface RunningServer {
  url: string;
  port: number;
  stop: () => Promise<void>;
}

/**
 * Validates config, listens (port 0 picks a free port), then builds the app, so that without
 * PUBLIC_URL the redirect URI and trusted origin are the address actually listened on.
 */
export async function startServer(overrides: Partial<AppConfigInput> = {}): Promise<RunningServer> {
  const initial = loadConfig(process.env, overrides);
  // Requests that arrive while the app is still being built wait for it rather than hang.
  const current: { app?: ReturnType<typeof createApp> } = {};
  let appReady!: () => void;
  const ready = new Promise<void>((resolve) => (appReady = resolve));
  const server: Server = createServer((req, res) => {
    if (current.app) current.app(req, res);
    else void ready.then(() => current.app!(req, res));
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(initial.port, initial.host, () => resolve());
  });
  const { port } = server.address() as AddressInfo;
  const config = loadConfig(process.env, { ...overrides, port });
  const logger = createLogger(config);
  const db = createDb(config.databaseUrl);
  // A freshly migrated database gets the engine's built-in drug models (idempotent, and safe
  // when several API processes start at once).
  await ensureEngineLibrary(db, drugModelLibrary);
  // The process's one job queue is always started (plans enqueue mail) and handed to the app;
  // the workers only when RUN_WORKERS.
  const boss = createJobQueue(config);
  boss.on('error', (err) => logger.error({ err }, 'job queue error'));
  await boss.start();
  await ensureMailQueue(boss);
  const workers: RunningWorkers | undefined = config.runWorkers
    ? await startWorkers({ config, db, logger, boss })
    : undefined;
  current.app = createApp({ config, db, logger, boss });
  appReady();
  const url = `http://${config.host}:${port}`;
  logger.info({ url, issuer: config.oidcIssuer }, 'Ebbtide API listening');
  return {
    url,
    port,
    stop: async () => {
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await workers?.stop();
      // The casework PTA routes still start a queue of their own on first use (jobs/pta-queue.ts).
      await stopPtaQueues();
      await boss.stop({ graceful: true, wait: true });
      await db.destroy();
    },
  };
}
