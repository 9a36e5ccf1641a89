import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type PgBoss from 'pg-boss';
import type { Logger } from 'pino';
import { loadConfig, type AppConfig } from './config';
import { createDb, type Db } from './data-access/db';
import { createJobQueue } from './jobs/queue';
import { createLogger } from './lib/logger';
import { startMailWorker } from './mail/mail-worker';
import { createMailTransport } from './mail/transport';

export interface RunningWorkers {
  stop: () => Promise<void>;
}

const LOOPBACK = new Set(['127.0.0.1', 'localhost', '::1']);

/**
 * Starts the background workers (today: mail delivery) on an already started PgBoss.
 * The API process calls it when RUN_WORKERS is true; `tsx src/worker.ts` runs a worker-only
 * process (for more delivery capacity, or to keep workers off the web processes).
 */
export async function startWorkers(deps: {
  config: AppConfig;
  db: Db;
  logger: Logger;
  boss: PgBoss;
}): Promise<RunningWorkers> {
  const { config } = deps;
  const transport = createMailTransport({
    host: config.smtpHost,
    port: config.smtpPort,
    secure: config.smtpSecure,
    user: config.smtpUser,
    password: config.smtpPassword,
    // The local catcher offers no TLS; outside development a server must be able to upgrade.
    ignoreTls: config.nodeEnv !== 'production' && LOOPBACK.has(config.smtpHost),
  });
  const mail = await startMailWorker({
    boss: deps.boss,
    db: deps.db,
    transport,
    logger: deps.logger,
    from: config.mailFrom,
  });
  deps.logger.info({ smtp: `${config.smtpHost}:${config.smtpPort}` }, 'mail worker started');
  return {
    stop: async () => {
      await mail.stop();
      transport.close();
    },
  };
}

async function main(): Promise<void> {
  const config = loadConfig();
  const logger = createLogger(config);
  const db = createDb(config.databaseUrl);
  const boss = createJobQueue(config);
  boss.on('error', (err) => logger.error({ err }, 'job queue error'));
  await boss.start();
  const workers = await startWorkers({ config, db, logger, boss });
  const shutdown = async (signal: string) => {
    logger.info({ signal }, 'stopping workers');
    await workers.stop();
    await boss.stop({ graceful: true, wait: true });
    await db.destroy();
    process.exit(0);
  };
  process.on('SIGINT', () => void shutdown('SIGINT'));
  process.on('SIGTERM', () => void shutdown('SIGTERM'));
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  await main();
}
