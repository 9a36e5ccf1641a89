import type { Express } from 'express';
import { afterAll, beforeAll } from 'vitest';
import { createApp } from '../src/app';
import { loadConfig } from '../src/config';
import { createDb, type Db } from '../src/data-access/db';
import { createJobQueue } from '../src/jobs/queue';
import { createLogger } from '../src/lib/logger';

/**
 * The real app against the real PostgreSQL that the test command started
 * (DATABASE_URL points at a database created for this run), with a real job queue as the server
 * gives it: started before the file's tests and stopped after them (hooks registered here).
 */
export function createTestApp(): { app: Express; db: Db } {
  if (!process.env.DATABASE_URL) {
    throw new Error('DATABASE_URL is not set: run the tests through the README test command');
  }
  const config = loadConfig(process.env, { logLevel: 'silent', nodeEnv: 'test' });
  const db = createDb(config.databaseUrl);
  const boss = createJobQueue(config, { supervise: false, schedule: false, max: 2 });
  boss.on('error', () => {});
  beforeAll(() => boss.start());
  afterAll(() => boss.stop({ graceful: false, wait: true }));
  const app = createApp({ config, db, logger: createLogger(config), boss });
  return { app, db };
}
