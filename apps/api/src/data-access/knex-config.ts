import type { Knex } from 'knex';
import { migrationSource } from '../../../../migrations/index';

/** The one place where Knex is configured: the API, the scripts and the tests all call this. */
export function knexConfig(databaseUrl: string): Knex.Config {
  return {
    client: 'pg',
    connection: databaseUrl,
    pool: { min: 0, max: 10 },
    migrations: { migrationSource, tableName: 'knex_migrations' },
  };
}
