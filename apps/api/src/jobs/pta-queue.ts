import type PgBoss from 'pg-boss';
import type { Logger } from 'pino';
import type { AppConfig } from '../config';
import type { Db } from '../data-access/db';
import { createPtaPool, type PtaPool } from '@ebbtide/kinetics/node';
import { PTA_QUEUE, runPtaJob, type JobQueue, type PtaRunner } from '../domain/jobs/pta';
import { createJobQueue } from './queue';

/**
 * The PTA queue on pg-boss. Started lazily by the first PTA request of this process, which also
 * works the queue (pg-boss hands each job to exactly one worker across processes, so several API
 * processes share the load). Job state and progress live in `engine_jobs`, so any process can
 * answer the client's polling.
 */
const running = new Map<string, Promise<PgBoss>>();

/** One worker-thread pool per process, started by the first large run. */
let pool: PtaPool | null = null;
const lazyPool: PtaRunner = {
  run: (input) => {
    pool ??= createPtaPool({ workers: 2 });
    return pool.run(input);
  },
};

async function start(
  config: Pick<AppConfig, 'databaseUrl'>,
  db: Db,
  logger: Logger,
): Promise<PgBoss> {
  const boss = createJobQueue(config);
  boss.on('error', (err) => logger.error({ err }, 'PTA queue error'));
  await boss.start();
  await startPtaWorker({ boss, db });
  return boss;
}

/**
 * Registers the PTA worker on an already started PgBoss, e.g. from a worker-only process beside its
 * other workers, so PTA runs can go to machines other than the API's.
 */
export async function startPtaWorker(deps: { boss: PgBoss; db: Db }): Promise<void> {
  await deps.boss.createQueue(PTA_QUEUE);
  await deps.boss.work<{ jobId: string }>(
    PTA_QUEUE,
    { pollingIntervalSeconds: 0.5 },
    async (jobs) => {
      for (const job of jobs) await runPtaJob(deps.db, job.data.jobId, { pool: lazyPool });
    },
  );
}

/**
 * The queue the PTA routes send to. With the process's own started PgBoss (`boss`), the PTA worker
 * is registered on it at the first send; without one, a queue of this module's own is started lazily.
 */
export function ptaQueue(
  config: Pick<AppConfig, 'databaseUrl'>,
  db: Db,
  logger: Logger,
  boss?: PgBoss,
): JobQueue {
  let shared: Promise<PgBoss> | null = null;
  return {
    async send(queue, data) {
      if (boss) {
        shared ??= startPtaWorker({ boss, db }).then(() => boss);
        await (await shared).send(queue, data);
        return;
      }
      let own = running.get(config.databaseUrl);
      if (!own) {
        own = start(config, db, logger);
        running.set(config.databaseUrl, own);
        own.catch(() => running.delete(config.databaseUrl));
      }
      await (await own).send(queue, data);
    },
  };
}

/** Stops every PTA queue this process started (shutdown, tests). */
export async function stopPtaQueues(): Promise<void> {
  const all = [...running.values()];
  running.clear();
  await Promise.all(all.map(async (b) => (await b).stop({ graceful: true, wait: true })));
  const p = pool;
  pool = null;
  await p?.close();
}
