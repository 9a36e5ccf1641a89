import knexFactory, { type Knex } from 'knex';
import { knexConfig } from './knex-config';

export type Db = Knex;

export function createDb(databaseUrl: string): Db {
  return knexFactory(knexConfig(databaseUrl));
}

/** True when the database answers a trivial query within the timeout. */
export async function isDatabaseReachable(db: Db, timeoutMs = 2000): Promise<boolean> {
  try {
    await db.raw('select 1').timeout(timeoutMs, { cancel: true });
    return true;
  } catch {
    return false;
  }
}
