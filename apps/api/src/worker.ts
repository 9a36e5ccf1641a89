import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type PgBoss from 'pg-boss';
import type { Logger } from 'pino';
import { loadConfig, type AppConfig } from './config';
import { createDb, type Db } from './data-access/db';
import { PTA_QUEUE } from './domain/jobs/pta';
import { planDeps } from './domain/plans/plan-deps';
import { startRecheckSweep } from './domain/plans/recheck';
import { startPtaWorker, stopPtaQueues } from './jobs/pta-queue';
import { createJobQueue } from './jobs/queue';
import { createLogger } from './lib/logger';
import { startMailWorker } from './mail/mail-worker';
import { createMailTransport } from './mail/transport';

export interface RunningWorkers {
  stop: () => Promise<void>;
}

const LOOPBACK = new Set(['127.0.0.1', 'localhost', '::1']);

/**
 * Starts the background workers on the process's one, already started PgBoss: mail delivery from
 * the outbox, the plan re-check sweep, and the PTA (Monte Carlo) runs. The API process calls it
 * when RUN_WORKERS is true; `tsx src/worker.ts` runs a worker-only process (for more capacity, or
 * to keep heavy runs off the web processes). Every job and its state live in PostgreSQL, so any
 * number of these processes may run at once.
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
  // Plans past their re-check time mail their author (the mail goes through the outbox above).
  const stopSweep = startRecheckSweep(deps.db, planDeps({ config, boss: deps.boss }), {
    onError: (err) => deps.logger.error({ err }, 're-check sweep failed'),
  });
  // PTA runs requested by any API process; pg-boss hands each job to one worker.
  await startPtaWorker({ boss: deps.boss, db: deps.db });
  deps.logger.info('re-check sweep and PTA worker started');
  return {
    stop: async () => {
      await stopSweep();
      await deps.boss.offWork(PTA_QUEUE);
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
    await stopPtaQueues();
    await db.destroy();
    process.exit(0);
  };
  process.on('SIGINT', () => void shutdown('SIGINT'));
  process.on('SIGTERM', () => void shutdown('SIGTERM'));
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  await main();
}
