import type { Express } from 'express';
import { createApp } from '../src/app';
import { loadConfig } from '../src/config';
import { createDb, type Db } from '../src/data-access/db';
import { createLogger } from '../src/lib/logger';

/**
 * The real app against the real PostgreSQL that the test command started
 * (DATABASE_URL points at a database created for this run).
 */
export function createTestApp(): { app: Express; db: Db } {
  if (!process.env.DATABASE_URL) {
    throw new Error('DATABASE_URL is not set: run the tests through the README test command');
  }
  const config = loadConfig(process.env, { logLevel: 'silent', nodeEnv: 'test' });
  const db = createDb(config.databaseUrl);
  const app = createApp({ config, db, logger: createLogger(config) });
  return { app, db };
}
