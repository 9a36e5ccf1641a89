import PgBoss from 'pg-boss';
import type { AppConfig } from '../config';

/**
 * The app-wide job queue (pg-boss 10) on the API's own PostgreSQL database, in schema `pgboss`.
 * Returned unstarted: the caller owns it, `await boss.start()` before use and `await boss.stop()`
 * on shutdown. Every queue must be created with `boss.createQueue(name)` before send/work
 * (pg-boss 10); the modules that own a queue do that themselves (see mail/mail-worker.ts).
 *
 * Several API and worker processes may share one database: pg-boss hands each job to one worker.
 */
export function createJobQueue(
  config: Pick<AppConfig, 'databaseUrl'>,
  options: Partial<PgBoss.ConstructorOptions> = {},
): PgBoss {
  return new PgBoss({
    connectionString: config.databaseUrl,
    schema: 'pgboss',
    application_name: 'ebbtide-jobs',
    max: 4,
    ...options,
  });
}
